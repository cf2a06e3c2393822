import type { Knex } from 'knex';

/**
 * Money from the householder: the job's agreed price, the firm's usual deposit (a percentage of the
 * price), the deposit and balance asked for through the payment provider, and every webhook event
 * the provider sent (kept by its event id, so a replay has no second effect, and refused ones are
 * logged with why). Amounts are whole pence; one currency (pounds sterling).
 *
 * A job has at most one open request and at most one paid payment of each kind: the partial unique
 * indexes make a second request or a second payment impossible even when two people (or two
 * webhook deliveries) act at once.
 */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.alterTable('jobs', (t) => {
    t.integer('price_pence');
  });
  await knex.raw(
    'ALTER TABLE jobs ADD CONSTRAINT jobs_price_pence_check CHECK (price_pence IS NULL OR price_pence > 0)',
  );
  await knex.schema.alterTable('firm_settings', (t) => {
    t.integer('deposit_percent').notNullable().defaultTo(25);
  });
  await knex.raw(
    'ALTER TABLE firm_settings ADD CONSTRAINT firm_settings_deposit_percent_check CHECK (deposit_percent BETWEEN 1 AND 100)',
  );

  await knex.schema.createTable('job_payments', (t) => {
    t.bigIncrements('id');
    t.bigInteger('job_id').notNullable().references('jobs.id').onDelete('CASCADE');
    t.text('kind').notNullable().checkIn(['deposit', 'balance'], 'job_payments_kind_check');
    t.integer('amount_pence').notNullable();
    t.text('currency').notNullable().defaultTo('gbp').checkIn(['gbp'], 'job_payments_currency_check');
    t.text('status')
      .notNullable()
      .defaultTo('requested')
      .checkIn(['requested', 'paid', 'cancelled', 'failed'], 'job_payments_status_check');
    // The provider's checkout session (made when the householder first opens the link) and its payment.
    t.text('checkout_session_id').unique();
    t.text('payment_intent_id').unique();
    t.timestamp('requested_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.bigInteger('requested_by').references('users.id').onDelete('SET NULL');
    t.timestamp('paid_at', { useTz: true });
    t.timestamp('closed_at', { useTz: true });
    t.index(['job_id']);
  });
  await knex.raw(`ALTER TABLE job_payments
    ADD CONSTRAINT job_payments_amount_check CHECK (amount_pence > 0),
    ADD CONSTRAINT job_payments_paid_at_check CHECK ((status = 'paid') = (paid_at IS NOT NULL))`);
  await knex.raw("CREATE UNIQUE INDEX job_payments_one_open ON job_payments (job_id, kind) WHERE status = 'requested'");
  await knex.raw("CREATE UNIQUE INDEX job_payments_one_paid ON job_payments (job_id, kind) WHERE status = 'paid'");

  // Every webhook delivery that reached us: a good event once (its id is unique), a refused one with why.
  await knex.schema.createTable('webhook_events', (t) => {
    t.bigIncrements('id');
    // Null when the delivery was refused before its id could be trusted (a bad signature).
    t.text('provider_event_id').unique();
    t.text('type');
    t.timestamp('received_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.text('outcome').notNullable().checkIn(['applied', 'ignored', 'refused'], 'webhook_events_outcome_check');
    t.text('detail');
    t.bigInteger('payment_id').references('job_payments.id').onDelete('SET NULL');
    t.index(['received_at']);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('webhook_events');
  await knex.schema.dropTable('job_payments');
  await knex.raw('ALTER TABLE firm_settings DROP CONSTRAINT firm_settings_deposit_percent_check');
  await knex.schema.alterTable('firm_settings', (t) => {
    t.dropColumn('deposit_percent');
  });
  await knex.raw('ALTER TABLE jobs DROP CONSTRAINT jobs_price_pence_check');
  await knex.schema.alterTable('jobs', (t) => {
    t.dropColumn('price_pence');
  });
}
