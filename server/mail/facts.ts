import type { Knex } from 'knex';
import { supplyLines, type SlotSupply } from '../../shared/slot-supply.ts';
import { describeWindow } from '../../shared/slot-window.ts';
import { jobSupplies, siteContacts } from '../services/answer-views.ts';
import { partnerSlotFacts, type VisitContact } from '../services/read-policy.ts';

/**
 * Everything an e-mail about one booking says, read fresh when it is sent (the outbox row holds ids
 * only). The worker acts for no user: these reads are the system's, not scoped to an actor.
 */
export interface BookingFacts {
  booking: { id: string; version: number; state: string; startsAt: Date; endsAt: Date };
  /** No notes: a stage's notes are the office's planning notes, never sent to a partner. */
  stage: { id: string; kind: string; name: string };
  job: {
    id: string;
    reference: string;
    siteAddress: string;
    siteTown: string;
    sitePostcode: string;
    accessNotes: string | null;
    customerName: string;
    customerEmail: string | null;
  };
  unit: { model: string; lengthMm: number; widthMm: number; heightMm: number; dryWeightKg: number } | null;
  installer: { id: string; name: string; phone: string | null; email: string | null; timeZone: string };
  resource: { id: string; name: string; kind: string; firmId: string };
  partner: { id: string; name: string; email: string | null };
  /** The partner firm's booking address and its coordinators (members with the partner role). */
  recipients: string[];
  /**
   * What the partner may read beyond the site and times, as the read policy gives it
   * (services/read-policy.ts `partnerSlotFacts`): whom to call on the day, and the house's
   * supply for electrical work only. Partner-facing outputs read contacts and supply from here.
   */
  forPartner: { contacts: VisitContact[]; supply: SlotSupply | null; facing: string | null };
}

/** The booking as the audit log kept it when it was deleted. */
export interface BookingSnapshot {
  id: string;
  version: number;
  state: string;
  startsAt: string;
  endsAt: string;
  resourceId: string;
  stageId: string;
}

/** The joined columns every fact set starts from (a booking, or a deleted one's snapshot, with its stage). */
const FACT_COLUMNS = [
  's.id as stage_id',
  's.kind as stage_kind',
  's.name as stage_name',
  'j.id as job_id',
  'j.reference',
  'j.site_address',
  'j.site_town',
  'j.site_postcode',
  'j.access_notes',
  'j.installation_type',
  'sv.unit_facing',
  'j.customer_name',
  'j.customer_email',
  'j.customer_phone',
  'u.model as unit_model',
  'u.length_mm',
  'u.width_mm',
  'u.height_mm',
  'u.dry_weight_kg',
  'i.id as installer_id',
  'i.name as installer_name',
  'i.phone as installer_phone',
  'i.email as installer_email',
  'i.time_zone',
];

// eslint-disable-next-line @typescript-eslint/no-explicit-any -- rows straight from the joined query
type FactRow = Record<string, any>;

function withJobAndInstaller(knex: Knex, base: Knex.QueryBuilder): Knex.QueryBuilder {
  return base
    .join('jobs as j', 'j.id', 's.job_id')
    .join('firms as i', 'i.id', 'j.firm_id')
    .leftJoin('units as u', 'u.id', 'j.unit_id')
    .leftJoin('surveys as sv', 'sv.job_id', 'j.id')
    .select(
      ...FACT_COLUMNS,
      knex.raw(
        '(SELECT fs.share_customer_contact_with_partners FROM firm_settings fs WHERE fs.firm_id = j.firm_id) AS shares_customer_contact',
      ),
    );
}

export async function loadBookingFacts(
  knex: Knex,
  bookingId: string,
  resourceId?: string,
  snapshot?: BookingSnapshot,
): Promise<BookingFacts | null> {
  const live = await knex('bookings').where('id', bookingId).first('id');
  if (live) return (await loadBookingFactsMany(knex, [bookingId], resourceId)).get(String(bookingId)) ?? null;
  if (!snapshot) return null;
  const rows = await withJobAndInstaller(
    knex,
    knex('stages as s')
      .where('s.id', snapshot.stageId)
      .select(
        knex.raw(
          '?::bigint as id, ?::int as version, ?::text as state, ?::timestamptz as starts_at, ?::timestamptz as ends_at, ?::bigint as resource_id',
          [snapshot.id, snapshot.version, snapshot.state, snapshot.startsAt, snapshot.endsAt, snapshot.resourceId],
        ),
      ),
  );
  return (await factsOf(knex, rows.slice(0, 1), resourceId)).get(String(snapshot.id)) ?? null;
}

/**
 * The facts of many live bookings in a fixed number of queries, whatever their number (the calendar
 * feed reads up to a thousand); the same facts loadBookingFacts gives one by one. Bookings gone are left out.
 */
export async function loadBookingFactsMany(
  knex: Knex,
  bookingIds: readonly string[],
  resourceId?: string,
): Promise<Map<string, BookingFacts>> {
  if (bookingIds.length === 0) return new Map();
  const rows = await withJobAndInstaller(
    knex,
    knex('bookings as b')
      .join('stages as s', 's.id', 'b.stage_id')
      .whereIn('b.id', [...new Set(bookingIds.map(String))])
      .select('b.id', 'b.version', 'b.state', 'b.starts_at', 'b.ends_at', 'b.resource_id'),
  );
  return factsOf(knex, rows, resourceId);
}

