import { spanEnd, spanOf, spanStart, resourceCalendarOf, stageCalendarOf, type BoardIndex } from '../board-index.js';
import { roundUpToStep } from '../booking-step.js';
import { cureElapsedDays as cureDays, cureRelease, releaseInstant } from '../cure.js';
import { formatInstant } from '../format.js';
import { applyLag, describeLag } from '../lag.js';
import { countWorkingDays, type CompiledCalendar } from '../calendar.js';
import type { Booking, Dependency, Stage, Violation } from '../types.js';
import { makeViolation, stageLabel, type BookingsOf } from './violation.js';
import { unbookedPlan, unbookedTimesOf, type UnbookedPlan } from '../unbooked.js';

const WORDS = {
  FS: ['start', 'finished', 'finishes'],
  SS: ['start', 'started', 'starts'],
  FF: ['finish', 'finished', 'finishes'],
  SF: ['finish', 'started', 'starts'],
} as const;

/**
 * Order, lag and cure checks of one dependency between two booked stages (severity error), and
 * a warning when a stage wanted just in time ends more than the working day before the next.
 * Working lags count on the successor's calendar; the cure of a base stage counts from the end
 * of the pour in elapsed time, and only on a link that waits for it (`waitsForCure`): block walls
 * may go up on a base that has set overnight, the lift waits for the strength.
 *
 * @example
 * checkDependency(index, { id: 'd1', fromStageId: 'base', toStageId: 'lift', type: 'FS', lag: { amount: 0, unit: 'working_hours' } }, bookingsOf)
 */
export function checkDependency(
  index: BoardIndex,
  dep: Dependency,
  bookingsOf: BookingsOf,
  out: Violation[] = [],
): Violation[] {
  return checkDependencyBetween(index, dep, bookingsOf(dep.fromStageId), bookingsOf(dep.toStageId), out);
}

/**
 * {@link checkDependency} given both stages' bookings; appends to `out` and returns it.
 *
 * @example
 * checkDependencyBetween(index, dep, baseBookings, liftBookings, [])
 */
