import type { Knex } from 'knex';
import type { PartnerSlot } from '../../shared/schemas/answers.ts';
import { Booking, Resource } from '../models/index.ts';
import { NotFoundError, UnprocessableError } from '../errors.ts';
import { cautionsFor } from '../../shared/cautions.ts';
import type { Actor } from './actor.ts';
import { findVisible, scoped } from './scope.ts';
import { jobSupplies, latestAnswers, siteContacts } from './answer-views.ts';
import { partnerSlotFacts } from './read-policy.ts';
import { supplyLines } from '../../shared/slot-supply.ts';
import { BookingWriter, slotChanged, type BookingLimits } from './booking-writes.ts';
import { CERTIFIED_STAGE_KIND, partnerCertificates } from './certificates.ts';

/** States a partner sees: a pencilled booking is the installer's private plan until it is sent. */
const SHOWN = ['sent', 'confirmed', 'on_site'];

type SlotRow = Booking & {
  stageName: string;
  stageKind: string;
  resourceName: string;
  resourceKind: string;
  siteAddress: string;
  siteTown: string;
  sitePostcode: string;
  accessNotes: string | null;
  installerName: string;
  installerPhone: string | null;
  timeZone: string;
  jobId: string;
  jobReference: string;
  customerName: string;
  customerPhone: string | null;
  sharesCustomerContact: boolean | null;
  unitModel: string | null;
  lengthMm: number | null;
  widthMm: number | null;
  heightMm: number | null;
  dryWeightKg: number | null;
  installationType: string;
  unitFacing: string | null;
};

/**
 * A partner firm's own view: upcoming slots of its resources for every installer it works with.
 * Only what the day needs: the site, access notes, the stage, the unit, the times and who to call,
 * and for electrical work the house's supply. Contacts and supply are the read policy's call
 * (`partnerSlotFacts`): the householder's name and phone only where the installer shares them;
 * their e-mail and every price stay with the installer.
 */
export class PartnerSlotsService {
  private readonly writer: BookingWriter;

  constructor(
    private readonly knex: Knex,
    now: () => number = Date.now,
    limits?: BookingLimits,
  ) {
    this.writer = new BookingWriter(knex, now, limits);
  }

  async list(actor: Actor, from: Date): Promise<PartnerSlot[]> {
    const rows = (await scoped(Booking, actor)
      .join('stages as s', 's.id', 'bookings.stage_id')
      .join('jobs as j', 'j.id', 's.job_id')
      .join('firms as i', 'i.id', 'j.firm_id')
      .join('resources as r', 'r.id', 'bookings.resource_id')
      .leftJoin('units as u', 'u.id', 'j.unit_id')
      .leftJoin('surveys as sv', 'sv.job_id', 'j.id')
      .leftJoin('firm_settings as fs', 'fs.firm_id', 'j.firm_id')
      .whereIn('bookings.state', SHOWN)
      .where('bookings.ends_at', '>', from)
      .orderBy('bookings.starts_at')
      .limit(500)
      .select(
        'bookings.id',
        'bookings.version',
        'bookings.state',
        'bookings.starts_at',
        'bookings.ends_at',
        'bookings.resource_id',
        's.name as stage_name',
        's.kind as stage_kind',
        'r.name as resource_name',
        'r.kind as resource_kind',
        'j.site_address',
        'j.site_town',
        'j.site_postcode',
        'j.access_notes',
        'i.name as installer_name',
        'i.phone as installer_phone',
        'i.time_zone',
        'j.id as job_id',
        'j.reference as job_reference',
        'j.customer_name',
        'j.customer_phone',
        'fs.share_customer_contact_with_partners as shares_customer_contact',
        'u.model as unit_model',
        'j.installation_type',
        'sv.unit_facing',
        'u.length_mm',
        'u.width_mm',
        'u.height_mm',
        'u.dry_weight_kg',
      )) as SlotRow[];
    const keys = rows.map((r) => ({
      bookingId: String(r.id),
      jobId: String(r.jobId),
      startsAt: r.startsAt,
      endsAt: r.endsAt,
      timeZone: r.timeZone,
    }));
    const [answers, onSite, supplies, certificates, away] = await Promise.all([
      latestAnswers(
        this.knex,
        keys.map((k) => k.bookingId),
      ),
      siteContacts(this.knex, keys),
      jobSupplies(
        this.knex,
        keys.map((k) => k.jobId),
      ),
      partnerCertificates(
        this.knex,
        actor.firmId,
        keys.map((k) => k.bookingId),
      ),
      awayDuring(
        this.knex,
        rows.map((r) => ({
          bookingId: String(r.id),
          resourceId: String(r.resourceId),
          resourceName: r.resourceName,
          startsAt: r.startsAt,
          endsAt: r.endsAt,
        })),
      ),
    ]);
    return rows.map((r) => {
      const policy = partnerSlotFacts({
        resourceKind: r.resourceKind,
        customerName: r.customerName,
        customerPhone: r.customerPhone,
        officeName: r.installerName,
        officePhone: r.installerPhone,
        sharesCustomerContact: r.sharesCustomerContact === true,
        siteContact: onSite.get(String(r.id)) ?? null,
        supply: supplies.get(String(r.jobId))!,
        stageKind: r.stageKind,
        installationType: r.installationType,
        unitFacing: r.unitFacing,
      });
      return {
        id: String(r.id),
        version: r.version,
        state: r.state,
        startsAt: r.startsAt.toISOString(),
        endsAt: r.endsAt.toISOString(),
        timeZone: r.timeZone,
        stage: { name: r.stageName, kind: r.stageKind },
        resource: { id: String(r.resourceId), name: r.resourceName, kind: r.resourceKind },
        site: { address: r.siteAddress, town: r.siteTown, postcode: r.sitePostcode, accessNotes: r.accessNotes },
        installer: { name: r.installerName, phone: r.installerPhone },
        job: { reference: r.jobReference },
        unit: r.unitModel
          ? `${r.unitModel}, ${r.lengthMm} × ${r.widthMm} × ${r.heightMm} mm, ${r.dryWeightKg} kg dry`
          : null,
        supply: policy.supply ? supplyLines(policy.supply) : null,
        facing: policy.facing,
        contacts: policy.contacts,
        cautions: cautionsFor(r.stageKind),
        answer: answers.get(String(r.id)) ?? null,
        certificate: {
          wanted: r.stageKind === CERTIFIED_STAGE_KIND && r.state !== 'sent',
          uploaded: certificates.get(String(r.id)) ?? null,
        },
        away: away.get(String(r.id)) ?? null,
      };
    });
  }

