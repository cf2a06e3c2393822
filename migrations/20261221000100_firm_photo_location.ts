import type { Knex } from 'knex';

/**
 * A firm may keep where its photos were taken. Off by default: the stored original of every photo
 * loses its location and camera details on upload unless the firm's owner turns this on.
 */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.alterTable('firm_settings', (t) => {
    t.boolean('keep_photo_location').notNullable().defaultTo(false);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.alterTable('firm_settings', (t) => {
    t.dropColumn('keep_photo_location');
  });
}
