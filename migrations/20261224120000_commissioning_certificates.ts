import type { Knex } from 'knex';

/**
 * Commissioning and the electrical certificate, the two things a job needs before it is handed over.
 *
 * - `commissioning_records`: one per job, the crew's record of the commissioning checks (pumps
 *   primed and tested, heater and lights working, no leaks), the water readings (pH, total
 *   alkalinity, the sanitiser's level and kind), notes, who recorded it and when it was complete;
 *   its photos are job files linked in `commissioning_photos` (a photo deleted from the job leaves
 *   the record with it).
 * - `firm_settings.water_targets`: the firm's own target ranges over the defaults in
 *   shared/water-balance.ts (empty: the defaults).
 * - `electrical_certificates`: one per job, the PDF the partner electrician uploaded (a job file)
 *   and which firm uploaded it; a new upload replaces the old one.
 * - `jobs.certificate_waiver_*`: why the office lets the job be handed over without it, who, when.
 */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('commissioning_records', (t) => {
    t.bigIncrements('id');
    t.bigInteger('job_id').notNullable().unique().references('jobs.id').onDelete('CASCADE');
    t.boolean('pumps_primed').notNullable().defaultTo(false);
    t.boolean('pumps_tested').notNullable().defaultTo(false);
    t.boolean('heater_working').notNullable().defaultTo(false);
    t.boolean('lights_working').notNullable().defaultTo(false);
    t.boolean('no_leaks').notNullable().defaultTo(false);
    t.decimal('ph', 4, 2);
    t.decimal('total_alkalinity_ppm', 6, 1);
    t.decimal('sanitiser_ppm', 5, 2);
    t.text('sanitiser_kind');
    t.text('notes');
    t.bigInteger('recorded_by').references('users.id').onDelete('SET NULL');
    t.integer('version').notNullable().defaultTo(1);
    t.timestamp('updated_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.timestamp('completed_at', { useTz: true });
  });
  // Unnamed checks (PostgreSQL names them *_check): the API refuses such values first, in words.
  await knex.raw(`ALTER TABLE commissioning_records
    ADD CHECK (ph BETWEEN 0 AND 14), ADD CHECK (total_alkalinity_ppm >= 0), ADD CHECK (sanitiser_ppm >= 0),
    ADD CHECK (sanitiser_kind IN ('chlorine', 'bromine'))`);

  await knex.schema.createTable('commissioning_photos', (t) => {
    t.bigInteger('job_id').notNullable().references('commissioning_records.job_id').onDelete('CASCADE');
    t.bigInteger('file_id').notNullable().references('job_files.id').onDelete('CASCADE');
    t.primary(['job_id', 'file_id']);
  });

  await knex.schema.alterTable('firm_settings', (t) => {
    t.jsonb('water_targets').notNullable().defaultTo('{}');
  });

  await knex.schema.createTable('electrical_certificates', (t) => {
    t.bigIncrements('id');
    t.bigInteger('job_id').notNullable().unique().references('jobs.id').onDelete('CASCADE');
    t.bigInteger('file_id').notNullable().references('job_files.id').onDelete('CASCADE');
    t.bigInteger('uploaded_by_firm_id').notNullable().references('firms.id').onDelete('CASCADE');
    t.bigInteger('uploaded_by').references('users.id').onDelete('SET NULL');
    t.timestamp('uploaded_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
  });

  await knex.schema.alterTable('jobs', (t) => {
    t.text('certificate_waiver_reason');
    t.bigInteger('certificate_waived_by').references('users.id').onDelete('SET NULL');
    t.timestamp('certificate_waived_at', { useTz: true });
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.alterTable('jobs', (t) => {
    t.dropColumn('certificate_waived_at');
    t.dropColumn('certificate_waived_by');
    t.dropColumn('certificate_waiver_reason');
  });
  await knex.schema.dropTable('electrical_certificates');
  await knex.schema.alterTable('firm_settings', (t) => {
    t.dropColumn('water_targets');
  });
  await knex.schema.dropTable('commissioning_photos');
  await knex.schema.dropTable('commissioning_records');
}