export function checkDependencyBetween(
  index: BoardIndex,
  dep: Dependency,
  pb: readonly Booking[],
  sb: readonly Booking[],
  out: Violation[] = [],
  from: Stage | undefined = index.stages.get(dep.fromStageId)?.stage,
): Violation[] {
  if (pb.length === 0 || sb.length === 0) return out;
  const pStart = spanStart(pb),
    pEnd = spanEnd(pb),
    sStart = spanStart(sb),
    sEnd = spanEnd(sb);
  const anchor = dep.type === 'FS' || dep.type === 'FF' ? pEnd : pStart;
  const subject = dep.type === 'FS' || dep.type === 'SS' ? sStart : sEnd;
  // The successor's calendar only for a lag to count on or words to say: most links have neither,
  // and looking it up for each of them showed in the full analysis.
  let succCal: CompiledCalendar | undefined;
  const bound =
    dep.lag.amount === 0 ? anchor : applyLag((succCal = stageCalendarOf(index, dep.toStageId, sb)), anchor, dep.lag);
  if (subject < bound) {
    const tz = (succCal ??= stageCalendarOf(index, dep.toStageId, sb)).timeZone;
    // Words only when there is something to say (no destructuring on the path every link takes).
    const [verb, done, does] = WORDS[dep.type];
    const P = stageLabel(index, dep.fromStageId),
      S = stageLabel(index, dep.toStageId);
    const ids = [dep.fromStageId, dep.toStageId];
    const details: Record<string, unknown> = {
      dependencyId: dep.id,
      type: dep.type,
      predecessorId: dep.fromStageId,
      successorId: dep.toStageId,
      earliest: bound,
      actual: subject,
    };
    // Where a person would book it: the bound rounded up to the booking step (the check itself is exact).
    const shown = roundUpToStep(bound, tz, index.stepMinutes);
    if (dep.type === 'FS' || dep.type === 'SS') details.earliestStart = shown;
    if (dep.lag.amount === 0) {
      out.push(
        makeViolation(
          'order',
          'error',
          ids,
          [],
          [],
          `${S} can't ${verb} before ${P} has ${done} (${formatInstant(bound, tz)})`,
          details,
        ),
      );
    } else {
      const rel = dep.lag.amount > 0 ? 'after' : 'before';
      out.push(
        makeViolation(
          'lag',
          'error',
          ids,
          [],
          [],
          `${S} can't ${verb} before ${formatInstant(shown, tz)}: it must wait ${describeLag(dep.lag)} ${rel} ${P} ${does}`,
          details,
        ),
      );
    }
  }
  // A stage wanted just in time (the delivery) done days before the stage after it needs it: the
  // unit would stand waiting on site. On that stage's day or the working day before is in time.
  // Whatever the link (from its finish or its start): the unit stands there from its end.
  if (from?.justInTime === true && subject >= bound) {
    const cal = (succCal ??= stageCalendarOf(index, dep.toStageId, sb));
    const days = countWorkingDays(cal, pEnd, sStart);
    if (days > 1) {
      const P = stageLabel(index, dep.fromStageId),
        S = stageLabel(index, dep.toStageId);
      out.push(
        makeViolation(
          'just_in_time',
          'warning',
          [dep.fromStageId, dep.toStageId],
          [],
          [],
          `${P} ends ${days} working days before ${S} starts (${formatInstant(pEnd, cal.timeZone)}, then ${formatInstant(sStart, cal.timeZone)}): it is wanted just in time, on that day or the working day before, so nothing stands waiting on site`,
          { dependencyId: dep.id, predecessorId: dep.fromStageId, successorId: dep.toStageId, workingDaysBefore: days },
        ),
      );
    }
  }
  const cure = dep.waitsForCure === true ? from?.cure : undefined;
  if (cure && sStart < releaseInstant(pEnd, cureDays(cure))) {
    const ex = cureRelease(pEnd, cure);
    if (sStart < ex.releaseAt) {
      const tz = (succCal ??= stageCalendarOf(index, dep.toStageId, sb)).timeZone;
      const S = stageLabel(index, dep.toStageId);
      const pct = Math.round(cure.targetFraction * 100);
      out.push(
        makeViolation(
          'cure',
          'error',
          [dep.fromStageId, dep.toStageId],
          [],
          [],
          `${S} can't start before the base has cured: ${pct}% strength is reached at ${formatInstant(ex.releaseAt, tz)}`,
          {
            dependencyId: dep.id,
            predecessorId: dep.fromStageId,
            successorId: dep.toStageId,
            ...ex,
            earliestStart: roundUpToStep(ex.releaseAt, tz, index.stepMinutes),
          },
        ),
      );
    }
  }
  return out;
}

/**
 * The earliest start the dependencies into a stage allow, given its duration would be counted on
 * `resourceId`'s calendar: FS/SS bounds and cures (on links that wait for them) of booked predecessors, and of unbooked ones
 * from their earliest times (see unbooked.ts); FF/SF are left to the full check. Exact (not
 * rounded to the booking step).
 *
 * @example
 * earliestStartFromPredecessors(index, 'lift-1', 'crane-1', bookingsOf) // epoch ms
 */
export function earliestStartFromPredecessors(
  index: BoardIndex,
  stageId: string,
  resourceId: string,
  bookingsOf: BookingsOf,
  plan: UnbookedPlan = unbookedPlan(index, bookingsOf),
): number {
  const cal = resourceCalendarOf(index, resourceId);
  let t = Number.NEGATIVE_INFINITY;
  for (const { dep } of index.stages.get(stageId)?.depsIn ?? []) {
    if (dep.fromStageId === stageId) continue;
    let p = spanOf(bookingsOf(dep.fromStageId));
    if (p === null && index.seesAllBookings) {
      const u = unbookedTimesOf(plan, dep.fromStageId);
      if (u !== null) p = { start: u.start, end: u.finish };
    }
    if (p === null) continue;
    if (dep.type === 'FS' || dep.type === 'SS')
      t = Math.max(t, applyLag(cal, dep.type === 'FS' ? p.end : p.start, dep.lag));
    const cure = dep.waitsForCure === true ? index.stages.get(dep.fromStageId)?.stage.cure : undefined;
    if (cure) t = Math.max(t, releaseInstant(p.end, cureDays(cure)));
  }
  return t;
}
