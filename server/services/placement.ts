import type { Knex } from 'knex';
import type { BoardData } from '../../shared/board-data.ts';
import { toEngineBoard } from '../../shared/board-data.ts';
import { autoPlace, createBoardIndex, findSlots, type AutoPlaceOptions } from '../../shared/scheduler/index.ts';
import type {
  AutoPlaceAnswer,
  AutoPlaceRequest,
  KindSlots,
  PlanProgress,
  SlotAnswer,
  SlotSearch,
} from '../../shared/schemas/placement.ts';
import { Job, Resource, Stage } from '../models/index.ts';
import { BadRequestError, NotFoundError } from '../errors.ts';
import type { Actor } from './actor.ts';
import { findVisible, scoped } from './scope.ts';
import { loadBoard } from './board.ts';
import { DEFAULT_BOOKING_LIMITS, type BookingLimits } from './booking-writes.ts';

const DAY = 86_400_000;
type EngineProgress = Parameters<NonNullable<AutoPlaceOptions['onProgress']>>[0];
/** How far ahead the slot finder looks from a stage's first possible start (the engine's default). */
export const SLOT_HORIZON_DAYS = 120;
/** How far ahead auto-place looks from each stage's first possible start (the engine's default). */
export const AUTO_PLACE_HORIZON_DAYS = 180;
/**
 * Days loaded beyond the horizon on the first read: a first possible start a little after today
 * (notice, predecessors) then needs no second read. A tuning choice, not a rule: a first
 * possible start further off costs a second read, never a wrong answer.
 */
const FIRST_READ_MARGIN_DAYS = 30;
/** How often auto-place's progress is reported while it searches, at most (milliseconds). */
export const PROGRESS_EVERY_MS = 250;

/** A run of the engine over loaded data: its answer and the latest instant the answer relies on. */
interface Run<T> {
  result: T;
  reach: number;
}

/**
 * Where a stage could go and where a job's unbooked stages would go, worked out on the server on
 * complete data. The board holds only its visible range, while these searches look 120 to 180
 * days ahead: on that part of the data they proposed times that clashed with bookings the board
 * had not loaded. Here every booking of every resource over the whole span the search can reach
 * is read (through loadBoard, as the installer: another installer's bookings of a shared partner
 * resource only as anonymous "busy elsewhere" blocks, which still count as busy). Proposes, never
 * writes: the board books a chosen slot or the auto-place result through the guarded write path.
 */
export class PlacementService {
  constructor(
    private readonly knex: Knex,
    private readonly now: () => number = Date.now,
    private readonly limits: BookingLimits = DEFAULT_BOOKING_LIMITS,
  ) {}

  /** The earliest slots of a stage per kind it needs (or on one resource, or one kind). Another firm's stage → 404. */
  async slots(actor: Actor, input: SlotSearch): Promise<SlotAnswer> {
    const stage = await findVisible(Stage, actor, input.stageId, undefined, 'stage');
    const needs = [...new Set((stage.requirements ?? []).map((r) => r.kind))];
    let kinds = needs;
    let resourceId: string | undefined;
    if (input.resourceId !== undefined) {
      const resource = await findVisible(Resource, actor, input.resourceId, undefined, 'resource');
      if (!needs.includes(resource.kind))
        throw wrongKind('resourceId', `${resource.name} is not of a kind`, stage.name, needs);
      kinds = [resource.kind];
      resourceId = String(resource.id);
    } else if (input.resourceKind !== undefined) {
      if (!needs.includes(input.resourceKind)) throw wrongKind('resourceKind', 'is not a kind', stage.name, needs);
      kinds = [input.resourceKind];
    }
    const stageId = String(stage.id);
    const kindSlots = await this.onCompleteData(actor, [String(stage.jobId)], SLOT_HORIZON_DAYS, (data) => {
      // A resource the board does not show (inactive) has no slots, as one that does not exist.
      if (resourceId !== undefined && !data.resources.some((r) => r.id === resourceId))
        throw new NotFoundError('resource');
      const index = createBoardIndex(toEngineBoard(data), { now: data.now });
      const found = kinds.map((kind) => ({
        kind,
        slots: findSlots(
          index,
          { stageId, earliest: data.now, ...(resourceId !== undefined ? { resourceId } : { resourceKind: kind }) },
          { alternatives: input.alternatives, horizonDays: SLOT_HORIZON_DAYS },
        ),
      }));
      // The stage's other bookings move with a slot: they too must lie in what was read.
      const reach = Math.max(
        data.now,
        ...found.flatMap((k) => k.slots.flatMap((s) => [s.end, ...s.bookings.map((b) => b.end)])),
      );
      // Only where and what it costs leaves: the stage's bookings stay the board's business.
      const result: KindSlots[] = found.map(({ kind, slots }) => ({
        kind,
        slots: slots.map(({ resourceId: r, start, end, cost }) => ({ resourceId: r, start, end, cost })),
      }));
      return { result, reach };
    });
    return { stageId, horizonDays: SLOT_HORIZON_DAYS, kinds: kindSlots };
  }

