import {
  createBoardIndex,
  type BoardIndex,
  type BoardIndexOptions,
  type DepLink,
  type StageInfo,
} from './board-index.js';
import { boardCriticalPath, type JobCriticalPath } from './board-critical-path.js';
import { checkAllPersonDoubles, checkAllResourceClashes } from './checks/clash.js';
import { checkIdleHire } from './checks/hire.js';
import { checkDependencyBetween } from './checks/order.js';
import { checkBooking, cycleViolations } from './checks/stage.js';
import { checkCapacity } from './checks/capacity.js';
import { normaliseOwnViolations } from './checks/violation.js';
import { checkUnbookedLink, unbookedPlan, type UnbookedPlan } from './unbooked.js';
import type { Board, Booking, Violation } from './types.js';

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
  // Indexed loops throughout: for…of over 20,000 stages and their links left iterator objects
  // behind (garbage the collector then spent its time on).
  const stages = index.stageList;
  for (let k = 0; k < stages.length; k++) {
    const info = stages[k] as StageInfo;
    const own = info.bookings;
    const depsOut = info.depsOut;
    if (own.length === 0) {
      if (!index.seesAllBookings) continue;
      for (let i = 0; i < depsOut.length; i++) {
        const l = depsOut[i] as DepLink;
        if (l.to.bookings.length === 0 || l.to === info) continue;
        plan ??= unbookedPlan(index);
        const v = checkUnbookedLink(plan, l, l.to.bookings);
        if (v !== undefined) out.push(v);
      }
      continue;
    }
    for (let i = 0; i < depsOut.length; i++) {
      const l = depsOut[i] as DepLink;
      checkDependencyBetween(index, l.dep, own, l.to.bookings, out, info.stage);
    }
    for (let i = 0; i < own.length; i++) checkBooking(index, own[i] as Booking, info.stage, out);
    checkCapacity(index, info.stage.id, own, info.stage, out);
  }
  checkAllResourceClashes(index, out);
  checkAllPersonDoubles(index, out);
  for (const v of cycleViolations(index)) out.push(v);
  checkIdleHire(index, out);
  return normaliseOwnViolations(out);
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
