import type { Knex } from 'knex';

/**
 * The board's undo stack, kept per signed-in session so it survives a reload: each row is one
 * change a scheduler made on the board and the steps that take it back. The steps are applied
 * through the guarded write path like any change; nothing here writes bookings. A row goes with
 * its session (sign out, expiry).
 */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('booking_undo', (t) => {
    t.bigIncrements('id');
    t.string('session_id').notNullable().references('session.sid').onDelete('CASCADE');
    t.bigInteger('user_id').notNullable().references('users.id').onDelete('CASCADE');
    t.bigInteger('firm_id').notNullable().references('firms.id').onDelete('CASCADE');
    t.text('label').notNullable();
    // Ids, instants and versions only: the steps name what to put back, never who or where.
    t.jsonb('steps').notNullable();
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.index(['session_id', 'id'], 'booking_undo_session_idx');
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('booking_undo');
}
