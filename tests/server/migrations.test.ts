import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Knex } from 'knex';
import { createKnex, migrationConfig } from '../../server/db.ts';
import { TEST_TODAY, testConfig } from '../helpers/server.ts';
import { emptySeededTables, seedDemo } from '../../seeds/demo.ts';

let knex: Knex;
beforeAll(() => {
  knex = createKnex(testConfig().DATABASE_URL);
});
afterAll(async () => {
  await knex.migrate.latest(migrationConfig);
  await knex.destroy();
});

const tables = async () => (await knex('pg_tables').where('schemaname', 'public').pluck('tablename')).sort();

describe('migrations', () => {
  it('go all the way down and up again', async () => {
    await knex.migrate.latest(migrationConfig);
    await knex.migrate.rollback(migrationConfig, true);
    expect((await tables()).filter((t) => !t.startsWith('knex_'))).toEqual([]);

    await knex.migrate.latest(migrationConfig);
    expect(await tables()).toEqual(
      expect.arrayContaining([
        'firms',
        'users',
        'memberships',
        'partnerships',
        'resources',
        'calendars',
        'calendar_exceptions',
        'crew_members',
        'hire_periods',
        'units',
        'jobs',
        'stages',
        'dependencies',
        'bookings',
        'lead_time_rules',
        'audit_log',
        'session',
      ]),
    );
  });

  it('store every instant as timestamptz', async () => {
    const plain = await knex('information_schema.columns')
      .where({ table_schema: 'public', data_type: 'timestamp without time zone' })
      .whereNot('table_name', 'session')
      .select('table_name', 'column_name');
    expect(plain).toEqual([]);
  });

  it('protect held bookings (confirmed and on site) with an exclusion constraint partial on those states', async () => {
    const row = await knex.raw(
      `SELECT pg_get_constraintdef(oid) AS def FROM pg_constraint WHERE conname = 'bookings_no_held_overlap'`,
    );
    expect(row.rows[0].def).toBe(
      "EXCLUDE USING gist (resource_id WITH =, tstzrange(starts_at, ends_at) WITH &&) WHERE ((state = ANY (ARRAY['confirmed'::text, 'on_site'::text])))",
    );
  });

  it('keep older data that held one resource twice: the later booking goes back to pencilled, with an audit row saying why', async () => {
    await knex.migrate.latest(migrationConfig);
    await emptySeededTables(knex);
    // The demo is planned with today's board loader, so it is seeded on today's schema and the
    // migrations are then taken back to before the rule, data and all.
    await seedDemo(knex, { today: TEST_TODAY });
    while (String(await knex.migrate.currentVersion(migrationConfig)) >= '20261220000100')
      await knex.migrate.down(migrationConfig);
    const crew = String((await knex('resources').where('name', 'Crew Otter').first('id')).id);
    const stages = await knex('stages')
      .whereNotExists(knex('bookings').whereRaw('bookings.stage_id = stages.id'))
      .limit(2)
      .pluck('id');
    const [first, second] = await knex('bookings')
      .insert(
        stages.map((stageId, n) => ({
          stage_id: stageId,
          resource_id: crew,
          state: n === 0 ? 'on_site' : 'confirmed',
          starts_at: '2027-04-06T08:00:00Z',
          ends_at: n === 0 ? '2027-04-06T12:00:00Z' : '2027-04-06T11:00:00Z',
        })),
      )
      .returning('id');
    await knex.migrate.latest(migrationConfig);
    expect(await knex('bookings').where('id', first.id).first('state')).toEqual({ state: 'on_site' });
    expect(await knex('bookings').where('id', second.id).first('state', 'version')).toEqual({
      state: 'pencilled',
      version: 2,
    });
    const audit = await knex('audit_log').where({ entity: 'booking', entity_id: second.id }).first('before', 'after');
    expect(audit).toEqual({
      before: { state: 'confirmed', version: 1 },
      after: {
        state: 'pencilled',
        version: 2,
        reason: 'overlapped another confirmed or on-site booking of the same resource',
      },
    });
  });
});
