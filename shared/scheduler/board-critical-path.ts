import { spanEnd, spanStart, stageCalendarOf, type BoardIndex, type DepLink, type StageInfo } from './board-index.js';
import { addWorkingMinutes, nextWorkingInstant, workingMinutesBetween, type CompiledCalendar } from './calendar.js';
import type { BookingsOf } from './checks/violation.js';
import { cureRelease, releaseInstant } from './cure.js';
import { SchedulerError } from './errors.js';
import { applyLag, reverseLag } from './lag.js';
import { DAY_MS } from './time-zone.js';
import type { CureRule, Instant } from './types.js';

/**
 * Early and late times of one stage. Times are instants (epoch ms) found by calendar arithmetic;
 * floats are working minutes on the stage's own calendar.
 */
export interface StageTiming {
  stageId: string;
  booked: boolean;
  calendarId: string;
  durationMinutes: number;
  es: Instant;
  ef: Instant;
  ls: Instant;
  lf: Instant;
  totalFloatMinutes: number;
  freeFloatMinutes: number;
  critical: boolean;
}

/** Critical path of one job. */
export interface JobCriticalPath {
  jobId: string;
  start: Instant;
  finish: Instant;
  promisedBy: Instant | null;
  /** Elapsed milliseconds past the promised date (0 when on time or no promise). */
  lateByMs: number;
  /** Least total float of the job's stages, working minutes (negative = late by that much work). */
  floatMinutes: number;
  /** Critical stages (least total float) in dependency order. */
  criticalStageIds: string[];
  /** Every stage of the job in dependency order. */
  stages: StageTiming[];
}

/** Options for {@link jobCriticalPath} and {@link boardCriticalPath}. */
export interface JobCriticalPathOptions {
  /** Bookings to use instead of the index's (e.g. with a move applied). */
  bookingsOf?: BookingsOf;
}

const TOLERANCE_MINUTES = 0.5;

/**
 * The same number, as a small integer where it is one (not -0). Minutes come out of float
 * arithmetic; stored as they are, every timing held three more boxed numbers on the heap (the
 * output's 20,000 timings are most of what the collector has to move).
 */
function small(minutes: number): number {
  return minutes === (minutes | 0) && (minutes !== 0 || 1 / minutes > 0) ? minutes | 0 : minutes;
}

/** Per-stage numbers of one run, in typed arrays indexed by StageInfo.idx (no per-stage objects). */
interface Work {
  es: Float64Array;
  ef: Float64Array;
  ls: Float64Array;
  lf: Float64Array;
  d: Float64Array;
  /** Elapsed days of cure after the stage (0 without a cure rule); counted only on links that wait for it. */
  cure: Float64Array;
  booked: Uint8Array;
  /** 1 + position of the stage's job in `jobs`, 0 when the stage is not in this run. */
  job: Int32Array;
  /**
   * Each stage's calendar as a position in `cals`: a list of 20,000 calendars would be allocated
   * in large-object space on every run, a typed array of numbers is not.
   */
  calNo: Int32Array;
  cals: CompiledCalendar[];
}

interface JobWork {
  jobId: string;
  promisedBy: Instant | null;
  /** Stages in dependency order. */
  stages: StageInfo[];
}

