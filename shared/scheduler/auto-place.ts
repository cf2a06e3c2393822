import { bookingsOfStage, compareBookings, createBoardIndex, resourceCalendarOf, stageCalendarOf, type BoardIndex } from './board-index.js';
import { boardCriticalPath } from './board-critical-path.js';
import { bookableStart, mustFitInOneDay } from './booking-step.js';
import { addWorkingMinutes, isWorkingInstant } from './calendar.js';
import { overlappingOnResource } from './checks/clash.js';
import { capitalise, makeViolation, resourceLabel } from './checks/violation.js';
import { formatInstant } from './format.js';
import { checkStageBookings } from './check-move.js';
import { leadTimeEarliest } from './checks/lead-time.js';
import { earliestStartFromPredecessors } from './checks/order.js';
import type { BookingsOf } from './checks/violation.js';
import { laterCannotHelp, nextCandidate } from './slot-finder.js';
import { DAY_MS } from './time-zone.js';
import type { Board, BoardOptions, Booking, Instant, Resource, Stage, Violation } from './types.js';

/** Options for {@link autoPlace}. */
export interface AutoPlaceOptions extends BoardOptions {
  /** Jobs whose unscheduled stages to place; default every job on the board. */
  jobIds?: string[];
  /** How far ahead of each stage's first possible start to look, in days (default 180). */
  horizonDays?: number;
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

export interface AutoPlaceResult {
  /** New pencilled bookings, in the order they were made. */
  bookings: Booking[];
  placed: PlacedStage[];
  unplaced: UnplacedStage[];
  /** Stage ids in the order the scheme took them. */
  order: string[];
}

interface Priority { float: number; promised: number; id: string }

function better(a: Priority, b: Priority): boolean {
  if (a.float !== b.float) return a.float < b.float;
  if (a.promised !== b.promised) return a.promised < b.promised;
  return a.id < b.id;
}

function insertBooking(index: BoardIndex, b: Booking): void {
  const info = index.stages.get(b.stageId);
  if (info !== undefined) info.bookings = [...info.bookings, b].sort((x, y) => (x.id < y.id ? -1 : 1));
  let rb = index.bookingsByResource.get(b.resourceId);
  if (rb === undefined) { rb = { list: [], maxLength: 0 }; index.bookingsByResource.set(b.resourceId, rb); }
  const list = rb.list;
  let lo = 0, hi = list.length;
  while (lo < hi) {
    const mid = (lo + hi) >> 1;
    if (compareBookings(list[mid] as Booking, b) < 0) lo = mid + 1; else hi = mid;
  }
  list.splice(lo, 0, b);
  rb.maxLength = Math.max(rb.maxLength, b.end - b.start);
}

function candidatesFor(index: BoardIndex, kind: string, firmId: string | undefined): Resource[] {
  // The job's own firm first, owned before hired, then by id: cheapest and closest first.
  return (index.resourcesByKind.get(kind) ?? []).slice().sort((a, b) =>
    Number(a.firmId !== firmId) - Number(b.firmId !== firmId) || Number(a.hired === true) - Number(b.hired === true) || (a.id < b.id ? -1 : 1));
}

/** Tries every requirement at one start; returns the bookings or the refusals met. */
function tryAt(index: BoardIndex, stage: Stage, t: Instant, firmId: string, seq: { n: number }): { bookings: Booking[] | null; refusals: Violation[] } {
  const chosen: Booking[] = [];
  const refusals: Violation[] = [];
  for (const req of stage.requirements) {
    let got = 0;
    for (const r of candidatesFor(index, req.kind, index.jobs.get(stage.jobId)?.firmId)) {
      if (got >= req.count) break;
      if (chosen.some((b) => b.resourceId === r.id)) continue;
      const cal = resourceCalendarOf(index, r.id);
      // Cheap refusals first (not working, not on hire, already booked); the full check follows.
      if (!isWorkingInstant(cal, t)) continue;
      const end = addWorkingMinutes(cal, t, stage.durationMinutes);
      if (r.hired === true && !(index.hireByResource.get(r.id) ?? []).some((p) => p.onHire <= t && end <= p.offHire)) continue;
      const busy = overlappingOnResource(index, r.id, t, end, stage.id);
      if (busy.length > 0) {
        const until = Math.max(...busy.map((o) => o.end));
        refusals.push(makeViolation('clash', 'error', [stage.id], [r.id], [],
          `${capitalise(resourceLabel(index, r.id))} is busy until ${formatInstant(until, cal.timeZone)}`, { to: until }));
        continue;
      }
      const b: Booking = {
        id: `auto:${stage.id}:${seq.n + chosen.length}`, stageId: stage.id, resourceId: r.id, start: t,
        end: end > t ? end : t + 60_000, state: 'pencilled', installerFirmId: firmId,
      };
      const trial = [...chosen, b];
      const errs = checkStageBookings(index, stage.id, trial, { errorsOnly: true }).filter((v) => v.kind !== 'capacity');
      if (errs.length === 0) { chosen.push(b); got++; } else refusals.push(...errs);
    }
    if (got < req.count) return { bookings: null, refusals };
  }
  const final = checkStageBookings(index, stage.id, chosen, { errorsOnly: true });
  return final.length === 0 ? { bookings: chosen, refusals: [] } : { bookings: null, refusals: final };
}

/**
 * Places the unscheduled stages (no active booking) of one or more jobs with a serial
 * schedule-generation scheme: repeatedly take, among stages whose predecessors all have bookings,
 * the one with the least total float, then the earliest promised date, then the smallest id;
 * book it at the earliest start where every requirement gets enough resources and no error check
 * fails. Starts land on the booking step (`bookingStepMinutes`, local time) and, for a stage that
 * must be done within one working day, where it fits in one. Existing bookings never move.
 * Deterministic: same board, same answer.
 *
 * @example
 * const { bookings, unplaced } = autoPlace(board, { now, jobIds: ['job-7'] })
 * // bookings: new pencilled bookings to save; unplaced: [{ stageId, reason }]
 */
export function autoPlace(board: Board, options: AutoPlaceOptions): AutoPlaceResult {
  const index = createBoardIndex(board, options);
  const jobIds = new Set(options.jobIds ?? board.jobs.map((j) => j.id));
  const horizon = (options.horizonDays ?? 180) * DAY_MS;
  const inCycle = new Set(index.cycles.flat());
  const floats = new Map<string, number>();
  for (const jp of boardCriticalPath(index)) for (const s of jp.stages) floats.set(s.stageId, s.totalFloatMinutes);
  const pending = new Map<string, Stage>();
  const result: AutoPlaceResult = { bookings: [], placed: [], unplaced: [], order: [] };
  for (const s of board.stages) {
    if (!jobIds.has(s.jobId)) continue;
    if (bookingsOfStage(index, s.id).length > 0) continue;
    if (inCycle.has(s.id)) { result.unplaced.push({ stageId: s.id, reason: 'It waits for itself through a circle of dependencies' }); continue; }
    if (s.requirements.length === 0) { result.unplaced.push({ stageId: s.id, reason: 'It needs no crew or machine, so there is nothing to book' }); continue; }
    pending.set(s.id, s);
  }
  const failed = new Set<string>();
  const booked = (id: string): boolean => bookingsOfStage(index, id).length > 0;
  const bookingsOf: BookingsOf = (id) => bookingsOfStage(index, id);
  const seq = { n: 0 };
  while (pending.size > 0) {
    let best: Stage | undefined, bestP: Priority | undefined;
    let blocked: { stage: Stage; reason: string } | undefined;
    for (const s of pending.values()) {
      const preds = index.stages.get(s.id)?.depsIn ?? [];
      const waiting = preds.find((l) => !booked(l.from.stage.id));
      if (waiting !== undefined) {
        const p = waiting.from.stage.id;
        if (!pending.has(p) && blocked === undefined) {
          const name = index.stages.get(p)?.stage.name ?? p;
          blocked = { stage: s, reason: failed.has(p) ? `It waits for '${name}', which couldn't be placed` : `It waits for '${name}', which has no booking` };
        }
        continue;
      }
      const job = index.jobs.get(s.jobId);
      const prio: Priority = { float: floats.get(s.id) ?? 0, promised: job?.promisedBy ?? Number.POSITIVE_INFINITY, id: s.id };
      if (bestP === undefined || better(prio, bestP)) { best = s; bestP = prio; }
    }
    if (best === undefined) {
      if (blocked === undefined) break;
      pending.delete(blocked.stage.id);
      failed.add(blocked.stage.id);
      result.unplaced.push({ stageId: blocked.stage.id, reason: blocked.reason });
      continue;
    }
    const stage = best;
    pending.delete(stage.id);
    result.order.push(stage.id);
    const firmId = index.jobs.get(stage.jobId)?.firmId ?? '';
    const cal = stageCalendarOf(index, stage.id, []);
    const first = candidatesFor(index, stage.requirements[0]?.kind ?? '', firmId)[0];
    let t0 = options.now;
    if (first !== undefined) {
      const probe: Booking = { id: 'probe', stageId: stage.id, resourceId: first.id, start: t0, end: t0 + 1, state: 'pencilled', installerFirmId: firmId };
      t0 = Math.max(t0, earliestStartFromPredecessors(index, stage.id, first.id, bookingsOf), leadTimeEarliest(index, probe));
    }
    // Starts a person would book: on the step, and within one working day when the stage must be.
    const fit = mustFitInOneDay(stage, cal) ? { fitMinutes: stage.durationMinutes } : {};
    const at = (x: Instant): Instant => bookableStart(cal, x, { stepMinutes: index.stepMinutes, ...fit });
    let t = at(t0);
    const limit = t + horizon;
    let placed: Booking[] | null = null;
    let lastRefusals: Violation[] = [];
    while (t < limit) {
      const tried = tryAt(index, stage, t, firmId, seq);
      if (tried.bookings !== null) { placed = tried.bookings; break; }
      lastRefusals = tried.refusals;
      if (laterCannotHelp(stage.id, tried.refusals)) break;
      t = at(nextCandidate(cal, t, tried.refusals));
    }
    if (placed === null) {
      failed.add(stage.id);
      const why = lastRefusals[0]?.message ?? `no ${stage.requirements.map((r) => r.kind.replace(/_/g, ' ')).join(' and ')} on the board`;
      result.unplaced.push({ stageId: stage.id, reason: `No slot within ${options.horizonDays ?? 180} days; the last refusal: ${why}` });
      continue;
    }
    seq.n += placed.length;
    for (const b of placed) { insertBooking(index, b); result.bookings.push(b); }
    result.placed.push({ stageId: stage.id, start: t, end: Math.max(...placed.map((b) => b.end)), resourceIds: placed.map((b) => b.resourceId) });
  }
  return result;
}
