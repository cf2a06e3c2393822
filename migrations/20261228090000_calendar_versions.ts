import type { Knex } from 'knex';

/**
 * A working calendar's version: the firm page sends the one it loaded, so two people changing the
 * hours at once never overwrite each other unseen (the second is told and shown the first's).
 */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.alterTable('calendars', (t) => {
    t.integer('version').notNullable().defaultTo(1);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.alterTable('calendars', (t) => {
    t.dropColumn('version');
  });
}