function run(index: BoardIndex, jobs: JobWork[], w: Work): JobCriticalPath[] {
  const out: JobCriticalPath[] = new Array<JobCriticalPath>(jobs.length);
  const { es, ef } = w;
  // Plain indexed loops, no closure or iterator per job, stage or link: this runs over every stage
  // of the board, and what it leaves behind besides the timings is garbage to collect. Each pass is
  // a function of its own, optimised with its own inlining budget: as one function, most of the
  // calendar arithmetic of the later passes was left as calls.
  for (let j = 0; j < jobs.length; j++) {
    const job = jobs[j] as JobWork;
    const list = job.stages;
    const me = j + 1;
    forwardPass(index.now, list, me, w);
    let start = Number.POSITIVE_INFINITY,
      finish = Number.NEGATIVE_INFINITY;
    for (let k = 0; k < list.length; k++) {
      const i = (list[k] as StageInfo).idx;
      if ((es[i] as number) < start) start = es[i] as number;
      if ((ef[i] as number) > finish) finish = ef[i] as number;
    }
    if (list.length === 0) start = finish = index.now;
    const end = job.promisedBy ?? finish;
    backwardPass(list, me, end, w);
    const timings: StageTiming[] = new Array<StageTiming>(list.length);
    const minFloat = timingsOf(list, me, end, w, timings);
    const critical: string[] = [];
    for (let k = 0; k < timings.length; k++) {
      const t = timings[k] as StageTiming;
      t.critical = t.totalFloatMinutes <= minFloat + TOLERANCE_MINUTES;
      if (t.critical) critical.push(t.stageId);
    }
    out[j] = {
      jobId: job.jobId,
      start,
      finish,
      promisedBy: job.promisedBy,
      lateByMs: job.promisedBy === null ? 0 : Math.max(0, finish - job.promisedBy),
      floatMinutes: timings.length === 0 ? 0 : minFloat,
      criticalStageIds: critical,
      stages: timings,
    };
  }
  return out;
}

/** Early start and finish of a job's unbooked stages (booked ones sit where they are booked). */
function forwardPass(now: number, list: readonly StageInfo[], me: number, w: Work): void {
  const { es, ef, d, cure, booked, job: jobOf, calNo, cals } = w;
  for (let k = 0; k < list.length; k++) {
    const x = list[k] as StageInfo;
    const i = x.idx;
    if (booked[i] === 1) continue;
    const c = cals[calNo[i] as number] as CompiledCalendar;
    const di = d[i] as number;
    let t = now;
    const depsIn = x.depsIn;
    for (let n = 0; n < depsIn.length; n++) {
      const l = depsIn[n] as DepLink;
      const p = l.from.idx;
      if (jobOf[p] !== me) continue;
      const dep = l.dep;
      const anchor = (dep.type === 'FS' || dep.type === 'FF' ? ef[p] : es[p]) as number;
      const bound = applyLag(c, anchor, dep.lag);
      const b = dep.type === 'FS' || dep.type === 'SS' ? bound : addWorkingMinutes(c, bound, -di);
      if (b > t) t = b;
      const cp = cure[p] as number;
      if (cp > 0 && dep.waitsForCure === true) t = Math.max(t, releaseInstant(ef[p] as number, cp));
    }
    const start = di > 0 ? nextWorkingInstant(c, t) : t;
    es[i] = start;
    ef[i] = addWorkingMinutes(c, start, di);
  }
}

/** Late start and finish of every stage of a job, from `end` (the promised date or the finish) back. */
function backwardPass(list: readonly StageInfo[], me: number, end: number, w: Work): void {
  const { ls, lf, d, cure, job: jobOf, calNo, cals } = w;
  for (let k = list.length - 1; k >= 0; k--) {
    const x = list[k] as StageInfo;
    const i = x.idx;
    const c = cals[calNo[i] as number] as CompiledCalendar;
    const di = d[i] as number;
    let latest = end;
    const depsOut = x.depsOut;
    for (let n = 0; n < depsOut.length; n++) {
      const l = depsOut[n] as DepLink;
      const s = l.to.idx;
      if (jobOf[s] !== me) continue;
      const dep = l.dep;
      const subject = (dep.type === 'FS' || dep.type === 'SS' ? ls[s] : lf[s]) as number;
      const back = reverseLag(cals[calNo[s] as number] as CompiledCalendar, subject, dep.lag);
      const b = dep.type === 'FS' || dep.type === 'FF' ? back : addWorkingMinutes(c, back, di);
      if (b < latest) latest = b;
      const ci = cure[i] as number;
      if (ci > 0 && dep.waitsForCure === true) latest = Math.min(latest, (ls[s] as number) - ci * DAY_MS);
    }
    lf[i] = latest;
    ls[i] = di > 0 ? addWorkingMinutes(c, latest, -di) : latest;
  }
}

