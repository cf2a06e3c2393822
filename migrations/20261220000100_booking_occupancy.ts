import type { Knex } from 'knex';

/**
 * A resource is held by a confirmed booking and by one whose people are on site: no two of those
 * may overlap, whichever request gets there first (PostgreSQL refuses the second, SQLSTATE 23P01).
 * Pencilled and sent bookings are kept apart by the write path's locks instead.
 */
export async function up(knex: Knex): Promise<void> {
  await knex.raw('ALTER TABLE bookings DROP CONSTRAINT bookings_no_confirmed_overlap');
  await knex.raw(`ALTER TABLE bookings ADD CONSTRAINT bookings_no_held_overlap
    EXCLUDE USING gist (resource_id WITH =, tstzrange(starts_at, ends_at) WITH &&)
    WHERE (state IN ('confirmed', 'on_site'))`);
}

export async function down(knex: Knex): Promise<void> {
  await knex.raw('ALTER TABLE bookings DROP CONSTRAINT bookings_no_held_overlap');
  await knex.raw(`ALTER TABLE bookings ADD CONSTRAINT bookings_no_confirmed_overlap
    EXCLUDE USING gist (resource_id WITH =, tstzrange(starts_at, ends_at) WITH &&)
    WHERE (state = 'confirmed')`);
}
