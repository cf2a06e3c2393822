import type { Knex } from 'knex';

/**
 * A partner may say why it declines a request or proposes another time (its own words, shown only
 * to the installer whose booking it is), and the survey records where the consumer unit is (the
 * electrician plans the cable run from it). Both are optional, so older rows keep their meaning;
 * the API checks the lengths (500 and 120 characters) and refuses control characters.
 */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.alterTable('booking_answers', (t) => {
    t.text('reason');
  });
  await knex.schema.alterTable('surveys', (t) => {
    t.text('consumer_unit_location');
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.alterTable('surveys', (t) => {
    t.dropColumn('consumer_unit_location');
  });
  await knex.schema.alterTable('booking_answers', (t) => {
    t.dropColumn('reason');
  });
}