/**
 * Each stage's timing into `timings` (not yet marked critical); returns the least total float
 * (+Infinity for no stages).
 */
function timingsOf(list: readonly StageInfo[], me: number, end: number, w: Work, timings: StageTiming[]): number {
  const { es, ef, ls, lf, d, cure, booked, job: jobOf, calNo, cals } = w;
  let minFloat = Number.POSITIVE_INFINITY;
  for (let k = 0; k < list.length; k++) {
    const x = list[k] as StageInfo;
    const i = x.idx;
    const c = cals[calNo[i] as number] as CompiledCalendar;
    let free = workingMinutesBetween(c, ef[i] as number, end);
    const depsOut = x.depsOut;
    for (let n = 0; n < depsOut.length; n++) {
      const l = depsOut[n] as DepLink;
      const s = l.to.idx;
      if (jobOf[s] !== me) continue;
      const dep = l.dep;
      const subject = (dep.type === 'FS' || dep.type === 'SS' ? es[s] : ef[s]) as number;
      const own = (dep.type === 'FS' || dep.type === 'FF' ? ef[i] : es[i]) as number;
      const succCal = cals[calNo[s] as number] as CompiledCalendar;
      free = Math.min(free, workingMinutesBetween(c, own, reverseLag(succCal, subject, dep.lag)));
      const ci = cure[i] as number;
      if (ci > 0 && dep.waitsForCure === true)
        free = Math.min(free, workingMinutesBetween(c, ef[i] as number, (es[s] as number) - ci * DAY_MS));
    }
    const total = workingMinutesBetween(c, es[i] as number, ls[i] as number);
    if (total < minFloat) minFloat = total;
    timings[k] = {
      stageId: x.stage.id,
      booked: booked[i] === 1,
      calendarId: c.source.id,
      durationMinutes: small(d[i] as number),
      es: es[i] as number,
      ef: ef[i] as number,
      ls: ls[i] as number,
      lf: lf[i] as number,
      totalFloatMinutes: small(total),
      freeFloatMinutes: small(free),
      critical: false,
    };
  }
  return minFloat;
}

const cureDaysCache = new WeakMap<CureRule, number>();

const byJobCache = new WeakMap<BoardIndex, Map<string, StageInfo[]>>();

/** Each job's stages in dependency order, worked out once per index. */
function stagesByJob(index: BoardIndex): Map<string, StageInfo[]> {
  let m = byJobCache.get(index);
  if (m === undefined) {
    m = new Map();
    for (const info of index.order) {
      const l = m.get(info.stage.jobId);
      if (l === undefined) m.set(info.stage.jobId, [info]);
      else l.push(info);
    }
    byJobCache.set(index, m);
  }
  return m;
}

