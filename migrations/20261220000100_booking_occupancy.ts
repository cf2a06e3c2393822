import type { Knex } from 'knex';

/**
 * A resource is held by a confirmed booking and by one whose people are on site: no two of those
 * may overlap, whichever request gets there first (PostgreSQL refuses the second, SQLSTATE 23P01).
 * Pencilled and sent bookings are kept apart by the write path's locks instead.
 */
export async function up(knex: Knex): Promise<void> {
  // Data from before the rule may hold two on-site bookings (or one on site, one confirmed) of one
  // resource at once. The later of each pair goes back to pencilled, with an audit row saying why,
  // so the office sees it and nothing is lost.
  for (;;) {
    const { rows } = (await knex.raw(`SELECT DISTINCT ON (b.id) b.id, b.state, b.version, j.firm_id FROM bookings b
      JOIN bookings a ON a.resource_id = b.resource_id AND a.id < b.id AND a.state IN ('confirmed', 'on_site')
        AND tstzrange(a.starts_at, a.ends_at) && tstzrange(b.starts_at, b.ends_at)
      JOIN stages s ON s.id = b.stage_id JOIN jobs j ON j.id = s.job_id
      WHERE b.state IN ('confirmed', 'on_site') ORDER BY b.id LIMIT 1`)) as {
      rows: { id: string; state: string; version: number; firm_id: string }[];
    };
    if (rows.length === 0) break;
    for (const r of rows) {
      await knex('bookings')
        .where('id', r.id)
        .update({ state: 'pencilled', version: r.version + 1, updated_at: knex.fn.now() });
      await knex('audit_log').insert({
        firm_id: r.firm_id,
        actor_user_id: null,
        entity: 'booking',
        entity_id: r.id,
        action: 'update',
        before: JSON.stringify({ state: r.state, version: r.version }),
        after: JSON.stringify({
          state: 'pencilled',
          version: r.version + 1,
          reason: 'overlapped another confirmed or on-site booking of the same resource',
        }),
      });
    }
  }
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
