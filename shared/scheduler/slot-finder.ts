import { bookingsOfStage, resourceCalendarOf, spanOf, type BoardIndex } from './board-index.js';
import { bookableStart, mustFitInOneDay } from './booking-step.js';
import { jobCriticalPath } from './board-critical-path.js';
import { addWorkingMinutes, nextWorkingInstant, workingMinutesBetween, type CompiledCalendar } from './calendar.js';
import { checkStageBookings } from './check-move.js';
import { leadTimeEarliest } from './checks/lead-time.js';
import { earliestStartFromPredecessors } from './checks/order.js';
import type { BookingsOf } from './checks/violation.js';
import { SchedulerError } from './errors.js';
import { DAY_MS } from './time-zone.js';
import type { Booking, Instant, Resource, Violation } from './types.js';
import { unbookedPlan } from './unbooked.js';

/** What to look for. Give `resourceId` or `resourceKind`. */
export interface SlotRequest {
  stageId: string;
  resourceId?: string;
  resourceKind?: string;
  /** No slot starts before this. */
  earliest: Instant;
}

/** Options for {@link findSlots}. */
export interface FindSlotsOptions {
  /** How many alternatives after the earliest slot (default 3). */
  alternatives?: number;
  /** How far ahead to look, in days from the first possible start (default 120). */
  horizonDays?: number;
  /** Booking step in minutes that slot starts land on (default: the index's, 15 unless it was built with another). */
  stepMinutes?: number;
}

/** What a slot costs. */
export interface SlotCost {
  /** Working days the machine would have to be on hire beyond its current hire periods. */
  extraHireDays: number;
  extraHirePence: number;
  /** Working minutes between the stage's early start and this slot's start (0 if earlier). */
  floatUsedMinutes: number;
  /** True when the slot uses more than the stage's total float: the job finishes later. */
  delaysJob: boolean;
}

/** One place a stage could go. */
export interface Slot {
  resourceId: string;
  start: Instant;
  end: Instant;
  /** The stage's bookings if it went here. */
  bookings: Booking[];
  cost: SlotCost;
}

/** Error kinds the slot finder treats as costs or as somebody else's part, not as refusals. */
const NOT_BLOCKING = new Set<Violation['kind']>(['capacity', 'hire']);

/**
 * The stage's bookings with it placed at `start` on `resource`: existing bookings move with it,
 * each on its own resource's calendar keeping its working time and its working offset from the
 * stage's start (a booking that ran 15:00 to 10:00 the next morning is four working hours, not
 * nineteen); the first one of the resource's kind moves to the resource (or a new pencilled booking
 * is added).
 */
function candidateBookings(
  index: BoardIndex,
  stageId: string,
  resource: Resource,
  start: Instant,
  cal: CompiledCalendar,
): Booking[] {
  const stage = index.stages.get(stageId)?.stage;
  if (stage === undefined) throw new SchedulerError('unknown_stage', `Stage ${stageId} is not on the board`);
  const current = bookingsOfStage(index, stageId);
  const span = spanOf(current);
  const end = addWorkingMinutes(cal, start, stage.durationMinutes);
  const out = current.map((b) => {
    if (span === null || b.resourceId === resource.id) return { ...b };
    const bc = resourceCalendarOf(index, b.resourceId);
    const offset = workingMinutesBetween(bc, span.start, b.start);
    const length = workingMinutesBetween(bc, b.start, b.end);
    const from = offset > 0 ? addWorkingMinutes(bc, start, offset) : start;
    const to = length > 0 ? addWorkingMinutes(bc, from, length) : from + (b.end - b.start);
    return { ...b, start: from, end: to };
  });
  const same = out.findIndex(
    (b) => b.resourceId === resource.id || index.resources.get(b.resourceId)?.kind === resource.kind,
  );
  if (same >= 0)
    out[same] = { ...(out[same] as Booking), resourceId: resource.id, start, end: end > start ? end : start + 60_000 };
  else {
    out.push({
      id: `new:${stageId}:${resource.id}`,
      stageId,
      resourceId: resource.id,
      start,
      end: end > start ? end : start + 60_000,
      state: 'pencilled',
      installerFirmId: index.jobs.get(stage.jobId)?.firmId ?? '',
    });
  }
  return out;
}

