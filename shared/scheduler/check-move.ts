import { bookingsOfStage, type BoardIndex } from './board-index.js';
import { overlappingOnResource, personPairViolation, resourcePairViolations } from './checks/clash.js';
import { checkStageOwn, cycleViolations } from './checks/stage.js';
import { normaliseViolations, type BookingsOf } from './checks/violation.js';
import { movedBookings, type StageMove } from './move.js';
import type { Booking, Violation } from './types.js';

/**
 * Violations of the stage's own bookings (already moved) against the rest of the index: the
 * pairwise checks (clash, cross firm, one person in two places), found by binary search.
 */
function pairViolations(index: BoardIndex, stageId: string, own: readonly Booking[]): Violation[] {
  const out: Violation[] = [];
  own.forEach((b, i) => {
    for (const o of overlappingOnResource(index, b.resourceId, b.start, b.end, stageId))
      out.push(...resourcePairViolations(index, b, o));
    for (let j = i + 1; j < own.length; j++) {
      const c = own[j] as Booking;
      if (c.start < b.end && b.start < c.end) {
        if (c.resourceId === b.resourceId) out.push(...resourcePairViolations(index, b, c));
        else {
          for (const p of index.personsOfResource.get(b.resourceId) ?? []) {
            if ((index.personsOfResource.get(c.resourceId) ?? []).includes(p))
              out.push(personPairViolation(index, p, b, c));
          }
        }
      }
    }
    for (const p of index.personsOfResource.get(b.resourceId) ?? []) {
      for (const rid of index.resourcesOfPerson.get(p) ?? []) {
        if (rid === b.resourceId) continue;
        for (const o of overlappingOnResource(index, rid, b.start, b.end, stageId))
          out.push(personPairViolation(index, p, b, o));
      }
    }
  });
  return out;
}

/** Options for {@link checkMove}. */
export interface CheckMoveOptions {
  /** Only return errors (the slot finder and auto-place ask for this). */
  errorsOnly?: boolean;
}

/**
 * Checks one move against a prebuilt index without re-analysing the board: what the board calls
 * on every drag frame. Returns the violations that name the moved stage — the same verdict as
 * `analyseBoard` on the moved board, restricted to that stage.
 *
 * @example
 * const index = createBoardIndex(board, { now })
 * checkMove(index, { stageId: 'lift-1', start: Date.UTC(2026, 4, 12, 7) })
 *   .filter(v => v.severity === 'error') // [] when the drop is allowed
 */
export function checkMove(index: BoardIndex, move: StageMove, options: CheckMoveOptions = {}): Violation[] {
  const own = movedBookings(index, move);
  return checkStageBookings(index, move.stageId, own, options);
}

/**
 * Like {@link checkMove}, for a stage given its complete new set of active bookings.
 *
 * @example
 * checkStageBookings(index, 'lift-1', [craneBooking, crewBooking])
 */
export function checkStageBookings(
  index: BoardIndex,
  stageId: string,
  own: readonly Booking[],
  options: CheckMoveOptions = {},
): Violation[] {
  const bookingsOf: BookingsOf = (id) => (id === stageId ? own : bookingsOfStage(index, id));
  const all = [
    ...checkStageOwn(index, stageId, bookingsOf),
    ...pairViolations(index, stageId, own),
    ...cycleViolations(index).filter((v) => v.stageIds.includes(stageId)),
  ].filter((v) => v.stageIds.includes(stageId) && (!options.errorsOnly || v.severity === 'error'));
  return normaliseViolations(all);
}
