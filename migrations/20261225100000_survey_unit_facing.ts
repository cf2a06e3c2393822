import type { Knex } from 'knex';

/**
 * Which way the unit faces (its controls and service side), settled with the householder on the
 * survey: a spa can't be turned once it is in a pit, so the crew and the crane need it before the
 * lift. Null until recorded.
 */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.alterTable('surveys', (t) => {
    t.text('unit_facing');
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.alterTable('surveys', (t) => {
    t.dropColumn('unit_facing');
  });
}
