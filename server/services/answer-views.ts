import type { Knex } from 'knex';
import type { BookingView } from '../../shared/schemas/bookings.ts';
import type { BookingAnswerFields, BookingAnswerView } from '../../shared/schemas/answers.ts';
import type { AnswerAction } from './links.ts';
import { SITE_CONTACT_STATES } from './read-policy.ts';
import { endOfLocalDay, localDateOf, startOfLocalDay } from '../../shared/local-dates.ts';
import { slotSupply, type SlotSupply } from '../../shared/slot-supply.ts';

export type BookingWithAnswer = BookingView & BookingAnswerFields;

export interface AnswerRow {
  id: string;
  bookingId: string;
  bookingVersion: number;
  action: AnswerAction;
  via: 'link' | 'app';
  createdAt: Date;
  proposedStartsAt: Date | null;
  proposedEndsAt: Date | null;
  proposalStatus: 'open' | 'accepted' | 'refused' | null;
  reason: string | null;
}

const toAnswerView = (a: AnswerRow): BookingAnswerView => ({
  id: String(a.id),
  action: a.action,
  version: a.bookingVersion,
  via: a.via,
  at: a.createdAt.toISOString(),
  proposedStart: a.proposedStartsAt?.toISOString() ?? null,
  proposedEnd: a.proposedEndsAt?.toISOString() ?? null,
  proposalStatus: a.proposalStatus,
  reason: a.reason ?? null,
});

/** The latest answer of each booking, by booking id. */
export async function latestAnswers(
  knex: Knex | Knex.Transaction,
  bookingIds: string[],
): Promise<Map<string, BookingAnswerView>> {
  if (bookingIds.length === 0) return new Map();
  const rows = (await knex('booking_answers')
    .whereIn('booking_id', bookingIds)
    .distinctOn('booking_id')
    .orderBy([
      { column: 'booking_id' },
      { column: 'created_at', order: 'desc' },
      { column: 'id', order: 'desc' },
    ])) as AnswerRow[];
  return new Map(rows.map((r) => [String(r.bookingId), toAnswerView(r)]));
}

/**
 * Adds the board's answer fields to booking views: the latest answer or proposal, and `overdue`
 * when the request for the current version is still unanswered after the reminder scan flagged it.
 */
export async function withAnswers<T extends Pick<BookingView, 'id' | 'version' | 'state'>>(
  knex: Knex | Knex.Transaction,
  views: T[],
): Promise<(T & BookingAnswerFields)[]> {
  const ids = views.map((v) => v.id);
  const answers = await latestAnswers(knex, ids);
  const flagged = ids.length
    ? ((await knex('booking_requests')
        .whereIn('booking_id', ids)
        .whereNotNull('overdue_at')
        .select('booking_id', 'booking_version')) as { bookingId: string; bookingVersion: number }[])
    : [];
  const overdue = new Set(flagged.map((r) => `${r.bookingId}.${r.bookingVersion}`));
  return views.map((v) => {
    const answer = answers.get(v.id) ?? null;
    const answered = answer !== null && answer.version === v.version;
    return { ...v, answer, overdue: v.state === 'sent' && !answered && overdue.has(`${v.id}.${v.version}`) };
  });
}

/** A partner slot as the site-contact and supply look-ups need it. */
export interface SlotKey {
  bookingId: string;
  jobId: string;
  startsAt: Date;
  endsAt: Date;
  timeZone: string;
}

/**
 * The installer's own crew (or, failing a crew, one of its people) on each slot's job on the slot's
 * first local day: the person the partner meets on site. A crew without its own phone gives the
 * first of its members' phones. Null where the installer has nobody on the job that day.
 */
export async function siteContacts(
  knex: Knex | Knex.Transaction,
  slots: readonly SlotKey[],
): Promise<Map<string, { name: string; phone: string | null }>> {
  const out = new Map<string, { name: string; phone: string | null }>();
  if (slots.length === 0) return out;
  const rows = (await knex('bookings as b')
    .join('stages as s', 's.id', 'b.stage_id')
    .join('jobs as j', 'j.id', 's.job_id')
    .join('resources as r', 'r.id', 'b.resource_id')
    .whereIn('s.job_id', [...new Set(slots.map((s) => s.jobId))])
    .whereRaw('r.firm_id = j.firm_id')
    .whereIn('r.category', ['crew', 'person'])
    .whereIn('b.state', SITE_CONTACT_STATES)
    .orderByRaw("CASE r.category WHEN 'crew' THEN 0 ELSE 1 END")
    .orderBy('b.starts_at')
    .orderBy('b.id')
    .select(
      's.job_id',
      'b.starts_at',
      'b.ends_at',
      'r.name',
      knex.raw(`COALESCE(r.phone, (SELECT p.phone FROM crew_members cm JOIN resources p ON p.id = cm.person_id
        WHERE cm.crew_id = r.id AND p.phone IS NOT NULL ORDER BY p.name LIMIT 1)) AS phone`),
    )) as { jobId: string; startsAt: Date; endsAt: Date; name: string; phone: string | null }[];
  for (const slot of slots) {
    const day = localDateOf(slot.startsAt, slot.timeZone);
    const [from, to] = [startOfLocalDay(day, slot.timeZone), endOfLocalDay(day, slot.timeZone)];
    const hit = rows.find(
      (r) => String(r.jobId) === String(slot.jobId) && r.startsAt.getTime() < to && r.endsAt.getTime() > from,
    );
    if (hit) out.set(slot.bookingId, { name: hit.name, phone: hit.phone });
  }
  return out;
}

/** Each job's supply facts: the unit's supplies and the survey's supply fields (shared/slot-supply.ts). */
export async function jobSupplies(
  knex: Knex | Knex.Transaction,
  jobIds: readonly string[],
): Promise<Map<string, SlotSupply>> {
  if (jobIds.length === 0) return new Map();
  const rows = (await knex('jobs as j')
    .leftJoin('units as u', 'u.id', 'j.unit_id')
    .leftJoin('surveys as v', 'v.job_id', 'j.id')
    .whereIn('j.id', [...new Set(jobIds)])
    .select(
      'j.id',
      'u.supplies',
      'v.job_id as surveyed',
      'v.main_fuse_amps',
      'v.earthing_arrangement',
      'v.consumer_unit_distance_m',
      'v.consumer_unit_location',
    )) as {
    id: string;
    supplies: { amps: number }[] | null;
    surveyed: string | null;
    mainFuseAmps: number | null;
    earthingArrangement: string | null;
    consumerUnitDistanceM: string | null;
    consumerUnitLocation: string | null;
  }[];
  return new Map(rows.map((r) => [String(r.id), slotSupply(r.supplies, r.surveyed === null ? null : r)]));
}
