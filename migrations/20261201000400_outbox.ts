import type { Knex } from 'knex';

/**
 * Partner confirmations: the outbox of e-mails (written in the same transaction as the change that
 * causes them), the requests sent for each booking version, the partners' answers, single-use link
 * tokens and refused link attempts, per-person calendar feeds and invitations.
 */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('outbox', (t) => {
    t.bigIncrements('id');
    // One message per cause: a second write of the same cause is ignored, and the queue job id is this key.
    t.text('idempotency_key').notNullable().unique();
    t.text('kind').notNullable();
    // Ids only, never addresses, names or secrets: the worker reads the current rows when it renders.
    t.jsonb('payload').notNullable();
    t.text('status')
      .notNullable()
      .defaultTo('pending')
      .checkIn(['pending', 'queued', 'sent', 'failed'], 'outbox_status_check');
    t.integer('attempts').notNullable().defaultTo(0);
    t.timestamp('next_attempt_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.text('last_error');
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.timestamp('sent_at', { useTz: true });
  });
  await knex.raw("CREATE INDEX outbox_pending_idx ON outbox (next_attempt_at) WHERE status = 'pending'");

  // One row per version of a booking sent to a partner: when it went, and when it became overdue.
  await knex.schema.createTable('booking_requests', (t) => {
    t.bigIncrements('id');
    t.bigInteger('booking_id').notNullable().references('bookings.id').onDelete('CASCADE');
    t.integer('booking_version').notNullable();
    t.bigInteger('resource_id').notNullable().references('resources.id').onDelete('CASCADE');
    t.timestamp('requested_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    // Set by the reminder scan when the request went unanswered too long; the reminder is queued then.
    t.timestamp('overdue_at', { useTz: true });
    t.unique(['booking_id', 'booking_version']);
  });

  await knex.schema.createTable('booking_answers', (t) => {
    t.bigIncrements('id');
    t.bigInteger('booking_id').notNullable().references('bookings.id').onDelete('CASCADE');
    t.integer('booking_version').notNullable();
    t.text('action').notNullable().checkIn(['confirm', 'decline', 'propose'], 'booking_answers_action_check');
    t.timestamp('proposed_starts_at', { useTz: true });
    t.timestamp('proposed_ends_at', { useTz: true });
    // A proposal waits for the installer: accepted (the booking moves) or refused (it stays).
    t.text('proposal_status').checkIn(['open', 'accepted', 'refused'], 'booking_answers_proposal_status_check');
    t.text('via').notNullable().checkIn(['link', 'app'], 'booking_answers_via_check');
    t.bigInteger('answered_by').references('users.id').onDelete('SET NULL');
    t.bigInteger('decided_by').references('users.id').onDelete('SET NULL');
    t.timestamp('decided_at', { useTz: true });
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.index(['booking_id', 'created_at']);
  });
  await knex.raw(`ALTER TABLE booking_answers ADD CONSTRAINT booking_answers_proposal_times
    CHECK ((action = 'propose') = (proposed_starts_at IS NOT NULL AND proposed_ends_at IS NOT NULL AND proposal_status IS NOT NULL)
      AND (proposed_ends_at IS NULL OR proposed_ends_at > proposed_starts_at))`);

  // A signed link works once: its jti is recorded when it is used.
  await knex.schema.createTable('link_uses', (t) => {
    t.text('jti').primary();
    t.text('purpose').notNullable();
    t.bigInteger('subject_id').notNullable();
    t.timestamp('used_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
  });

  // Tampered, expired and reused links: kept so an odd pattern can be seen.
  await knex.schema.createTable('link_attempts', (t) => {
    t.bigIncrements('id');
    t.text('reason').notNullable();
    t.text('path').notNullable();
    t.text('jti');
    t.text('ip');
    t.timestamp('at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
  });

  // A private, revocable iCalendar feed of one person's slots. Only the token's hash is kept.
  await knex.schema.createTable('calendar_feeds', (t) => {
    t.bigIncrements('id');
    t.bigInteger('resource_id').notNullable().references('resources.id').onDelete('CASCADE');
    t.text('token_hash').notNullable().unique();
    t.bigInteger('created_by').references('users.id').onDelete('SET NULL');
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.timestamp('revoked_at', { useTz: true });
  });
  await knex.raw(
    'CREATE UNIQUE INDEX calendar_feeds_one_live ON calendar_feeds (resource_id) WHERE revoked_at IS NULL',
  );

  await knex.schema.createTable('invitations', (t) => {
    t.bigIncrements('id');
    t.bigInteger('firm_id').notNullable().references('firms.id').onDelete('CASCADE');
    t.text('email').notNullable();
    t.text('role')
      .notNullable()
      .checkIn(['owner', 'scheduler', 'manager', 'crew', 'partner', 'viewer'], 'invitations_role_check');
    t.bigInteger('invited_by').references('users.id').onDelete('SET NULL');
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.timestamp('expires_at', { useTz: true }).notNullable();
    t.timestamp('accepted_at', { useTz: true });
    t.bigInteger('accepted_user_id').references('users.id').onDelete('SET NULL');
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('invitations');
  await knex.schema.dropTable('calendar_feeds');
  await knex.schema.dropTable('link_attempts');
  await knex.schema.dropTable('link_uses');
  await knex.schema.dropTable('booking_answers');
  await knex.schema.dropTable('booking_requests');
  await knex.schema.dropTable('outbox');
}