  /**
   * The engine's auto-place over the jobs' unbooked stages (the planner's search within
   * `budgetMs`). `progress` hears how far it has got, at most every {@link PROGRESS_EVERY_MS}.
   * A job of another firm → 404.
   */
  async autoPlace(
    actor: Actor,
    input: AutoPlaceRequest,
    progress?: (info: Omit<PlanProgress, 'planId'>) => void,
  ): Promise<AutoPlaceAnswer> {
    const found = new Set(
      (await scoped(Job, actor).whereIn('jobs.id', input.jobIds).select('jobs.id')).map((j) => String(j.id)),
    );
    if (input.jobIds.some((id) => !found.has(id))) throw new NotFoundError('job');
    let last = 0;
    // Wall-clock throttling of the reports only: the plan itself never depends on time.
    const onProgress =
      progress &&
      ((p: EngineProgress) => {
        const t = Date.now();
        if (t - last < PROGRESS_EVERY_MS && p.phase === 'search') return;
        last = t;
        progress({ phase: p.phase, schedules: p.schedules, used: p.used });
      });
    const result = await this.onCompleteData(actor, input.jobIds, AUTO_PLACE_HORIZON_DAYS, (data) => {
      const placed = autoPlace(toEngineBoard(data), {
        now: data.now,
        jobIds: input.jobIds,
        horizonDays: AUTO_PLACE_HORIZON_DAYS,
        ...(input.budgetMs !== undefined ? { budgetMs: input.budgetMs } : {}),
        ...(onProgress ? { onProgress } : {}),
      });
      return { result: placed, reach: Math.max(data.now, ...placed.bookings.map((b) => b.end)) };
    });
    return { ...result, horizonDays: AUTO_PLACE_HORIZON_DAYS };
  }

  /**
   * Runs `run` on the board read from today to past the horizon, with every booking in that span
   * (and every booking of the named jobs, whenever it is). The engine's answer is trustworthy
   * where all the bookings it could meet were read: a proposal ending after the span read means
   * the search went further (a first possible start far ahead), so the span grows and the search
   * runs again. Ends at the last day the write path accepts a booking, beyond which nothing exists.
   */
  private async onCompleteData<T>(
    actor: Actor,
    jobIds: string[],
    horizonDays: number,
    run: (data: BoardData) => Run<T>,
  ): Promise<T> {
    const now = this.now();
    const last = now + this.limits.futureDays * DAY;
    // From a day back: a booking running now still takes its resource.
    const from = now - DAY;
    let to = Math.min(last, now + (horizonDays + FIRST_READ_MARGIN_DAYS) * DAY);
    for (;;) {
      const data = await loadBoard(this.knex, actor, { from, to, jobIds, now });
      const { result, reach } = run(data);
      if (reach <= to || to >= last) return result;
      to = Math.min(last, reach + horizonDays * DAY);
    }
  }
}

function wrongKind(
  field: 'resourceId' | 'resourceKind',
  what: string,
  stageName: string,
  needs: string[],
): BadRequestError {
  const wanted = needs.length ? needs.map((k) => k.replace(/_/g, ' ')).join(', ') : 'nothing';
  return new BadRequestError(`'${stageName}' needs ${wanted}.`, [
    { field, message: `${what} '${stageName}' needs (it needs ${wanted})` },
  ]);
}
