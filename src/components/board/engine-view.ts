/**
 * How the client asks the engine about the board it loaded: with the server's "now", and saying
 * whether the board holds every booking. A crew member's board holds only their own rows, so a
 * stage with no booking there may well be booked on someone else's: the engine then skips the
 * checks that need the whole plan (unbooked predecessors), rather than warning of a clash or a
 * missing booking that isn't there. Pure, so it is tested without a browser.
 */
import type { Role } from '@shared/permissions';
import { ownViolations, toEngineBoard, type BoardData } from '@shared/board-data';
import {
  boardCriticalPath,
  boardViolations,
  createBoardIndex,
  type BoardAnalysis,
  type BoardIndex,
  type BoardIndexOptions,
} from '@shared/scheduler/index';

/**
 * Whether a role's board holds every booking of its firm (crew see their own rows only).
 * @example seesAllBookingsAs('scheduler') // true
 * @example seesAllBookingsAs('crew')      // false
 */
export function seesAllBookingsAs(role: Role | null): boolean {
  return role !== 'crew';
}

/** The options the board's index and analysis are built with. */
export function engineOptions(data: Pick<BoardData, 'now'>, seesAllBookings: boolean): BoardIndexOptions {
  return { now: data.now, seesAllBookings };
}

/** The engine's index over the loaded board: built once per load, for the analysis and every drag check. */
export function boardIndexOf(data: BoardData, seesAllBookings: boolean): BoardIndex {
  return createBoardIndex(toEngineBoard(data), engineOptions(data, seesAllBookings));
}

/**
 * The engine's full analysis of the loaded board (what `analyseBoard` gives), read from the index
 * the board already built rather than a second one, without the problems that involve only
 * busy-elsewhere blocks (another installer's business), its counts to match.
 *
 * @example boardAnalysisOf(data, boardIndexOf(data, true))
 */
export function boardAnalysisOf(data: BoardData, index: BoardIndex): BoardAnalysis {
  const violations = ownViolations(data, boardViolations(index));
  const errorCount = violations.filter((v) => v.severity === 'error').length;
  return {
    violations,
    errorCount,
    warningCount: violations.length - errorCount,
    criticalPaths: boardCriticalPath(index),
  };
}
