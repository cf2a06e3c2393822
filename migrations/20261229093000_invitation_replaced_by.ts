import type { Knex } from 'knex';

/**
 * An invitation withdrawn because the same address was invited again points at the one that
 * replaced it, so the list can say "sent again" rather than leave it looking withdrawn by hand.
 */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.alterTable('invitations', (t) => {
    t.bigInteger('replaced_by').references('invitations.id').onDelete('SET NULL');
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.alterTable('invitations', (t) => {
    t.dropColumn('replaced_by');
  });
}
