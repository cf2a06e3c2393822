import type { BoardIndex } from '../board-index.js';
import type { Booking, Stage, Violation } from '../types.js';
import { makeViolation, stageLabel } from './violation.js';

/** How many different resources of a kind the bookings hold (no allocation: a stage has a few). */
function distinctOfKind(index: BoardIndex, bookings: readonly Booking[], kind: string): number {
  let n = 0;
  for (let i = 0; i < bookings.length; i++) {
    const rid = (bookings[i] as Booking).resourceId;
    if (index.resources.get(rid)?.kind !== kind) continue;
    let seen = false;
    for (let j = 0; j < i && !seen; j++) seen = (bookings[j] as Booking).resourceId === rid;
    if (!seen) n++;
  }
  return n;
}

/**
 * A booked stage must have as many distinct resources of each required kind as it needs (a lift
 * with two pallet trucks needs two booked). Severity error: the work can't happen short-handed.
 * Stages with no bookings are simply not scheduled yet and pass.
 *
 * @example
 * checkCapacity(index, 'lift-1', bookings) // "'Lift' needs 2 pallet trucks but 1 is booked"
 */
export function checkCapacity(
  index: BoardIndex,
  stageId: string,
  bookings: readonly Booking[],
  stage: Stage | undefined = index.stages.get(stageId)?.stage,
  out: Violation[] = [],
): Violation[] {
  if (bookings.length === 0 || stage === undefined) return out;
  for (const req of stage.requirements) {
    if (
      req.count === 1 &&
      bookings.length === 1 &&
      index.resources.get((bookings[0] as Booking).resourceId)?.kind === req.kind
    )
      continue;
    // Count first without a list (most stages have what they need); the list only for the message.
    if (!(distinctOfKind(index, bookings, req.kind) < req.count)) continue;
    const got: string[] = [];
    for (const b of bookings) {
      if (index.resources.get(b.resourceId)?.kind === req.kind && !got.includes(b.resourceId)) got.push(b.resourceId);
    }
    const words = req.kind.replace(/_/g, ' ');
    out.push(
      makeViolation(
        'capacity',
        'error',
        [stageId],
        got,
        bookings.map((b) => b.id),
        `${stageLabel(index, stageId)} needs ${req.count} ${words}${req.count === 1 ? '' : 's'} but ${got.length} ${got.length === 1 ? 'is' : 'are'} booked`,
        { kind: req.kind, needed: req.count, booked: got.length },
      ),
    );
  }
  return out;
}
