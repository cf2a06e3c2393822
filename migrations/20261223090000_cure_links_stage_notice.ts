import type { Knex } from 'knex';

/**
 * Two things the plan now tells the engine instead of a note:
 *
 * - `dependencies.waits_for_cure`: whether a link out of a base waits for the base's cure (the lift,
 *   anything that loads the base) or only for its lag (block walls once the base has set overnight).
 *   Links planned before kept the cure on every link out of a cured stage; they keep it, except
 *   those into block walls, which the templates always meant to go up after an overnight set.
 *   Firms' saved templates get the same flag on their links.
 * - `stages.notice`: the notice a stage of a job needs ({ workingDays, countedFrom, resourceKind?,
 *   reason? }), checked like the firm's lead-time rules. A delivery planned before takes its
 *   unit's maker lead time from the order; other stages stay under the firm's rules alone.
 */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.alterTable('dependencies', (t) => {
    t.boolean('waits_for_cure').notNullable().defaultTo(false);
  });
  await knex.schema.alterTable('stages', (t) => {
    t.jsonb('notice');
  });
  await knex.raw(`UPDATE dependencies d SET waits_for_cure = true
    FROM stages f, stages t
    WHERE f.id = d.from_stage_id AND t.id = d.to_stage_id AND f.cure IS NOT NULL AND t.kind <> 'walls'`);
  await knex.raw(`UPDATE stages s SET notice = jsonb_build_object('workingDays', u.maker_lead_days, 'countedFrom', 'order', 'reason', 'the maker''s lead time')
    FROM jobs j JOIN units u ON u.id = j.unit_id
    WHERE s.job_id = j.id AND s.kind = 'delivery' AND u.maker_lead_days IS NOT NULL AND u.maker_lead_days > 0`);

  type Row = {
    id: string;
    stages: { kind: string; cure?: unknown }[];
    links: { from: string; to: string; waitsForCure?: boolean }[];
  };
  const rows = (await knex('stage_templates').select('id', 'stages', 'links')) as Row[];
  for (const row of rows) {
    const cured = new Set(row.stages.filter((s) => s.cure).map((s) => s.kind));
    const links = row.links.map((l) => ({
      ...l,
      waitsForCure: l.waitsForCure ?? (cured.has(l.from) && l.to !== 'walls'),
    }));
    await knex('stage_templates')
      .where('id', row.id)
      .update({ links: JSON.stringify(links) });
  }
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.alterTable('stages', (t) => {
    t.dropColumn('notice');
  });
  await knex.schema.alterTable('dependencies', (t) => {
    t.dropColumn('waits_for_cure');
  });
}
