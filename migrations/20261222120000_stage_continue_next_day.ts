import type { Knex } from 'knex';

/**
 * Whether a stage no longer than a working day may run over into the next working day (digging,
 * block laying) or must be done within one (a pour, a lift, an electrician's visit). Copied from
 * the firm's template when a job is planned; false for stages planned before, so the engine keeps
 * them within one working day.
 */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.alterTable('stages', (t) => {
    t.boolean('may_continue_next_day').notNullable().defaultTo(false);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.alterTable('stages', (t) => {
    t.dropColumn('may_continue_next_day');
  });
}
