import type { Knex } from 'knex';

/**
 * The handover with the householder (what was shown, their signature, the pack e-mailed to them),
 * the firm's service plan, and service jobs: a job is an install or a service visit, and a service
 * visit points at the install it follows, due on a date worked out from the handover.
 */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('handovers', (t) => {
    t.bigIncrements('id');
    t.bigInteger('job_id').notNullable().references('jobs.id').onDelete('CASCADE').unique();
    // {"controls": true, …}: each checklist item the crew went through with the householder.
    t.jsonb('checklist').notNullable();
    t.text('householder_name').notNullable();
    t.text('householder_email');
    // The signature (PNG) and the pack (PDF) are job files: their bytes live in object storage.
    t.bigInteger('signature_file_id').notNullable().references('job_files.id');
    t.bigInteger('pack_file_id').references('job_files.id');
    // The outbox row of the e-mailed pack (no foreign key: the outbox is emptied on its own).
    t.bigInteger('pack_outbox_id');
    t.timestamp('signed_at', { useTz: true }).notNullable();
    t.bigInteger('signed_by_user').references('users.id').onDelete('SET NULL');
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
  });

  // First visit 3 months after the handover, then every 12, two planned ahead (common practice, no source).
  await knex.schema.alterTable('firm_settings', (t) => {
    t.jsonb('service_plan')
      .notNullable()
      .defaultTo(JSON.stringify({ firstAfterMonths: 3, everyMonths: 12, visitsAhead: 2 }));
  });

  await knex.schema.alterTable('jobs', (t) => {
    t.text('kind').notNullable().defaultTo('install').checkIn(['install', 'service'], 'jobs_kind_check');
    t.bigInteger('parent_job_id').references('jobs.id').onDelete('SET NULL');
    // The day a service visit is due (the promised window lies around it).
    t.date('service_due_on');
    t.index(['parent_job_id']);
  });
  // One service job per install and due date: a handover run twice never plans a visit twice.
  await knex.raw(
    `CREATE UNIQUE INDEX jobs_service_visit_unique ON jobs (parent_job_id, service_due_on) WHERE kind = 'service'`,
  );
}

export async function down(knex: Knex): Promise<void> {
  await knex.raw('DROP INDEX IF EXISTS jobs_service_visit_unique');
  await knex.schema.alterTable('jobs', (t) => {
    t.dropIndex(['parent_job_id']);
    t.dropColumn('service_due_on');
    t.dropColumn('parent_job_id');
    t.dropColumn('kind');
  });
  await knex.schema.alterTable('firm_settings', (t) => {
    t.dropColumn('service_plan');
  });
  await knex.schema.dropTable('handovers');
}