/** Resources, partner recipients, site contacts and supplies for every row at once. */
async function factsOf(knex: Knex, rows: FactRow[], resourceId?: string): Promise<Map<string, BookingFacts>> {
  const out = new Map<string, BookingFacts>();
  if (rows.length === 0) return out;
  // A cancellation goes to the resource the booking was on, which may no longer be its resource.
  const resourceOf = (row: FactRow) => String(resourceId ?? row.resourceId);
  const resources = new Map(
    (
      (await knex('resources as r')
        .join('firms as f', 'f.id', 'r.firm_id')
        .whereIn('r.id', [...new Set(rows.map(resourceOf))])
        .select('r.id', 'r.name', 'r.kind', 'r.firm_id', 'f.name as firm_name', 'f.email as firm_email')) as FactRow[]
    ).map((r) => [String(r.id), r]),
  );
  const firmIds = [...new Set([...resources.values()].map((r) => String(r.firmId)))];
  const coordinatorRows: { firmId: string; email: string }[] = firmIds.length
    ? await knex('memberships as m')
        .join('users as u', 'u.id', 'm.user_id')
        .whereIn('m.firm_id', firmIds)
        .where('m.role', 'partner')
        .orderBy('u.email')
        .select('m.firm_id', 'u.email')
    : [];
  const slots = rows.map((row) => ({
    bookingId: String(row.id),
    jobId: String(row.jobId),
    startsAt: row.startsAt as Date,
    endsAt: row.endsAt as Date,
    timeZone: String(row.timeZone),
  }));
  const [contacts, supplies] = await Promise.all([
    siteContacts(knex, slots),
    jobSupplies(
      knex,
      slots.map((s) => s.jobId),
    ),
  ]);
  for (const [n, row] of rows.entries()) {
    const resource = resources.get(resourceOf(row));
    if (!resource) continue;
    const coordinators = coordinatorRows
      .filter((c) => String(c.firmId) === String(resource.firmId))
      .map((c) => c.email);
    const recipients = [
      ...new Set(
        [resource.firmEmail, ...coordinators].filter((e): e is string => Boolean(e)).map((e) => e.toLowerCase()),
      ),
    ];
    const slot = slots[n]!;
    const forPartner = partnerSlotFacts({
      resourceKind: resource.kind,
      customerName: row.customerName,
      customerPhone: row.customerPhone,
      officeName: row.installerName,
      officePhone: row.installerPhone,
      sharesCustomerContact: row.sharesCustomerContact === true,
      siteContact: contacts.get(slot.bookingId) ?? null,
      supply: supplies.get(slot.jobId)!,
      stageKind: row.stageKind,
      installationType: row.installationType,
      unitFacing: row.unitFacing ?? null,
    });
    out.set(slot.bookingId, {
      booking: {
        id: String(row.id),
        version: row.version,
        state: row.state,
        startsAt: row.startsAt,
        endsAt: row.endsAt,
      },
      stage: { id: String(row.stageId), kind: row.stageKind, name: row.stageName },
      job: {
        id: String(row.jobId),
        reference: row.reference,
        siteAddress: row.siteAddress,
        siteTown: row.siteTown,
        sitePostcode: row.sitePostcode,
        accessNotes: row.accessNotes,
        customerName: row.customerName,
        customerEmail: row.customerEmail,
      },
      unit: row.unitModel
        ? {
            model: row.unitModel,
            lengthMm: row.lengthMm,
            widthMm: row.widthMm,
            heightMm: row.heightMm,
            dryWeightKg: row.dryWeightKg,
          }
        : null,
      installer: {
        id: String(row.installerId),
        name: row.installerName,
        phone: row.installerPhone,
        email: row.installerEmail,
        timeZone: row.timeZone,
      },
      resource: { id: String(resource.id), name: resource.name, kind: resource.kind, firmId: String(resource.firmId) },
      partner: { id: String(resource.firmId), name: resource.firmName, email: resource.firmEmail },
      recipients,
      forPartner,
    });
  }
  return out;
}

/** "Role, name: phone" for each contact the read policy gives the partner. */
export function contactLines(contacts: BookingFacts['forPartner']['contacts']): string[] {
  return contacts.map((c) => `${c.role}, ${c.name}: ${c.phone ?? 'no phone recorded'}`);
}

/**
 * The slot as a partner needs it: when, what, the unit, the house's supply (electrical work only),
 * the site and whom to call, from the read policy's `forPartner`. Only structured facts: no stage
 * notes or other office text. The request e-mails and the person's calendar feed both say it.
 */
export function slotSections(f: BookingFacts): { heading: string; lines: string[] }[] {
  const when = describeWindow(f.booking.startsAt, f.booking.endsAt, f.installer.timeZone);
  const unit = f.unit
    ? [
        `Unit: ${f.unit.model}, ${f.unit.lengthMm} × ${f.unit.widthMm} × ${f.unit.heightMm} mm, ${f.unit.dryWeightKg} kg dry`,
      ]
    : [];
  const facing = f.forPartner.facing;
  const supply = f.forPartner.supply;
  return [
    { heading: 'When', lines: [when.date, `${when.window} (${when.zone})`] },
    {
      heading: 'Work',
      lines: [
        `${f.stage.name} for job ${f.job.reference}`,
        `Booked: ${f.resource.name}`,
        ...unit,
        ...(facing ? [facing] : []),
      ],
    },
    ...(supply ? [{ heading: 'Electrical supply', lines: supplyLines(supply) }] : []),
    {
      heading: 'Site',
      lines: [
        f.job.siteAddress,
        `${f.job.siteTown} ${f.job.sitePostcode}`,
        `Access and parking: ${f.job.accessNotes ?? 'ask the installer before you travel'}`,
      ],
    },
    { heading: 'On the day, call', lines: contactLines(f.forPartner.contacts) },
  ];
}
