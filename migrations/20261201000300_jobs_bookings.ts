import type { Knex } from 'knex';

/** Spa units, jobs, their stages and dependencies, bookings and the audit log. */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('units', (t) => {
    t.bigIncrements('id');
    t.bigInteger('firm_id').notNullable().references('firms.id').onDelete('CASCADE');
    t.text('model').notNullable();
    t.text('maker').notNullable();
    t.integer('length_mm').notNullable();
    t.integer('width_mm').notNullable();
    t.integer('height_mm').notNullable();
    t.integer('dry_weight_kg').notNullable();
    t.integer('filled_weight_kg').notNullable();
    t.integer('water_litres').notNullable();
    // [{"amps": 32}, {"amps": 32}]: each dedicated supply the unit needs.
    t.jsonb('supplies').notNullable().defaultTo('[]');
    t.integer('maker_lead_days').notNullable().defaultTo(20);
    t.unique(['firm_id', 'model']);
  });

  await knex.schema.createTable('jobs', (t) => {
    t.bigIncrements('id');
    t.bigInteger('firm_id').notNullable().references('firms.id').onDelete('CASCADE');
    t.text('reference').notNullable();
    t.text('customer_name').notNullable();
    t.text('customer_phone');
    t.text('customer_email');
    t.text('site_address').notNullable();
    t.text('site_town').notNullable();
    t.text('site_postcode').notNullable();
    t.text('access_notes');
    t.bigInteger('unit_id').references('units.id');
    t.text('installation_type')
      .notNullable()
      .checkIn(['in_ground', 'semi_recessed', 'slab', 'deck'], 'jobs_installation_type_check');
    t.text('status')
      .notNullable()
      .defaultTo('enquiry')
      .checkIn(['enquiry', 'surveyed', 'planned', 'in_progress', 'handed_over', 'cancelled'], 'jobs_status_check');
    t.date('promised_from');
    t.date('promised_to');
    t.date('ordered_on');
    t.integer('version').notNullable().defaultTo(1);
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.unique(['firm_id', 'reference']);
  });
  await knex.raw(`ALTER TABLE jobs ADD CONSTRAINT jobs_promised_order
    CHECK (promised_to IS NULL OR promised_from IS NULL OR promised_to >= promised_from)`);

  await knex.schema.createTable('stages', (t) => {
    t.bigIncrements('id');
    t.bigInteger('job_id').notNullable().references('jobs.id').onDelete('CASCADE');
    t.text('kind').notNullable();
    t.text('name').notNullable();
    t.integer('sequence').notNullable();
    t.integer('duration_minutes').notNullable();
    // [{"kind": "pallet_truck", "count": 2}]
    t.jsonb('requirements').notNullable().defaultTo('[]');
    // {"targetFraction": 0.7, "dailyMeanTempsC": [..]} on a base stage whose successors wait for the cure.
    t.jsonb('cure');
    t.text('notes');
    t.unique(['job_id', 'sequence']);
  });
  await knex.raw('ALTER TABLE stages ADD CONSTRAINT stages_duration_positive CHECK (duration_minutes > 0)');

  await knex.schema.createTable('dependencies', (t) => {
    t.bigIncrements('id');
    t.bigInteger('from_stage_id').notNullable().references('stages.id').onDelete('CASCADE');
    t.bigInteger('to_stage_id').notNullable().references('stages.id').onDelete('CASCADE');
    t.text('type').notNullable().defaultTo('FS').checkIn(['FS', 'SS', 'FF', 'SF'], 'dependencies_type_check');
    t.decimal('lag_amount', 10, 2).notNullable().defaultTo(0);
    t.text('lag_unit')
      .notNullable()
      .defaultTo('working_hours')
      .checkIn(['working_hours', 'working_days', 'elapsed_hours', 'elapsed_days'], 'dependencies_lag_unit_check');
    t.unique(['from_stage_id', 'to_stage_id']);
  });
  await knex.raw('ALTER TABLE dependencies ADD CONSTRAINT dependencies_distinct CHECK (from_stage_id <> to_stage_id)');

  await knex.schema.createTable('bookings', (t) => {
    t.bigIncrements('id');
    t.bigInteger('stage_id').notNullable().references('stages.id').onDelete('CASCADE');
    t.bigInteger('resource_id').notNullable().references('resources.id');
    t.timestamp('starts_at', { useTz: true }).notNullable();
    t.timestamp('ends_at', { useTz: true }).notNullable();
    t.text('state')
      .notNullable()
      .defaultTo('pencilled')
      .checkIn(['pencilled', 'sent', 'confirmed', 'declined', 'on_site', 'done'], 'bookings_state_check');
    t.integer('version').notNullable().defaultTo(1);
    t.bigInteger('created_by').references('users.id');
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.timestamp('updated_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.unique(['stage_id', 'resource_id']);
    t.index(['resource_id', 'starts_at']);
  });
  await knex.raw('ALTER TABLE bookings ADD CONSTRAINT bookings_time_order CHECK (ends_at > starts_at)');
  // No race between two requests can double-book a resource: PostgreSQL refuses the overlap itself.
  await knex.raw(`ALTER TABLE bookings ADD CONSTRAINT bookings_no_confirmed_overlap
    EXCLUDE USING gist (resource_id WITH =, tstzrange(starts_at, ends_at) WITH &&)
    WHERE (state = 'confirmed')`);

  // "A crane needs 5 working days' notice": notice a resource kind or stage kind needs.
  await knex.schema.createTable('lead_time_rules', (t) => {
    t.bigIncrements('id');
    t.bigInteger('firm_id').notNullable().references('firms.id').onDelete('CASCADE');
    t.text('resource_kind');
    t.text('stage_kind');
    t.integer('working_days').notNullable();
    t.text('counted_from').notNullable().defaultTo('now').checkIn(['now', 'order'], 'lead_time_rules_from_check');
  });
  await knex.raw(`ALTER TABLE lead_time_rules ADD CONSTRAINT lead_time_rules_target
    CHECK ((resource_kind IS NULL) <> (stage_kind IS NULL))`);

  await knex.schema.createTable('audit_log', (t) => {
    t.bigIncrements('id');
    t.bigInteger('firm_id').references('firms.id').onDelete('CASCADE');
    t.bigInteger('actor_user_id').references('users.id').onDelete('SET NULL');
    t.text('entity').notNullable();
    t.bigInteger('entity_id').notNullable();
    t.text('action').notNullable().checkIn(['create', 'update', 'delete'], 'audit_log_action_check');
    t.jsonb('before');
    t.jsonb('after');
    t.timestamp('at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.index(['entity', 'entity_id']);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('audit_log');
  await knex.schema.dropTable('lead_time_rules');
  await knex.schema.dropTable('bookings');
  await knex.schema.dropTable('dependencies');
  await knex.schema.dropTable('stages');
  await knex.schema.dropTable('jobs');
  await knex.schema.dropTable('units');
}
