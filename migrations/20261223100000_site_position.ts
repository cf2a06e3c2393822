import type { Knex } from 'knex';

/**
 * Curing from the site's weather. The survey records where the site is (WGS84 latitude and
 * longitude, from the phone or typed; null when not recorded, so older surveys keep their meaning),
 * the firm may set its concrete's Nurse–Saul datum (0 °C, ASTM C1074's working default, unless it
 * knows its mix's own), and the daily mean temperatures forecast for each job's site are kept per
 * day: the refresh overwrites days still ahead, and days gone by keep what was last forecast.
 */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.alterTable('surveys', (t) => {
    t.decimal('site_latitude', 8, 5);
    t.decimal('site_longitude', 8, 5);
  });
  await knex.raw(`ALTER TABLE surveys
    ADD CONSTRAINT surveys_site_latitude_check CHECK (site_latitude IS NULL OR site_latitude BETWEEN -90 AND 90),
    ADD CONSTRAINT surveys_site_longitude_check CHECK (site_longitude IS NULL OR site_longitude BETWEEN -180 AND 180),
    ADD CONSTRAINT surveys_site_position_pair_check CHECK ((site_latitude IS NULL) = (site_longitude IS NULL))`);
  await knex.schema.alterTable('firm_settings', (t) => {
    t.decimal('cure_datum_c', 4, 1).notNullable().defaultTo(0);
  });
  await knex.raw(
    'ALTER TABLE firm_settings ADD CONSTRAINT firm_settings_cure_datum_check CHECK (cure_datum_c BETWEEN -15 AND 15)',
  );
  await knex.schema.createTable('site_forecasts', (t) => {
    t.bigInteger('job_id').notNullable().references('jobs.id').onDelete('CASCADE');
    t.date('date').notNullable();
    t.decimal('mean_c', 5, 2).notNullable();
    t.timestamp('fetched_at', { useTz: true }).notNullable();
    t.primary(['job_id', 'date']);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('site_forecasts');
  await knex.raw('ALTER TABLE firm_settings DROP CONSTRAINT firm_settings_cure_datum_check');
  await knex.schema.alterTable('firm_settings', (t) => {
    t.dropColumn('cure_datum_c');
  });
  await knex.raw(`ALTER TABLE surveys DROP CONSTRAINT surveys_site_position_pair_check,
    DROP CONSTRAINT surveys_site_longitude_check, DROP CONSTRAINT surveys_site_latitude_check`);
  await knex.schema.alterTable('surveys', (t) => {
    t.dropColumn('site_longitude');
    t.dropColumn('site_latitude');
  });
}
