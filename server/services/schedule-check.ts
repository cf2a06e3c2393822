import type { Knex } from 'knex';
import {
  createBoardIndex,
  checkStageBookings,
  normaliseViolations,
  type Violation,
} from '../../shared/scheduler/index.ts';
import { toEngineBoard } from '../../shared/board-data.ts';
import { asWriteVerdict, bookingsOfStage } from '../../shared/board-actions.ts';
import { UnprocessableError } from '../errors.ts';
import type { Actor } from './actor.ts';
import { loadBoard } from './board.ts';

const DAY = 86_400_000;

/**
 * The engine's verdict on stages just written, inside the transaction that wrote them (so it sees
 * the new bookings and nothing another request has not committed). Errors undo the write: the
 * caller's transaction is rolled back by the UnprocessableError (422 listing the violations);
 * warnings are returned to be saved and shown.
 */
export async function verifyStages(
  trx: Knex.Transaction,
  actor: Actor,
  stageIds: string[],
  now: number,
): Promise<Violation[]> {
  if (stageIds.length === 0) return [];
  const rows = (await trx('stages as s')
    .leftJoin('bookings as b', 'b.stage_id', 's.id')
    .whereIn('s.id', stageIds)
    .select('s.job_id as jobId')
    .min('b.starts_at as first')
    .max('b.ends_at as last')
    .groupBy('s.job_id')) as { jobId: string; first: Date | null; last: Date | null }[];
  const first = Math.min(...rows.map((r) => r.first?.getTime() ?? now));
  const last = Math.max(...rows.map((r) => r.last?.getTime() ?? now));
  const data = await loadBoard(trx, actor, {
    from: first - 7 * DAY,
    to: last + 7 * DAY,
    jobIds: rows.map((r) => String(r.jobId)),
    now,
  });
  const index = createBoardIndex(toEngineBoard(data), { now });
  const violations = normaliseViolations(
    stageIds.flatMap((id) => checkStageBookings(index, id, bookingsOfStage(index, id))),
  );
  const { errors, warnings } = asWriteVerdict(violations);
  if (errors.length) throw new UnprocessableError(errors[0]!.message, { violations: errors, warnings });
  return warnings;
}
