import type { Knex } from 'knex';

/**
 * Reads that scale with the data:
 * - `bookings_during_idx`: a GiST index on each booking's time range, for the range look-ups of the
 *   board, the day sheets, the booking list and the calendar feeds (`tstzrange(starts_at, ends_at) && …`);
 * - partial indexes for the scans the worker runs every minute or day: requests not yet overdue
 *   (the reminder scan), queued outbox rows (handed over again when stale), settled outbox rows and
 *   refused link attempts (the pruning jobs);
 * - `board_changes`: one row per firm a change to board data concerns, written by triggers, so the
 *   board's ETag (server/services/board-version.ts) can be worked out with one indexed query before
 *   the board is loaded. A booking of another installer on a partner's resource concerns the partner
 *   (and so that partner's installers) only in the states it blocks others in, as on the board.
 */
export async function up(knex: Knex): Promise<void> {
  await knex.raw('CREATE EXTENSION IF NOT EXISTS btree_gist');
  await knex.raw('CREATE INDEX bookings_during_idx ON bookings USING gist (tstzrange(starts_at, ends_at))');
  await knex.raw(
    'CREATE INDEX booking_requests_waiting_idx ON booking_requests (requested_at) WHERE overdue_at IS NULL',
  );
  await knex.raw("CREATE INDEX outbox_queued_idx ON outbox (next_attempt_at) WHERE status = 'queued'");
  await knex.raw("CREATE INDEX outbox_settled_idx ON outbox (created_at) WHERE status IN ('sent', 'failed')");
  await knex.raw('CREATE INDEX link_attempts_at_idx ON link_attempts (at)');

  await knex.schema.createTable('board_changes', (t) => {
    t.bigIncrements('id');
    t.bigInteger('firm_id').notNullable();
    t.timestamp('at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.index(['firm_id', 'id'], 'board_changes_firm_idx');
    t.index(['at'], 'board_changes_at_idx');
  });
  await knex.raw(`CREATE FUNCTION note_board_change() RETURNS trigger LANGUAGE plpgsql AS $$
DECLARE
  rows jsonb[] := ARRAY[]::jsonb[];
  r jsonb;
  firms bigint[] := ARRAY[]::bigint[];
BEGIN
  IF TG_OP <> 'DELETE' THEN rows := rows || to_jsonb(NEW); END IF;
  IF TG_OP <> 'INSERT' THEN rows := rows || to_jsonb(OLD); END IF;
  FOREACH r IN ARRAY rows LOOP
    CASE TG_TABLE_NAME
      WHEN 'firms' THEN firms := firms || (r->>'id')::bigint;
      WHEN 'jobs', 'resources', 'calendars', 'lead_time_rules', 'firm_settings' THEN firms := firms || (r->>'firm_id')::bigint;
      WHEN 'partnerships' THEN firms := firms || (r->>'installer_firm_id')::bigint || (r->>'partner_firm_id')::bigint;
      WHEN 'stages', 'site_forecasts' THEN firms := firms || (SELECT j.firm_id FROM jobs j WHERE j.id = (r->>'job_id')::bigint);
      WHEN 'dependencies' THEN
        firms := firms || (SELECT j.firm_id FROM stages s JOIN jobs j ON j.id = s.job_id WHERE s.id = (r->>'to_stage_id')::bigint);
      WHEN 'bookings' THEN
        firms := firms || (SELECT j.firm_id FROM stages s JOIN jobs j ON j.id = s.job_id WHERE s.id = (r->>'stage_id')::bigint);
        IF r->>'state' IN ('sent', 'confirmed', 'on_site', 'done') THEN
          firms := firms || (SELECT x.firm_id FROM resources x WHERE x.id = (r->>'resource_id')::bigint);
        END IF;
      WHEN 'booking_requests', 'booking_answers' THEN
        firms := firms || (SELECT j.firm_id FROM bookings b JOIN stages s ON s.id = b.stage_id JOIN jobs j ON j.id = s.job_id WHERE b.id = (r->>'booking_id')::bigint);
      WHEN 'crew_members' THEN firms := firms || (SELECT x.firm_id FROM resources x WHERE x.id = (r->>'crew_id')::bigint);
      WHEN 'calendar_exceptions' THEN
        firms := firms || (SELECT c.firm_id FROM calendars c WHERE c.id = (r->>'calendar_id')::bigint)
          || (SELECT x.firm_id FROM resources x WHERE x.id = (r->>'resource_id')::bigint);
      WHEN 'hire_periods' THEN
        firms := firms || (r->>'hirer_firm_id')::bigint || (SELECT x.firm_id FROM resources x WHERE x.id = (r->>'resource_id')::bigint);
      ELSE NULL;
    END CASE;
  END LOOP;
  INSERT INTO board_changes (firm_id) SELECT DISTINCT f FROM unnest(firms) AS f WHERE f IS NOT NULL;
  RETURN NULL;
END $$`);
  for (const table of BOARD_TABLES) {
    await knex.raw(
      `CREATE TRIGGER ${table}_board_change AFTER INSERT OR UPDATE OR DELETE ON ${table} FOR EACH ROW EXECUTE FUNCTION note_board_change()`,
    );
  }
}

/** Every table the board reads (server/services/board.ts and what it calls). */
const BOARD_TABLES = [
  'firms',
  'firm_settings',
  'partnerships',
  'jobs',
  'stages',
  'dependencies',
  'bookings',
  'booking_requests',
  'booking_answers',
  'resources',
  'crew_members',
  'calendars',
  'calendar_exceptions',
  'hire_periods',
  'lead_time_rules',
  'site_forecasts',
];

export async function down(knex: Knex): Promise<void> {
  for (const table of BOARD_TABLES) await knex.raw(`DROP TRIGGER IF EXISTS ${table}_board_change ON ${table}`);
  await knex.raw('DROP FUNCTION IF EXISTS note_board_change()');
  await knex.schema.dropTableIfExists('board_changes');
  for (const index of [
    'link_attempts_at_idx',
    'outbox_settled_idx',
    'outbox_queued_idx',
    'booking_requests_waiting_idx',
    'bookings_during_idx',
  ]) {
    await knex.raw(`DROP INDEX IF EXISTS ${index}`);
  }
}
