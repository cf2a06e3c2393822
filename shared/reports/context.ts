import { ELSEWHERE_JOB_ID, toEngineBoard, type BoardBooking, type BoardData, type BoardJob, type BoardResource } from '../board-data.ts';
import { boardCriticalPath, boardViolations, createBoardIndex, type BoardIndex, type JobCriticalPath, type Violation } from '../scheduler/index.ts';
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
export function reportContext(data: BoardData, range: ReportRange, options: { criticalPath?: boolean } = {}): ReportContext {
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
    data, range, index, violations: boardViolations(index), criticalPaths,
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
    text = text.split(label.charAt(0).toUpperCase() + label.slice(1)).join(r.name).split(label).join(r.name);
    if (id === v.details?.personId) text = text.replace(new RegExp(`^${id} `), `${r.name} `);
  }
  return text;
}

/**
 * A link to the board on one day: at a job (its bookings are picked out) or at a resource (its
 * row found by name). The board reads ?view=&date=&job=&q=.
 *
 * @example
 * boardLink('2026-06-09', { jobId: '14' }) // '/board?view=day&date=2026-06-09&job=14'
 */
export function boardLink(date: string, at: { jobId?: string; resourceName?: string }): string {
  const q = new URLSearchParams({ view: 'day', date });
  if (at.jobId) q.set('job', at.jobId);
  else if (at.resourceName) q.set('q', at.resourceName);
  return `/board?${q.toString()}`;
}

export function dateIn(ctx: ReportContext, instant: number): string {
  return localDate(instant, ctx.range.timeZone);
}
