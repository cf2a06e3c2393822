import { bookingsOfStage, createBoardIndex } from './board-index.js';
import { boardCriticalPath } from './board-critical-path.js';
import { buildPlanModel } from './planner/model.js';
import {
  comparePlanCosts,
  firstPossibleStart,
  laterThanKept,
  placeStages,
  planCosts,
  type Before,
} from './planner/place.js';
import { searchPlans, WORK_PER_MS, type SearchProgress } from './planner/search.js';
import type { Board, BoardOptions, Booking, Instant, Stage } from './types.js';

/** What the planner reports while it works (see {@link AutoPlaceOptions.onProgress}). */
export interface AutoPlaceProgress extends SearchProgress {
  phase: 'single-pass' | 'search' | 'placing';
}

/** Options for {@link autoPlace}. */
export interface AutoPlaceOptions extends BoardOptions {
  /** Jobs whose unscheduled stages to place; default every job on the board. */
  jobIds?: string[];
  /** How far ahead of each stage's first possible start to look, in days (default 180). */
  horizonDays?: number;
  /**
   * How long the planner may search, in milliseconds of the reference machine (default 300 for
   * one job, 2000 for several or the whole board; 0 = the single pass alone). The budget is
   * counted in work, not read from a clock, so the same board, seed and budget give the same plan
   * everywhere; on a slower machine it takes longer.
   */
  budgetMs?: number;
  /** Seed of the search's random choices (default 1). */
  seed?: number;
  /** Called now and then with how far the search has got. */
  onProgress?: (info: AutoPlaceProgress) => void;
  /**
   * Finishes to keep, by job id: re-planning work already on the board should not make a job
   * finish later than the householder was told. A plan that does is worse than any that doesn't
   * (fewer such jobs first, then fewer minutes later), before every other cost.
   */
  notLaterThan?: Readonly<Record<string, Instant>>;
}

/** A stage the engine placed. */
export interface PlacedStage {
  stageId: string;
  start: Instant;
  end: Instant;
  resourceIds: string[];
}

/** A stage the engine could not place, and why, in plain words. */
export interface UnplacedStage {
  stageId: string;
  reason: string;
}

/**
 * What a plan costs, in the order plans are compared: stages it couldn't place, jobs past their
 * promised date and the total minutes they are late, the sum of the planned jobs' finishes (minutes
 * from now), idle paid hire on the machines of the kinds placed (pence), and changes of crew
 * within a job.
 */
export interface PlanCosts {
  unplacedStages: number;
  lateJobs: number;
  latenessMinutes: number;
  finishMinutes: number;
  idleHirePence: number;
  crewChanges: number;
}

export interface AutoPlaceResult {
  /** New pencilled bookings, in the order they were made. */
  bookings: Booking[];
  placed: PlacedStage[];
  unplaced: UnplacedStage[];
  /** Stage ids in the order the scheme took them. */
  order: string[];
  /** What this plan costs. */
  costs: PlanCosts;
  /**
   * Which plan won: the single pass, or another candidate (never worse than the single pass, first
   * on the finishes to keep when `notLaterThan` is given, then by its costs).
   */
  source: 'single-pass' | 'search';
}

interface Priority {
  float: number;
  promised: number;
  id: string;
}

function better(a: Priority, b: Priority): boolean {
  if (a.float !== b.float) return a.float < b.float;
  if (a.promised !== b.promised) return a.promised < b.promised;
  return a.id < b.id;
}

/**
 * Places the unscheduled stages (no active booking) of one or more jobs. First the single pass
 * (serial schedule-generation: repeatedly, among stages whose predecessors all have bookings, the
 * one with the least total float, then the earliest promised date, then the smallest id, at the
 * earliest start where every requirement gets enough resources and no error check fails). Then,
 * within `budgetMs`, the planner searches a quick model of the same stages (priority rules,
 * regret-biased sampling, forward–backward improvement, a genetic search over stage orders; see
 * planner/) and places its best orders for real with the same engine checks. The plan kept is
 * the best by {@link PlanCosts}, so never worse than the single pass (with `notLaterThan`, jobs
 * finishing later than kept are counted first). Starts land on the booking
 * step (`bookingStepMinutes`, local time) and, for a stage that must be done within one working
 * day, where it fits in one. Existing bookings never move. Deterministic: same board, seed and
 * budget, same answer.
 *
 * @example
 * const { bookings, unplaced, costs } = autoPlace(board, { now, jobIds: ['job-7'] })
 * // bookings: new pencilled bookings to save; unplaced: [{ stageId, reason }]; costs.lateJobs: 0
 */
