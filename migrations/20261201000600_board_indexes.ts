import type { Knex } from 'knex';

/** Indexes the board's range and dependency look-ups use. */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.alterTable('bookings', (t) => {
    t.index(['starts_at'], 'bookings_starts_at_idx');
  });
  await knex.schema.alterTable('dependencies', (t) => {
    t.index(['to_stage_id'], 'dependencies_to_stage_idx');
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.alterTable('dependencies', (t) => {
    t.dropIndex(['to_stage_id'], 'dependencies_to_stage_idx');
  });
  await knex.schema.alterTable('bookings', (t) => {
    t.dropIndex(['starts_at'], 'bookings_starts_at_idx');
  });
}
