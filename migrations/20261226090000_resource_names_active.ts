import type { Knex } from 'knex';

/**
 * A resource's name is unique among the firm's resources still on its books: one taken off keeps
 * its name on its past work, and no longer stops the firm adding (or renaming another to) the same
 * name, such as a crew made up again or an electrician who comes back.
 */
export async function up(knex: Knex): Promise<void> {
  await knex.raw('ALTER TABLE resources DROP CONSTRAINT resources_firm_id_name_unique');
  await knex.raw('CREATE UNIQUE INDEX resources_firm_id_name_active_unique ON resources (firm_id, name) WHERE active');
}

export async function down(knex: Knex): Promise<void> {
  await knex.raw('DROP INDEX resources_firm_id_name_active_unique');
  await knex.raw('ALTER TABLE resources ADD CONSTRAINT resources_firm_id_name_unique UNIQUE (firm_id, name)');
}
