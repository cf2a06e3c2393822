import type { Knex } from 'knex';

/** When a booking's crew were marked on site and done, as the audit log keeps it (ISO 8601). */
export interface ProgressTimes {
  arrivedAt: string | null;
  doneAt: string | null;
}

/**
 * The times the latest "on site" and "done" of each booking were marked (a step kept on a phone
 * without a signal by the time it was marked there), for bookings the caller has already read
 * through the read policy: this adds a fact of each, never another booking.
 *
 * @example
 * (await progressTimes(knex, ['41'])).get('41') // { arrivedAt: '2026-06-01T08:30:00.000Z', doneAt: null }
 */
export async function progressTimes(knex: Knex, bookingIds: readonly string[]): Promise<Map<string, ProgressTimes>> {
  const out = new Map<string, ProgressTimes>();
  if (bookingIds.length === 0) return out;
  // The latest row of each step per booking (audit_log is indexed on entity, entity_id).
  const rows = (await knex('audit_log')
    .select(
      knex.raw(
        `distinct on (entity_id, after->>'action') entity_id::text as booking_id, after->>'action' as step, after->>'markedAt' as marked_at`,
      ),
    )
    .where('entity', 'booking')
    .whereIn('entity_id', [...bookingIds])
    .whereRaw(`after->>'action' in ('arrive', 'finish') and after \\? 'markedAt'`)
    .orderByRaw(`entity_id, after->>'action', id desc`)) as {
    bookingId: string;
    step: 'arrive' | 'finish';
    markedAt: string;
  }[];
  for (const r of rows) {
    const id = r.bookingId;
    const times = out.get(id) ?? { arrivedAt: null, doneAt: null };
    if (r.step === 'arrive') times.arrivedAt = new Date(r.markedAt).toISOString();
    else times.doneAt = new Date(r.markedAt).toISOString();
    out.set(id, times);
  }
  return out;
}