  /**
   * Puts one of the partner's own people on a slot (same kind of work). The booking's version moves
   * on; a slot still awaiting an answer gets a fresh request so the links in hand stay good.
   */
  async assignPerson(actor: Actor, id: string, resourceId: string, version: number): Promise<PartnerSlot> {
    await this.writer.run({ actor, party: 'partner' }, { bookingIds: [id], resourceIds: [resourceId] }, async (w) => {
      const before = await w.booking(id);
      if (!SHOWN.includes(before.state)) throw new NotFoundError('slot');
      if (before.version !== version) throw slotChanged(before);
      const current = await Resource.query(w.trx).findById(before.resourceId);
      const person = await findVisible(Resource, actor, resourceId, w.trx, 'person');
      if (person.category !== 'person' || String(person.firmId) !== actor.firmId || person.kind !== current?.kind) {
        throw new UnprocessableError(`Choose one of your own people who does ${current?.kind ?? 'this'} work.`, {
          code: 'wrong-person',
        });
      }
      if (String(person.id) === String(before.resourceId)) return;
      // The engine checks the person like any booking: free then, working then, not in two places.
      await w.apply({ action: 'assign', bookingId: id, resourceId: String(person.id) });
    });
    const slot = (await this.list(actor, new Date(0))).find((s) => s.id === String(id));
    if (!slot) throw new NotFoundError('slot');
    return slot;
  }
}

/**
 * The time away of each slot's own person that falls in the slot, in words: the person marked away
 * (their own absence), or the whole firm closed (on any of its calendars). The partner's own records,
 * read for its own slots.
 */
async function awayDuring(
  knex: Knex,
  slots: { bookingId: string; resourceId: string; resourceName: string; startsAt: Date; endsAt: Date }[],
): Promise<Map<string, string>> {
  const out = new Map<string, string>();
  if (slots.length === 0) return out;
  const { rows } = (await knex.raw(
    `SELECT r.id AS resource_id, e.resource_id AS own, e.starts_at, e.ends_at, e.reason
       FROM resources r
       JOIN calendar_exceptions e
         ON e.resource_id = r.id OR e.calendar_id IN (SELECT c.id FROM calendars c WHERE c.firm_id = r.firm_id)
      WHERE r.id = ANY(?::bigint[]) AND e.ends_at > ? AND e.starts_at < ?
      ORDER BY e.starts_at`,
    [
      slots.map((s) => s.resourceId),
      new Date(Math.min(...slots.map((s) => s.startsAt.getTime()))),
      new Date(Math.max(...slots.map((s) => s.endsAt.getTime()))),
    ],
  )) as { rows: { resource_id: string; own: string | null; starts_at: Date; ends_at: Date; reason: string }[] };
  for (const s of slots) {
    const hit = rows.find(
      (e) => String(e.resource_id) === s.resourceId && e.starts_at < s.endsAt && e.ends_at > s.startsAt,
    );
    if (hit)
      out.set(
        s.bookingId,
        hit.own !== null
          ? `${s.resourceName} is marked away then (${hit.reason})`
          : `Your firm is closed then (${hit.reason})`,
      );
  }
  return out;
}
