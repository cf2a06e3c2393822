import type { Knex } from 'knex';
import { idOf } from './server.ts';

/** A stage of a test job: what it is, how long it takes (working minutes) and what it needs. */
export interface FixtureStage {
  kind: string;
  name: string;
  minutes: number;
  needs: Record<string, number>;
}

export interface FixtureJob {
  jobId: string;
  stage: Record<string, string>;
}

/**
 * A job of Tideway's of the test's own making (invented customer and site), with exactly the
 * stages and finish-to-start links the test names, so its durations and links never depend on the
 * demo's templates or quantities. Jobs, stages and links are not bookings: they are written here
 * directly; every booking is made through the API.
 *
 * @example
 * await makeJob(ctx.knex, { reference: 'FX-1', stages: [{ kind: 'fill', name: 'Fill', minutes: 180, needs: { install_crew: 1 } }], links: [] })
 */
export async function makeJob(
  knex: Knex,
  input: { reference: string; town?: string; postcode?: string; stages: FixtureStage[]; links: [string, string][] },
): Promise<FixtureJob> {
  const firmId = await idOf(knex, 'firms', { name: 'Tideway Hot Tubs' });
  const [job] = await knex('jobs')
    .insert({
      firm_id: firmId,
      reference: input.reference,
      customer_name: 'Nell Amberley',
      site_address: '3 Heron Row',
      site_town: input.town ?? 'Addingham',
      site_postcode: input.postcode ?? 'LS29 0QT',
      installation_type: 'slab',
      status: 'planned',
    })
    .returning('id');
  const stage: Record<string, string> = {};
  for (const [n, s] of input.stages.entries()) stage[s.kind] = await addStage(knex, String(job.id), s, n + 1);
  for (const [from, to] of input.links) {
    await knex('dependencies').insert({
      from_stage_id: stage[from],
      to_stage_id: stage[to],
      type: 'FS',
      lag_amount: 0,
      lag_unit: 'working_hours',
    });
  }
  return { jobId: String(job.id), stage };
}

/**
 * One stage added to a job (written directly: a stage is not a booking); returns its id.
 *
 * @example
 * await addStage(ctx.knex, jobId, { kind: 'fill', name: 'Fill', minutes: 180, needs: { install_crew: 1 } }, 4)
 */
export async function addStage(knex: Knex, jobId: string, s: FixtureStage, sequence: number): Promise<string> {
  const [row] = await knex('stages')
    .insert({
      job_id: jobId,
      kind: s.kind,
      name: s.name,
      sequence,
      duration_minutes: s.minutes,
      requirements: JSON.stringify(Object.entries(s.needs).map(([kind, count]) => ({ kind, count }))),
    })
    .returning('id');
  return String(row.id);
}

/** "Excavate pit": a groundworks gang, an excavator and a dumper for five working hours. */
export const DIG: FixtureStage = {
  kind: 'excavation',
  name: 'Excavate pit',
  minutes: 300,
  needs: { groundworks_crew: 1, excavator: 1, dumper: 1 },
};