export function autoPlace(board: Board, options: AutoPlaceOptions): AutoPlaceResult {
  const keep = options.notLaterThan;
  // A finish to keep is planned for as a promise (the priority rule, the quick model and the costs
  // all aim at it); the result's costs are read against the real promises at the end.
  const planned =
    keep === undefined
      ? board
      : {
          ...board,
          jobs: board.jobs.map((j) =>
            keep[j.id] === undefined
              ? j
              : { ...j, promisedBy: Math.min(j.promisedBy ?? Number.POSITIVE_INFINITY, keep[j.id] as Instant) },
          ),
        };
  const index = createBoardIndex(planned, options);
  const jobIds = new Set(options.jobIds ?? board.jobs.map((j) => j.id));
  const horizonDays = options.horizonDays ?? 180;
  const inCycle = new Set(index.cycles.flat());
  const floats = new Map<string, number>();
  for (const jp of boardCriticalPath(index)) for (const s of jp.stages) floats.set(s.stageId, s.totalFloatMinutes);
  const early: AutoPlaceResult['unplaced'] = [];
  const pending: Stage[] = [];
  for (const s of board.stages) {
    if (!jobIds.has(s.jobId)) continue;
    if (bookingsOfStage(index, s.id).length > 0) continue;
    if (inCycle.has(s.id)) {
      early.push({ stageId: s.id, reason: 'It waits for itself through a circle of dependencies' });
      continue;
    }
    if (s.requirements.length === 0) {
      early.push({ stageId: s.id, reason: 'It needs no crew or machine, so there is nothing to book' });
      continue;
    }
    pending.push(s);
  }
  const priority = (s: Stage): Priority => ({
    float: floats.get(s.id) ?? 0,
    promised: index.jobs.get(s.jobId)?.promisedBy ?? Number.POSITIVE_INFINITY,
    id: s.id,
  });
  // Jobs finishing later than `keep` says, then by how many minutes: compared before every cost.
  const laterOf = (): [number, number] => (keep === undefined ? [0, 0] : laterThanKept(index, pending, keep));
  /** The plan's costs against the jobs' own promises, where finishes to keep stood in for them. */
  const withRealCosts = (r: AutoPlaceResult): AutoPlaceResult => {
    if (keep === undefined) return r;
    const real = createBoardIndex({ ...board, bookings: [...board.bookings, ...r.bookings] }, options);
    return { ...r, costs: planCosts(real, pending, r.unplaced.length) };
  };
  const single = placeStages(index, pending, horizonDays, (a, b) => better(priority(a), priority(b)));
  let best: AutoPlaceResult = {
    bookings: single.bookings,
    placed: single.placed,
    unplaced: [...early, ...single.unplaced],
    order: single.order,
    costs: planCosts(index, pending, early.length + single.unplaced.length),
    source: 'single-pass',
  };
  let bestLater = laterOf();
  single.undo();
  /** Keeps a placement (its bookings still in the index) when it beats the best so far. */
  const consider = (tried: ReturnType<typeof placeStages>): void => {
    const costs = planCosts(index, pending, early.length + tried.unplaced.length);
    const later = laterOf();
    if ((later[0] - bestLater[0] || later[1] - bestLater[1] || comparePlanCosts(costs, best.costs)) < 0) {
      best = {
        bookings: tried.bookings,
        placed: tried.placed,
        unplaced: [...early, ...tried.unplaced],
        order: tried.order,
        costs,
        source: 'search',
      };
      bestLater = later;
    }
  };
  if (keep !== undefined && bestLater[0] > 0) {
    // The promised dates first, as the office books job by job: what was told is kept where it can be.
    const promisedFirst = placeStages(index, pending, horizonDays, (a, b) => {
      const pa = priority(a),
        pb = priority(b);
      return pa.promised !== pb.promised ? pa.promised < pb.promised : better(pa, pb);
    });
    consider(promisedFirst);
    promisedFirst.undo();
  }
  const budget = options.budgetMs ?? ((options.jobIds?.length ?? 2) > 1 ? 2000 : 300);
  options.onProgress?.({ phase: 'single-pass', schedules: 1, used: 0, best: [] });
  if (budget <= 0 || pending.length < 2) return withRealCosts(best);

  const starts = new Map(pending.map((s) => [s.id, firstPossibleStart(index, s)]));
  const model = buildPlanModel(index, pending, (s) => starts.get(s.id) ?? index.now);
  const pos = new Map(pending.map((s, i) => [s.id, i]));
  const singleList = single.order.map((id) => pos.get(id) as number);
  const candidates = searchPlans(model, {
    seed: options.seed ?? 1,
    workLimit: budget * WORK_PER_MS,
    seedLists: [singleList],
    onProgress: (p) => options.onProgress?.({ phase: 'search', ...p }),
  });
  // Each of the best orders placed for real; stop once the engine agrees with the quick model.
  for (const c of candidates) {
    options.onProgress?.({ phase: 'placing', schedules: 0, used: 1, best: c.cost });
    const rank = new Map(c.list.map((j, i) => [(pending[j] as Stage).id, i]));
    const before: Before = (a, b) => (rank.get(a.id) ?? 0) < (rank.get(b.id) ?? 0);
    const tried = placeStages(index, pending, horizonDays, before, { keepCrew: true });
    consider(tried);
    tried.undo();
    if (
      tried.unplaced.length === 0 &&
      c === candidates[0] &&
      matchesModel(model.unitMinutes, c.start, tried.placed, pending, index.now)
    )
      break;
  }
  return withRealCosts(best);
}

/** True when every stage was placed where the quick model put it (the model was exact here). */
function matchesModel(
  unitMinutes: number,
  start: Int32Array,
  placed: readonly { stageId: string; start: Instant }[],
  pending: readonly Stage[],
  now: Instant,
): boolean {
  const at = new Map(placed.map((p) => [p.stageId, p.start]));
  return pending.every((s, j) => at.get(s.id) === now + (start[j] as number) * unitMinutes * 60_000);
}
