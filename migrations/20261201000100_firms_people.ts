import type { Knex } from 'knex';

/** Firms, the people who sign in, their memberships and the installer ↔ partner links. */
export async function up(knex: Knex): Promise<void> {
  await knex.raw('CREATE EXTENSION IF NOT EXISTS btree_gist');

  await knex.schema.createTable('firms', (t) => {
    t.bigIncrements('id');
    t.text('name').notNullable();
    t.text('kind')
      .notNullable()
      .checkIn(['installer', 'groundworks', 'plant_hire', 'crane_hire', 'haulage', 'electrical'], 'firms_kind_check');
    t.text('time_zone').notNullable().defaultTo('Europe/London');
    // date-holidays country and region, e.g. GB-ENG, GB-SCT, GB-NIR.
    t.text('holiday_region').notNullable().defaultTo('GB-ENG');
    t.text('phone');
    t.text('email');
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.unique(['name']);
  });

  await knex.schema.createTable('users', (t) => {
    t.bigIncrements('id');
    t.text('email').notNullable();
    t.text('name').notNullable();
    t.text('google_sub').unique();
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.timestamp('last_sign_in_at', { useTz: true });
  });
  await knex.raw('CREATE UNIQUE INDEX users_email_lower_unique ON users (lower(email))');

  await knex.schema.createTable('memberships', (t) => {
    t.bigIncrements('id');
    t.bigInteger('user_id').notNullable().references('users.id').onDelete('CASCADE');
    t.bigInteger('firm_id').notNullable().references('firms.id').onDelete('CASCADE');
    t.text('role')
      .notNullable()
      .checkIn(['owner', 'scheduler', 'manager', 'crew', 'partner', 'viewer'], 'memberships_role_check');
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.unique(['user_id', 'firm_id']);
  });

  await knex.schema.createTable('partnerships', (t) => {
    t.bigIncrements('id');
    t.bigInteger('installer_firm_id').notNullable().references('firms.id').onDelete('CASCADE');
    t.bigInteger('partner_firm_id').notNullable().references('firms.id').onDelete('CASCADE');
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.unique(['installer_firm_id', 'partner_firm_id']);
  });
  await knex.raw(
    'ALTER TABLE partnerships ADD CONSTRAINT partnerships_distinct CHECK (installer_firm_id <> partner_firm_id)',
  );

  // Sessions for express-session through connect-pg-simple (its documented table).
  await knex.schema.createTable('session', (t) => {
    t.string('sid').primary();
    t.json('sess').notNullable();
    t.timestamp('expire', { precision: 6 }).notNullable().index('session_expire_idx');
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('session');
  await knex.schema.dropTable('partnerships');
  await knex.schema.dropTable('memberships');
  await knex.schema.dropTable('users');
  await knex.schema.dropTable('firms');
}
