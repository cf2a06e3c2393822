import type { Knex } from 'knex';

/** Working calendars, resources (crews, people, machines), crew members and machine hire. */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('calendars', (t) => {
    t.bigIncrements('id');
    t.bigInteger('firm_id').notNullable().references('firms.id').onDelete('CASCADE');
    t.text('name').notNullable();
    // {"1":[[480,1020]], ...}: weekday (0 = Sunday) → [start, end] minutes of the local day.
    t.jsonb('weekly_hours').notNullable();
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.unique(['firm_id', 'name']);
  });

  await knex.schema.createTable('resources', (t) => {
    t.bigIncrements('id');
    t.bigInteger('firm_id').notNullable().references('firms.id').onDelete('CASCADE');
    t.text('name').notNullable();
    t.text('category').notNullable().checkIn(['crew', 'person', 'machine'], 'resources_category_check');
    // What a stage asks for: install_crew, groundworks_crew, electrician, crane, excavator, dumper,
    // pallet_truck, rollers, lorry, surveyor.
    t.text('kind').notNullable();
    t.text('ownership').notNullable().defaultTo('owned').checkIn(['owned', 'hired'], 'resources_ownership_check');
    t.bigInteger('calendar_id').references('calendars.id').onDelete('SET NULL');
    t.bigInteger('user_id').references('users.id').onDelete('SET NULL');
    t.text('phone');
    t.text('notes');
    t.boolean('active').notNullable().defaultTo(true);
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.unique(['firm_id', 'name']);
  });
  await knex.raw(`ALTER TABLE resources ADD CONSTRAINT resources_user_only_for_people
    CHECK (user_id IS NULL OR category = 'person')`);

  await knex.schema.createTable('crew_members', (t) => {
    t.bigInteger('crew_id').notNullable().references('resources.id').onDelete('CASCADE');
    t.bigInteger('person_id').notNullable().references('resources.id').onDelete('CASCADE');
    t.primary(['crew_id', 'person_id']);
  });

  // Closures of a whole calendar, or absences of one resource.
  await knex.schema.createTable('calendar_exceptions', (t) => {
    t.bigIncrements('id');
    t.bigInteger('calendar_id').references('calendars.id').onDelete('CASCADE');
    t.bigInteger('resource_id').references('resources.id').onDelete('CASCADE');
    t.timestamp('starts_at', { useTz: true }).notNullable();
    t.timestamp('ends_at', { useTz: true }).notNullable();
    t.text('reason').notNullable();
  });
  await knex.raw(`ALTER TABLE calendar_exceptions
    ADD CONSTRAINT calendar_exceptions_owner CHECK ((calendar_id IS NULL) <> (resource_id IS NULL)),
    ADD CONSTRAINT calendar_exceptions_order CHECK (ends_at > starts_at)`);

  await knex.schema.createTable('hire_periods', (t) => {
    t.bigIncrements('id');
    t.bigInteger('resource_id').notNullable().references('resources.id').onDelete('CASCADE');
    t.bigInteger('hirer_firm_id').notNullable().references('firms.id').onDelete('CASCADE');
    t.bigInteger('supplier_firm_id').notNullable().references('firms.id');
    t.timestamp('on_hire_at', { useTz: true }).notNullable();
    t.timestamp('off_hire_at', { useTz: true }).notNullable();
    t.integer('day_rate_pence').notNullable();
    t.integer('delivery_pence').notNullable().defaultTo(0);
    t.integer('collection_pence').notNullable().defaultTo(0);
    t.text('status')
      .notNullable()
      .defaultTo('requested')
      .checkIn(['requested', 'approved', 'ended'], 'hire_periods_status_check');
    t.bigInteger('approved_by').references('users.id');
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
  });
  await knex.raw(`ALTER TABLE hire_periods
    ADD CONSTRAINT hire_periods_order CHECK (off_hire_at > on_hire_at),
    ADD CONSTRAINT hire_periods_rate CHECK (day_rate_pence >= 0)`);
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('hire_periods');
  await knex.schema.dropTable('calendar_exceptions');
  await knex.schema.dropTable('crew_members');
  await knex.schema.dropTable('resources');
  await knex.schema.dropTable('calendars');
}
