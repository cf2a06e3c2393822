import type { Knex } from 'knex';

/**
 * One open invitation per address and firm: inviting the same person again replaces the one still
 * open (its link stops working), and a double-click sends one e-mail, not two. Open invitations
 * already doubled are withdrawn, all but the newest, so the index can hold.
 */
export async function up(knex: Knex): Promise<void> {
  await knex.raw(`
    UPDATE invitations i SET withdrawn_at = now()
    WHERE i.accepted_at IS NULL AND i.withdrawn_at IS NULL
      AND EXISTS (
        SELECT 1 FROM invitations j
        WHERE j.firm_id = i.firm_id AND lower(j.email) = lower(i.email)
          AND j.accepted_at IS NULL AND j.withdrawn_at IS NULL AND j.id > i.id
      )`);
  await knex.raw(
    'CREATE UNIQUE INDEX invitations_one_open_per_address ON invitations (firm_id, lower(email)) WHERE accepted_at IS NULL AND withdrawn_at IS NULL',
  );
}

export async function down(knex: Knex): Promise<void> {
  await knex.raw('DROP INDEX invitations_one_open_per_address');
}
