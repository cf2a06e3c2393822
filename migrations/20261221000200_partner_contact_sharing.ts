import type { Knex } from 'knex';

/**
 * An installer may share its householders' names and phone numbers with the partner firms it
 * books (on their day sheets). Off unless the firm's owner switches it on.
 */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.alterTable('firm_settings', (t) => {
    t.boolean('share_customer_contact_with_partners').notNullable().defaultTo(false);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.alterTable('firm_settings', (t) => {
    t.dropColumn('share_customer_contact_with_partners');
  });
}
