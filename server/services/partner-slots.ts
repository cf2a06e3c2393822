import type { Knex } from 'knex';
import type { PartnerSlot } from '../../shared/schemas/answers.ts';
import { Booking, Resource } from '../models/index.ts';
import { NotFoundError, UnprocessableError } from '../errors.ts';
import { cautionsFor } from '../mail/cautions.ts';
import type { Actor } from './actor.ts';
import { findVisible, scoped } from './scope.ts';
import { recordChange } from './audit.ts';
import { latestAnswers } from './answer-views.ts';
import { queueBookingMessage } from './outbox.ts';

/** States a partner sees: a pencilled booking is the installer's private plan until it is sent. */
const SHOWN = ['sent', 'confirmed', 'on_site'];

type SlotRow = Booking & {
  stageName: string; stageKind: string; resourceName: string; resourceKind: string; siteAddress: string; siteTown: string;
  sitePostcode: string; accessNotes: string | null; installerName: string; installerPhone: string | null; timeZone: string;
};

/**
 * A partner firm's own view: upcoming slots of its resources for every installer it works with.
 * Only what the day needs: the site, access notes, the stage, the times and who to call. The
 * householder's name, phone and e-mail and every price stay with the installer.
 */
export class PartnerSlotsService {
  constructor(private readonly knex: Knex) {}

  async list(actor: Actor, from: Date): Promise<PartnerSlot[]> {
    const rows = await scoped(Booking, actor)
      .join('stages as s', 's.id', 'bookings.stage_id').join('jobs as j', 'j.id', 's.job_id')
      .join('firms as i', 'i.id', 'j.firm_id').join('resources as r', 'r.id', 'bookings.resource_id')
      .whereIn('bookings.state', SHOWN).where('bookings.ends_at', '>', from)
      .orderBy('bookings.starts_at').limit(500)
      .select('bookings.id', 'bookings.version', 'bookings.state', 'bookings.starts_at', 'bookings.ends_at', 'bookings.resource_id',
        's.name as stage_name', 's.kind as stage_kind', 'r.name as resource_name', 'r.kind as resource_kind',
        'j.site_address', 'j.site_town', 'j.site_postcode', 'j.access_notes',
        'i.name as installer_name', 'i.phone as installer_phone', 'i.time_zone') as SlotRow[];
    const answers = await latestAnswers(this.knex, rows.map((r) => String(r.id)));
    return rows.map((r) => ({
      id: String(r.id), version: r.version, state: r.state, startsAt: r.startsAt.toISOString(), endsAt: r.endsAt.toISOString(), timeZone: r.timeZone,
      stage: { name: r.stageName, kind: r.stageKind },
      resource: { id: String(r.resourceId), name: r.resourceName, kind: r.resourceKind },
      site: { address: r.siteAddress, town: r.siteTown, postcode: r.sitePostcode, accessNotes: r.accessNotes },
      installer: { name: r.installerName, phone: r.installerPhone },
      cautions: cautionsFor(r.stageKind),
      answer: answers.get(String(r.id)) ?? null,
    }));
  }

  /**
   * Puts one of the partner's own people on a slot (same kind of work). The booking's version moves
   * on; a slot still awaiting an answer gets a fresh request so the links in hand stay good.
   */
  async assignPerson(actor: Actor, id: string, resourceId: string): Promise<PartnerSlot> {
    await this.knex.transaction(async (trx) => {
      const before = await scoped(Booking, actor, trx).findById(id).forUpdate();
      if (!before || !SHOWN.includes(before.state)) throw new NotFoundError('slot');
      const current = await Resource.query(trx).findById(before.resourceId);
      const person = await findVisible(Resource, actor, resourceId, trx, 'person');
      if (person.category !== 'person' || String(person.firmId) !== actor.firmId || person.kind !== current?.kind) {
        throw new UnprocessableError(`Choose one of your own people who does ${current?.kind ?? 'this'} work.`, { code: 'wrong-person' });
      }
      if (String(person.id) === String(before.resourceId)) return;
      const after = await Booking.query(trx).patchAndFetchById(id, { resourceId: person.id, version: before.version + 1, updatedAt: new Date() } as Partial<Booking>);
      if (after.state === 'sent') await queueBookingMessage(trx, { bookingId: id, kind: 'update', version: after.version });
      const installer = await trx('stages as s').join('jobs as j', 'j.id', 's.job_id').where('s.id', before.stageId).first('j.firm_id');
      await recordChange(trx, actor, 'booking', id, 'update', before, after, String(installer.firmId));
    });
    const slot = (await this.list(actor, new Date(0))).find((s) => s.id === String(id));
    if (!slot) throw new NotFoundError('slot');
    return slot;
  }
}
