import type { Knex } from 'knex';

/**
 * "The booking overlaps [from, to)" in the form the GiST index `bookings_during_idx` answers
 * (migration 20261224090000): `tstzrange(starts_at, ends_at) && tstzrange(from, to)`, the same rows
 * as `starts_at < to AND ends_at > from` for bookings (which always end after they start).
 * `table` is the bookings table's name or alias in the query.
 */
export function bookingDuring(
  knex: Knex | Knex.Transaction,
  table: string,
  from: Date | string | number,
  to: Date | string | number,
): Knex.Raw {
  const start = new Date(from);
  const end = new Date(to);
  if (!(end.getTime() > start.getTime())) return knex.raw('false');
  return knex.raw(`tstzrange(??, ??) && tstzrange(?::timestamptz, ?::timestamptz)`, [
    `${table}.starts_at`,
    `${table}.ends_at`,
    start.toISOString(),
    end.toISOString(),
  ]);
}
