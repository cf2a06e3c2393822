import type { BoardIndex } from '../board-index.js';
import type { Booking, Dependency, Stage, Violation } from '../types.js';
import { checkAvailability } from './availability.js';
import { checkCapacity } from './capacity.js';
import { checkDependency } from './order.js';
import { checkHire } from './hire.js';
import { checkLeadTime } from './lead-time.js';
import { checkSplit } from './split.js';
import { makeViolation, stageLabel, type BookingsOf } from './violation.js';
import { unbookedPlan, unbookedViolationsOf } from '../unbooked.js';

/**
 * Checks of one booking on its own: lead time, availability, one working day, hire.
 *
 * @example
 * checkBooking(index, booking)
 */
export function checkBooking(
  index: BoardIndex,
  booking: Booking,
  stage: Stage | undefined = index.stages.get(booking.stageId)?.stage,
  out: Violation[] = [],
): Violation[] {
  const r = index.resourceInfo.get(booking.resourceId);
  checkAvailability(index, booking, stage, out, r?.cal);
  checkSplit(index, booking, stage, out, r?.cal);
  // Both append to `out`: no list of their own per booking.
  if (booking.state === 'pencilled') checkLeadTime(index, booking, out);
  if (r?.resource.hired === true) checkHire(index, booking, out);
  return out;
}

/**
 * Dependencies into and out of a stage, each once.
 *
 * @example
 * dependenciesOf(index, 'lift-1').map(d => d.id)
 */
export function dependenciesOf(index: BoardIndex, stageId: string): Dependency[] {
  const info = index.stages.get(stageId);
  if (info === undefined) return [];
  const out: Dependency[] = info.depsIn.map((l) => l.dep);
  for (const l of info.depsOut) if (l.to !== info) out.push(l.dep); // a self-link is already in
  return out;
}

/**
 * Checks that concern one stage alone or its links: order, lag and cure on its dependencies,
 * unbooked predecessors (its own, and downstream where its times decide a booked successor's
 * limit), its bookings' lead time, availability, one working day and hire, and its capacity.
 * (Clashes are pairwise and live in clash.ts.)
 *
 * @example
 * checkStageOwn(index, 'lift-1', bookingsOf)
 */
export function checkStageOwn(index: BoardIndex, stageId: string, bookingsOf: BookingsOf): Violation[] {
  const out: Violation[] = [];
  for (const d of dependenciesOf(index, stageId)) out.push(...checkDependency(index, d, bookingsOf));
  unbookedViolationsOf(unbookedPlan(index, bookingsOf), stageId, out);
  const own = bookingsOf(stageId);
  for (const b of own) out.push(...checkBooking(index, b));
  out.push(...checkCapacity(index, stageId, own));
  return out;
}

/**
 * One 'cycle' error per group of stages that wait for each other in a circle.
 *
 * @example
 * cycleViolations(index) // [{ kind: 'cycle', message: "These stages wait for each other in a circle: 'A', 'B'" }]
 */
export function cycleViolations(index: BoardIndex): Violation[] {
  return index.cycles.map((ids) =>
    makeViolation(
      'cycle',
      'error',
      ids,
      [],
      [],
      `These stages wait for each other in a circle: ${ids.map((id) => stageLabel(index, id)).join(' → ')}`,
    ),
  );
}
