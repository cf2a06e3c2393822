import type { Knex } from 'knex';

/** Site surveys, firms' own stage templates and quantity settings, and files kept on a job. */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('surveys', (t) => {
    t.bigIncrements('id');
    t.bigInteger('job_id').notNullable().unique().references('jobs.id').onDelete('CASCADE');
    // Narrowest width and height along the access route; a null height means nothing limits it.
    t.integer('access_width_mm').notNullable();
    t.integer('access_height_mm');
    t.integer('steps').notNullable().defaultTo(0);
    t.integer('gates').notNullable().defaultTo(0);
    t.boolean('overhead_obstructions').notNullable().defaultTo(false);
    t.text('overhead_notes');
    t.text('ground_type')
      .notNullable()
      .checkIn(['clay', 'loam', 'sand_gravel', 'chalk', 'rock', 'made_ground', 'unknown'], 'surveys_ground_type_check');
    t.text('buried_services_notes');
    t.text('crane_standing_position');
    t.decimal('crane_distance_to_set_down_m', 6, 2);
    t.decimal('consumer_unit_distance_m', 6, 2);
    t.integer('main_fuse_amps');
    t.text('drainage');
    // The surveyor's own call on a crane; null leaves it to the access check.
    t.boolean('crane_required');
    t.text('excavator_size').checkIn(['1.5t', '3t', '5t'], 'surveys_excavator_size_check');
    t.text('notes');
    t.bigInteger('surveyed_by').references('users.id').onDelete('SET NULL');
    t.timestamp('surveyed_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.integer('version').notNullable().defaultTo(1);
    t.timestamp('updated_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
  });
  await knex.raw(`ALTER TABLE surveys
    ADD CONSTRAINT surveys_access_positive CHECK (access_width_mm > 0 AND (access_height_mm IS NULL OR access_height_mm > 0)),
    ADD CONSTRAINT surveys_counts CHECK (steps >= 0 AND gates >= 0),
    ADD CONSTRAINT surveys_fuse_positive CHECK (main_fuse_amps IS NULL OR main_fuse_amps > 0)`);

  // A firm's edited template for one installation type; without a row the built-in default applies.
  await knex.schema.createTable('stage_templates', (t) => {
    t.bigIncrements('id');
    t.bigInteger('firm_id').notNullable().references('firms.id').onDelete('CASCADE');
    t.text('installation_type')
      .notNullable()
      .checkIn(['in_ground', 'semi_recessed', 'slab', 'deck'], 'stage_templates_installation_type_check');
    t.text('name').notNullable();
    t.jsonb('stages').notNullable();
    t.jsonb('links').notNullable();
    t.integer('version').notNullable().defaultTo(1);
    t.bigInteger('updated_by').references('users.id').onDelete('SET NULL');
    t.timestamp('updated_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.unique(['firm_id', 'installation_type']);
  });

  // Per-firm overrides of the quantity defaults (shared/quantities/settings.ts).
  await knex.schema.createTable('firm_settings', (t) => {
    t.bigInteger('firm_id').primary().references('firms.id').onDelete('CASCADE');
    t.jsonb('quantities').notNullable().defaultTo('{}');
    t.integer('version').notNullable().defaultTo(1);
    t.timestamp('updated_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
  });

  // Photos and documents of a job; the bytes live in object storage under object_key.
  await knex.schema.createTable('job_files', (t) => {
    t.bigIncrements('id');
    t.bigInteger('job_id').notNullable().references('jobs.id').onDelete('CASCADE');
    t.text('object_key').notNullable().unique();
    t.text('thumbnail_key');
    t.text('name').notNullable();
    t.text('content_type').notNullable();
    t.integer('size_bytes').notNullable();
    t.bigInteger('uploaded_by').references('users.id').onDelete('SET NULL');
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.index(['job_id', 'created_at']);
  });
  await knex.raw('ALTER TABLE job_files ADD CONSTRAINT job_files_size_positive CHECK (size_bytes > 0)');
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('job_files');
  await knex.schema.dropTable('firm_settings');
  await knex.schema.dropTable('stage_templates');
  await knex.schema.dropTable('surveys');
}
