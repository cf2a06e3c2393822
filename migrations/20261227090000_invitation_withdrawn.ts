import type { Knex } from 'knex';

/**
 * An owner may withdraw an invitation not yet accepted (sent to the wrong address, or the person
 * is not joining after all): its link stops working, and the row stays for the record.
 */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.alterTable('invitations', (t) => {
    t.timestamp('withdrawn_at', { useTz: true });
    t.bigInteger('withdrawn_by').references('users.id').onDelete('SET NULL');
  });
  await knex.raw(
    'ALTER TABLE invitations ADD CONSTRAINT invitations_withdrawn_or_accepted_check CHECK (withdrawn_at IS NULL OR accepted_at IS NULL)',
  );
}

export async function down(knex: Knex): Promise<void> {
  await knex.raw('ALTER TABLE invitations DROP CONSTRAINT invitations_withdrawn_or_accepted_check');
  await knex.schema.alterTable('invitations', (t) => {
    t.dropColumn('withdrawn_by');
    t.dropColumn('withdrawn_at');
  });
}
