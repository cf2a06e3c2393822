import type { Knex } from 'knex';

/** Hire periods get an optimistic version and a last-changed time: the manager edits them. */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.alterTable('hire_periods', (t) => {
    t.integer('version').notNullable().defaultTo(1);
    t.timestamp('updated_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.alterTable('hire_periods', (t) => {
    t.dropColumn('updated_at');
    t.dropColumn('version');
  });
}
