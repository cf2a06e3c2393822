import type { Knex } from 'knex';

/**
 * Whether a stage is wanted as late as the stages after it allow (the unit's delivery, on the day
 * of the lift) rather than as early as possible. Copied from the firm's template when a job is
 * planned; deliveries planned before are marked too, so placing them again brings them to the lift
 * day rather than weeks ahead of it.
 */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.alterTable('stages', (t) => {
    t.boolean('just_in_time').notNullable().defaultTo(false);
  });
  await knex('stages').where('kind', 'delivery').update({ just_in_time: true });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.alterTable('stages', (t) => {
    t.dropColumn('just_in_time');
  });
}
