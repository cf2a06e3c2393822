import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Knex } from 'knex';
import { createKnex, migrationConfig } from '../../server/db.ts';
import { testConfig } from '../helpers/server.ts';

let knex: Knex;
beforeAll(() => { knex = createKnex(testConfig().DATABASE_URL); });
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
    expect(await tables()).toEqual(expect.arrayContaining(['firms', 'users', 'memberships', 'partnerships', 'resources',
      'calendars', 'calendar_exceptions', 'crew_members', 'hire_periods', 'units', 'jobs', 'stages', 'dependencies',
      'bookings', 'lead_time_rules', 'audit_log', 'session']));
  });

  it('store every instant as timestamptz', async () => {
    const plain = await knex('information_schema.columns').where({ table_schema: 'public', data_type: 'timestamp without time zone' })
      .whereNot('table_name', 'session').select('table_name', 'column_name');
    expect(plain).toEqual([]);
  });

  it('protect held bookings (confirmed and on site) with an exclusion constraint partial on those states', async () => {
    const row = await knex.raw(`SELECT pg_get_constraintdef(oid) AS def FROM pg_constraint WHERE conname = 'bookings_no_held_overlap'`);
    expect(row.rows[0].def).toBe("EXCLUDE USING gist (resource_id WITH =, tstzrange(starts_at, ends_at) WITH &&) WHERE ((state = ANY (ARRAY['confirmed'::text, 'on_site'::text])))");
  });
});
