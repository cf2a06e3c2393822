import {
  ELSEWHERE_JOB_ID,
  toEngineBoard,
  type BoardBooking,
  type BoardData,
  type BoardJob,
  type BoardResource,
} from '../board-data.ts';
import {
  boardCriticalPath,
  boardViolations,
  createBoardIndex,
  type BoardIndex,
  type JobCriticalPath,
  type Violation,
} from '../scheduler/index.ts';
import type { ReportRange } from './types.ts';
import { localDate } from './weeks.ts';

/** The loaded board analysed once, shared by every report (the same engine calls as the board's). */
export interface ReportContext {
  data: BoardData;
  range: ReportRange;
  index: BoardIndex;
  violations: Violation[];
  criticalPaths: JobCriticalPath[];
  resources: Map<string, BoardResource>;
  jobs: Map<string, BoardJob>;
  bookings: Map<string, BoardBooking>;
}

/**
 * Builds the engine index over the loaded board and runs the full check and critical path.
 *
 * @example
 * const ctx = reportContext(await loadBoard(knex, actor, q), { from, to, now, timeZone: 'Europe/London' })
 */
export function reportContext(
  data: BoardData,
  range: ReportRange,
  options: { criticalPath?: boolean } = {},
): ReportContext {
  const index = createBoardIndex(toEngineBoard(data), { now: range.now });
  let criticalPaths: JobCriticalPath[] = [];
  if (options.criticalPath !== false) {
    try {
      criticalPaths = boardCriticalPath(index);
    } catch {
      criticalPaths = []; // a cycle on the board: the checks still report it
    }
  }
  return {
    data,
    range,
    index,
    violations: boardViolations(index),
    criticalPaths,
    resources: new Map(data.resources.map((r) => [r.id, r])),
    jobs: new Map(data.jobs.map((j) => [j.id, j])),
    bookings: new Map(data.bookings.map((b) => [b.id, b])),
  };
}

/** True for the placeholder stage, job or booking that stands for another installer's work. */
export function isElsewhere(ctx: ReportContext, ids: { stageId?: string; bookingId?: string }): boolean {
  if (ids.stageId !== undefined) {
    const stage = ctx.index.stages.get(ids.stageId)?.stage;
    return stage === undefined || stage.jobId === ELSEWHERE_JOB_ID;
  }
  if (ids.bookingId !== undefined) return ctx.bookings.get(ids.bookingId)?.elsewhere === true;
  return false;
}

/** The reader's own job of a stage, or undefined (another installer's, or unknown). */
export function jobOfStage(ctx: ReportContext, stageId: string): BoardJob | undefined {
  const jobId = ctx.index.stages.get(stageId)?.stage.jobId;
  if (jobId === undefined || jobId === ELSEWHERE_JOB_ID) return undefined;
  return ctx.jobs.get(jobId);
}

export function resourceName(ctx: ReportContext, resourceId: string): string {
  return ctx.resources.get(resourceId)?.name ?? 'A resource';
}

/**
 * The engine names resources as "the crane (12)"; reports use the resource's own name, and a
 * person by their name rather than their id.
 *
 * @example
 * namedMessage(ctx, v) // "25 t city crane is booked for both 'Lift' and 'Lift' from …"
 */
export function namedMessage(ctx: ReportContext, v: Violation): string {
  let text = v.message;
  const ids = new Set([...v.resourceIds, ...(typeof v.details?.personId === 'string' ? [v.details.personId] : [])]);
  for (const id of ids) {
    const r = ctx.resources.get(id);
    if (r === undefined) continue;
    const label = `the ${r.kind.replace(/_/g, ' ')} (${r.id})`;
    text = text
      .split(label.charAt(0).toUpperCase() + label.slice(1))
      .join(r.name)
      .split(label)
      .join(r.name);
    if (id === v.details?.personId) text = text.replace(new RegExp(`^${id} `), `${r.name} `);
  }
  return text;
}

/** Where a board link points: a job's bookings, or a resource's row with bookings and a hire picked out. */
export interface BoardLinkTarget {
  /** Filters the board to one job's bookings (a job's own problems, never a clash: it hides the other side). */
  jobId?: string;
  /** Finds the resource's row by name (the board's row search), keeping every booking on it. */
  resourceName?: string;
  /** The reader's own bookings the board outlines (both sides of a clash). */
  highlight?: readonly string[];
  /** A hire period the board draws on the machine's row. */
  hireId?: string;
  view?: 'day' | 'week' | 'month';
}

/**
 * A link to the board on a day: at a job (its bookings only), or at a resource's row with the
 * bookings of a problem outlined and a hire period drawn. The board reads
 * ?view=&date=&job=&q=&highlight=&hire=.
 *
 * @example
 * boardLink('2026-06-09', { jobId: '14' }) // '/board?view=day&date=2026-06-09&job=14'
 * boardLink('2026-06-25', { resourceName: 'Crew Finch', highlight: ['31', '32'] }) // '/board?view=day&date=2026-06-25&q=Crew+Finch&highlight=31%2C32'
 */
export function boardLink(date: string, at: BoardLinkTarget): string {
  const q = new URLSearchParams({ view: at.view ?? 'day', date });
  if (at.jobId) q.set('job', at.jobId);
  else if (at.resourceName) q.set('q', at.resourceName);
  if (at.highlight?.length) q.set('highlight', at.highlight.join(','));
  if (at.hireId) q.set('hire', at.hireId);
  return `/board?${q.toString()}`;
}

export function dateIn(ctx: ReportContext, instant: number): string {
  return localDate(instant, ctx.range.timeZone);
}
