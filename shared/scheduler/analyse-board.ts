import { createBoardIndex, type BoardIndex, type BoardIndexOptions } from './board-index.js';
import { boardCriticalPath, type JobCriticalPath } from './board-critical-path.js';
import { checkAllPersonDoubles, checkAllResourceClashes } from './checks/clash.js';
import { checkIdleHire } from './checks/hire.js';
import { checkDependencyBetween } from './checks/order.js';
import { checkBooking, cycleViolations } from './checks/stage.js';
import { checkCapacity } from './checks/capacity.js';
import { normaliseViolations } from './checks/violation.js';
import { checkUnbookedLink, unbookedPlan, type UnbookedPlan } from './unbooked.js';
import type { Board, Violation } from './types.js';

/** Everything the board shows after a full check. */
export interface BoardAnalysis {
  violations: Violation[];
  errorCount: number;
  warningCount: number;
  criticalPaths: JobCriticalPath[];
}

/** Options for {@link analyseBoard}. */
export interface AnalyseBoardOptions extends BoardIndexOptions {
  /** Skip the critical path (checks only). Default false. */
  skipCriticalPath?: boolean;
}

/**
 * Every violation on the board from a prebuilt index (see {@link analyseBoard}).
 *
 * @example
 * boardViolations(createBoardIndex(board, { now }))
 */
export function boardViolations(index: BoardIndex): Violation[] {
  const out: Violation[] = [];
  // Earliest times of unbooked stages, worked out only for those a booked successor waits on.
  let plan: UnbookedPlan | undefined;
  for (const info of index.stageList) {
    if (info.bookings.length === 0) {
      if (!index.seesAllBookings) continue;
      for (const l of info.depsOut) {
        if (l.to.bookings.length === 0 || l.to === info) continue;
        plan ??= unbookedPlan(index);
        const v = checkUnbookedLink(plan, l, l.to.bookings);
        if (v !== undefined) out.push(v);
      }
      continue;
    }
    for (const l of info.depsOut) checkDependencyBetween(index, l.dep, info.bookings, l.to.bookings, out, info.stage);
    for (const b of info.bookings) checkBooking(index, b, info.stage, out);
    checkCapacity(index, info.stage.id, info.bookings, info.stage, out);
  }
  for (const v of checkAllResourceClashes(index)) out.push(v);
  for (const v of checkAllPersonDoubles(index)) out.push(v);
  for (const v of cycleViolations(index)) out.push(v);
  for (const v of checkIdleHire(index)) out.push(v);
  return normaliseViolations(out);
}

/**
 * Full analysis of a board: every check (order, lag, cure, unbooked predecessors, lead time, clash,
 * availability, one working day, hire, idle hire, capacity, one person in two places, across
 * firms, cycles) and every job's critical
 * path. Declined bookings never count.
 *
 * @example
 * const { violations, criticalPaths } = analyseBoard(board, { now: Date.UTC(2026, 4, 1) })
 * violations.filter(v => v.severity === 'error')
 */
export function analyseBoard(board: Board, options: AnalyseBoardOptions): BoardAnalysis {
  const index = createBoardIndex(board, options);
  const violations = boardViolations(index);
  let errorCount = 0;
  for (const v of violations) if (v.severity === 'error') errorCount++;
  return {
    violations,
    errorCount,
    warningCount: violations.length - errorCount,
    criticalPaths: options.skipCriticalPath ? [] : boardCriticalPath(index),
  };
}