function prepare(
  index: BoardIndex,
  wanted: ((jobId: string) => boolean) | string,
  bookingsOfOpt?: BookingsOf,
): { jobs: JobWork[]; work: Work } {
  const skip = new Set<string>();
  for (const id of index.blocked) {
    const j = index.stages.get(id)?.stage.jobId;
    if (j !== undefined) skip.add(j);
  }
  const n = index.stageList.length;
  const w: Work = {
    es: new Float64Array(n),
    ef: new Float64Array(n),
    ls: new Float64Array(n),
    lf: new Float64Array(n),
    d: new Float64Array(n),
    cure: new Float64Array(n),
    booked: new Uint8Array(n),
    job: new Int32Array(n),
    calNo: new Int32Array(n),
    cals: [],
  };
  const calPos = new Map<CompiledCalendar, number>();
  const jobPos = new Map<string, number>();
  const jobs: JobWork[] = [];
  let lastId = '',
    lastPos = -1;
  const source = typeof wanted === 'string' ? (stagesByJob(index).get(wanted) ?? []) : index.order;
  for (const info of source) {
    const stage = info.stage;
    if (skip.size > 0 && skip.has(stage.jobId)) continue;
    if (typeof wanted !== 'string' && !wanted(stage.jobId)) continue;
    let pos = stage.jobId === lastId ? lastPos : jobPos.get(stage.jobId);
    if (pos === undefined) {
      pos = jobs.length;
      jobs.push({ jobId: stage.jobId, promisedBy: index.jobs.get(stage.jobId)?.promisedBy ?? null, stages: [] });
      jobPos.set(stage.jobId, pos);
    }
    lastId = stage.jobId;
    lastPos = pos;
    const i = info.idx;
    const own = bookingsOfOpt === undefined ? info.bookings : bookingsOfOpt(stage.id);
    const c = stageCalendarOf(index, stage.id, own);
    let no = calPos.get(c);
    if (no === undefined) {
      no = w.cals.length;
      w.cals.push(c);
      calPos.set(c, no);
    }
    w.calNo[i] = no;
    w.job[i] = pos + 1;
    if (stage.cure) {
      let days = cureDaysCache.get(stage.cure);
      if (days === undefined) {
        days = cureRelease(0, stage.cure).elapsedDays;
        cureDaysCache.set(stage.cure, days);
      }
      w.cure[i] = days;
    }
    if (own.length > 0) {
      const a = spanStart(own),
        b = spanEnd(own);
      w.booked[i] = 1;
      w.es[i] = a;
      w.ef[i] = b;
      w.d[i] = workingMinutesBetween(c, a, b);
    } else {
      w.d[i] = stage.durationMinutes;
    }
    (jobs[pos] as JobWork).stages.push(info);
  }
  return { jobs, work: w };
}

/**
 * Critical path of one job. Booked stages sit where they are booked (duration = booked working
 * time); unbooked stages start as early as their predecessors and `now` allow, lasting
 * durationMinutes. The backward pass runs from the promised date when there is one (so late jobs
 * show negative float), otherwise from the job's finish. Links to other jobs are ignored.
 * Throws SchedulerError('cycle') when the job's stages wait for each other in a circle.
 *
 * @example
 * const cp = jobCriticalPath(createBoardIndex(board, { now }), 'job-1')
 * cp.criticalStageIds // ['survey-1', 'excavation-1', 'base-1', 'lift-1', …]
 */
export function jobCriticalPath(
  index: BoardIndex,
  jobId: string,
  options: JobCriticalPathOptions = {},
): JobCriticalPath {
  for (const id of index.blocked) {
    if (index.stages.get(id)?.stage.jobId === jobId) {
      throw new SchedulerError('cycle', `The stages of job ${jobId} wait for each other in a circle`, {
        cycles: index.cycles,
      });
    }
  }
  const { jobs, work } = prepare(index, jobId, options.bookingsOf);
  const result = run(index, jobs, work)[0];
  if (result !== undefined) return result;
  const promisedBy = index.jobs.get(jobId)?.promisedBy ?? null;
  return {
    jobId,
    start: index.now,
    finish: index.now,
    promisedBy,
    lateByMs: 0,
    floatMinutes: 0,
    criticalStageIds: [],
    stages: [],
  };
}

/**
 * Critical paths of every job on the board, one pass in dependency order (jobs whose stages are
 * in or behind a cycle are left out: the cycle is reported as a violation instead).
 *
 * @example
 * boardCriticalPath(index).filter(j => j.lateByMs > 0) // late jobs
 */
export function boardCriticalPath(index: BoardIndex, options: JobCriticalPathOptions = {}): JobCriticalPath[] {
  const { jobs, work } = prepare(index, () => true, options.bookingsOf);
  return run(index, jobs, work);
}