function hireCost(
  index: BoardIndex,
  resource: Resource,
  start: Instant,
  end: Instant,
  cal: CompiledCalendar,
): { days: number; pence: number } {
  if (resource.hired !== true) return { days: 0, pence: 0 };
  const periods = index.hireByResource.get(resource.id) ?? [];
  const rate = periods[0]?.dayRatePence ?? 0;
  let days = 0;
  for (let d = cal.dayOf(start); d <= cal.dayOf(end - 1); d++) {
    const ivs = cal.dayIntervals(d);
    if (ivs.length === 0) continue;
    const s = ivs[0] as number,
      e = ivs[ivs.length - 1] as number;
    if (e <= start || s >= end) continue;
    if (!periods.some((p) => p.onHire <= Math.max(s, start) && Math.min(e, end) <= p.offHire)) days++;
  }
  return { days, pence: days * rate };
}

/**
 * @example
 * nextCandidate(craneCal, tried, refusals) // end of the overlapping booking, or tomorrow 08:00
 *
 * Next start worth trying after a refused one: the end of whatever overlapped (clash, cross firm,
 * person), else the next working day's first working instant.
 */
export function nextCandidate(cal: CompiledCalendar, t: Instant, refusals: readonly Violation[]): Instant {
  let next = Number.POSITIVE_INFINITY;
  for (const v of refusals) {
    const to = v.details?.to;
    if (typeof to === 'number' && to > t) next = Math.min(next, to);
    const earliest = v.details?.earliestStart;
    if (typeof earliest === 'number' && earliest > t) next = Math.min(next, earliest);
  }
  if (next === Number.POSITIVE_INFINITY) {
    const day = cal.dayOf(t);
    next = nextWorkingInstant(cal, cal.dayIntervals(day).length > 0 ? Math.max(t + 1, lastEnd(cal, day)) : t + 1);
  }
  return nextWorkingInstant(cal, next);
}

const FOLLOWERS = new Set<Violation['kind']>(['order', 'lag', 'cure', 'unbooked_predecessor']);

/**
 * True when a later start can't cure what refused this one: a booked stage further on already
 * starts (or finishes) too early for this one, directly or through unbooked stages between them,
 * and every bound only moves later with this stage's start.
 *
 * @example
 * laterCannotHelp('excavation-1', refusals) // true: the lift is booked before the walls could be done
 */
export function laterCannotHelp(stageId: string, refusals: readonly Violation[]): boolean {
  return refusals.some(
    (v) => FOLLOWERS.has(v.kind) && typeof v.details?.successorId === 'string' && v.details.successorId !== stageId,
  );
}

function lastEnd(cal: CompiledCalendar, day: number): number {
  const ivs = cal.dayIntervals(day);
  return ivs[ivs.length - 1] as number;
}

/**
 * Earliest start at or after `earliest` where the stage passes every error check on the given
 * resource (or any resource of the given kind), then the next alternatives (each on a later
 * working day per resource), sorted by start then resource id. Starts land on the booking step
 * (local time) and, for a stage that must be done within one working day, where it fits in one.
 * Capacity errors (other kinds not yet booked) and hire errors (priced as extra hire days) don't
 * refuse a slot.
 *
 * @example
 * findSlots(index, { stageId: 'lift-1', resourceKind: 'crane', earliest: now }, { alternatives: 3 })
 * // [{ resourceId: 'crane-2', start: …, cost: { extraHireDays: 0, floatUsedMinutes: 0, … } }, …]
 */
