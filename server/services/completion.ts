import type { Knex } from 'knex';
import type { CompletionQuery, StageCompletion } from '../../shared/schemas/bookings.ts';
import { createBoardIndex } from '../../shared/scheduler/index.ts';
import { toEngineBoard } from '../../shared/board-data.ts';
import { completeStage, wrongKindMessage } from '../../shared/stage-completion.ts';
import { Booking, Resource, Stage } from '../models/index.ts';
import { BadRequestError, NotFoundError, UnprocessableError } from '../errors.ts';
import type { Actor } from './actor.ts';
import { findVisible, scoped } from './scope.ts';
import { loadBoard } from './board.ts';

const DAY = 86_400_000;

/**
 * Booking a stage as a whole: after one resource is dropped on a row, what else the stage needs at
 * that time and which free resources the engine proposes for it. Reads the scoped board (loadBoard)
 * over the stage's whole span, so every booking of every candidate then counts, another
 * installer's only as "busy elsewhere". Proposes, never writes: the board books the chosen ones
 * through the batch route (the guarded write path).
 */
export class CompletionService {
  constructor(
    private readonly knex: Knex,
    private readonly now: () => number = Date.now,
  ) {}

  async complete(actor: Actor, stageId: string, query: CompletionQuery): Promise<StageCompletion> {
    const stage = await findVisible(Stage, actor, stageId, undefined, 'stage');
    if (query.resourceId) {
      const resource = await findVisible(Resource, actor, query.resourceId, undefined, 'resource');
      const kinds = (stage.requirements ?? []).map((r) => r.kind);
      if (kinds.length && !kinds.includes(resource.kind)) {
        throw new UnprocessableError(wrongKindMessage(stage.name, resource, kinds), {
          code: 'wrong-kind',
          violations: [
            { kind: 'wrong-kind', severity: 'error', message: `'${stage.name}' can't be done by ${resource.name}` },
          ],
        });
      }
    }
    let start = query.startsAt ? Date.parse(query.startsAt) : undefined;
    if (start === undefined) {
      const first = await scoped(Booking, actor)
        .where('stage_id', stageId)
        .whereNot('state', 'declined')
        .orderBy('starts_at')
        .first();
      start = first?.startsAt.getTime();
    }
    if (start === undefined) {
      throw new BadRequestError('Say when: this stage has no booking yet.', [
        { field: 'query.startsAt', message: 'is required for a stage with no booking' },
      ]);
    }
    // Wide enough for the stage's working time on the shortest working days, weekends and holidays between.
    const spanDays = Math.ceil(stage.durationMinutes / 240) * 2 + 14;
    const data = await loadBoard(this.knex, actor, {
      from: start - DAY,
      to: start + spanDays * DAY,
      jobIds: [String(stage.jobId)],
      now: this.now(),
    });
    if (query.resourceId && !data.resources.some((r) => r.id === String(query.resourceId)))
      throw new NotFoundError('resource');
    const index = createBoardIndex(toEngineBoard(data), { now: data.now });
    return completeStage(data, index, {
      stageId: String(stage.id),
      start,
      ...(query.resourceId ? { resourceId: query.resourceId } : {}),
    });
  }
}