export function findSlots(index: BoardIndex, request: SlotRequest, options: FindSlotsOptions = {}): Slot[] {
  const stage = index.stages.get(request.stageId)?.stage;
  if (stage === undefined) throw new SchedulerError('unknown_stage', `Stage ${request.stageId} is not on the board`);
  let resources: Resource[];
  if (request.resourceId !== undefined) {
    const r = index.resources.get(request.resourceId);
    if (r === undefined)
      throw new SchedulerError('unknown_resource', `Resource ${request.resourceId} is not on the board`);
    resources = [r];
  } else if (request.resourceKind !== undefined) {
    resources = (index.resourcesByKind.get(request.resourceKind) ?? []).slice().sort((a, b) => (a.id < b.id ? -1 : 1));
  } else {
    throw new SchedulerError('unknown_resource', 'Say which resource or which kind of resource to look for');
  }
  const wanted = 1 + (options.alternatives ?? 3);
  const horizon = (options.horizonDays ?? 120) * DAY_MS;
  const bookingsOf: BookingsOf = (id) => bookingsOfStage(index, id);
  let timing: { es: number; totalFloatMinutes: number } | undefined;
  try {
    timing = jobCriticalPath(index, stage.jobId).stages.find((s) => s.stageId === stage.id);
  } catch {
    timing = undefined; // a cycle: float can't be worked out, slots are still found
  }
  const all: Slot[] = [];
  const step = options.stepMinutes ?? index.stepMinutes;
  const plan = unbookedPlan(index, bookingsOf);
  let enoughBy = Number.POSITIVE_INFINITY; // the wanted-th earliest start found so far
  for (const r of resources) {
    const cal = resourceCalendarOf(index, r.id);
    // Starts a person would book: on the step, and within one working day when the stage must be.
    const fit = mustFitInOneDay(stage, cal) ? { fitMinutes: stage.durationMinutes } : {};
    const at = (x: Instant): Instant => bookableStart(cal, x, { stepMinutes: step, ...fit });
    const probe: Booking = {
      id: 'probe',
      stageId: stage.id,
      resourceId: r.id,
      start: request.earliest,
      end: request.earliest + 1,
      state: 'pencilled',
      installerFirmId: '',
    };
    const t0 = Math.max(
      request.earliest,
      earliestStartFromPredecessors(index, stage.id, r.id, bookingsOf, plan),
      leadTimeEarliest(index, probe),
    );
    let t = at(t0);
    const limit = t + horizon;
    let found = 0;
    while (t < limit && found < wanted && t <= enoughBy) {
      const own = candidateBookings(index, stage.id, r, t, cal);
      const refusals = checkStageBookings(index, stage.id, own, { errorsOnly: true }).filter(
        (v) => !NOT_BLOCKING.has(v.kind),
      );
      if (refusals.length === 0) {
        const mine = own.find((b) => b.resourceId === r.id) as Booking;
        const hire = hireCost(index, r, mine.start, mine.end, cal);
        const used = timing === undefined ? 0 : Math.max(0, workingMinutesBetween(cal, timing.es, t));
        all.push({
          resourceId: r.id,
          start: t,
          end: mine.end,
          bookings: own,
          cost: {
            extraHireDays: hire.days,
            extraHirePence: hire.pence,
            floatUsedMinutes: used,
            delaysJob: timing !== undefined && used > timing.totalFloatMinutes + 0.5,
          },
        });
        found++;
        t = at(nextCandidate(cal, t, []));
      } else {
        if (laterCannotHelp(stage.id, refusals)) break;
        t = at(nextCandidate(cal, t, refusals));
      }
    }
    if (all.length >= wanted) {
      all.sort((a, b) => a.start - b.start || (a.resourceId < b.resourceId ? -1 : 1));
      enoughBy = (all[wanted - 1] as Slot).start;
    }
  }
  all.sort((a, b) => a.start - b.start || (a.resourceId < b.resourceId ? -1 : 1));
  return all.slice(0, wanted);
}
