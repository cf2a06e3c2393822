import {
  addWorkingMinutes,
  bookableStart,
  earliestStartFromPredecessors,
  longestWorkingDayMinutes,
  mustFitInOneDay,
  resourceCalendarOf,
  spanOf,
  workingMinutesBetween,
  type BoardIndex,
  type Booking,
  type Instant,
  type Violation,
} from './scheduler/index.ts';

/**
 * A stage's active (not declined) bookings.
 *
 * @example
 * bookingsOfStage(index, 'lift-1').map((b) => b.resourceId) // ['crane-1', 'crew-a']
 */
export function bookingsOfStage(index: BoardIndex, stageId: string): Booking[] {
  return index.stages.get(stageId)?.bookings ?? [];
}

/**
 * Every stage that depends, directly or through others, on `stageId` (in no particular order).
 *
 * @example
 * dependentStageIds(index, 'base-1') // ['walls-1', 'lift-1', 'fill-1', …]
 */
export function dependentStageIds(index: BoardIndex, stageId: string): string[] {
  const seen = new Set<string>([stageId]);
  const queue = [stageId];
  while (queue.length) {
    const id = queue.shift() as string;
    for (const link of index.stages.get(id)?.depsOut ?? []) {
      const to = link.dep.toStageId;
      if (!seen.has(to)) {
        seen.add(to);
        queue.push(to);
      }
    }
  }
  seen.delete(stageId);
  return [...seen];
}

/** A dependent stage's bookings after a move. */
export interface StageShift {
  stageId: string;
  bookings: Booking[];
}

/** Options for {@link shiftDependents}. */
export interface ShiftOptions {
  /** Booking step in minutes the shifted starts are rounded up to (default: the index's, 15 unless built with another). */
  stepMinutes?: number;
}

/**
 * Moving a stage by some working time moves its booked dependents by the same working time, each
 * on its own resource's calendar, so the gaps between them (their lags) stay as they were. Then,
 * in dependency order, each is kept no earlier than its predecessors' new times allow (finish to
 * start, start to start, cures, and the earliest times of unbooked stages between), rounded up to
 * the booking step, and a stage that must be done within one working day goes to the next start
 * where it fits. Returns the dependents' new bookings (by stage id); unbooked dependents are left
 * for the tray.
 *
 * @example
 * shiftDependents(index, 'base-1', thu0800) // [{ stageId: 'lift-1', bookings: [...] }, …]
 */
export function shiftDependents(
  index: BoardIndex,
  stageId: string,
  newStart: Instant,
  options: ShiftOptions = {},
): StageShift[] {
  const own = bookingsOfStage(index, stageId);
  const span = spanOf(own);
  const first = own[0];
  if (!span || !first) return [];
  const cal = resourceCalendarOf(index, first.resourceId);
  const forward = newStart >= span.start;
  const delta = forward
    ? workingMinutesBetween(cal, span.start, newStart)
    : -workingMinutesBetween(cal, newStart, span.start);
  if (delta === 0) return [];
  const step = options.stepMinutes ?? index.stepMinutes;
  const dependents = new Set(dependentStageIds(index, stageId));
  const elapsed = newStart - span.start;
  const moved = new Map<string, Booking[]>([
    [stageId, own.map((b) => ({ ...b, start: b.start + elapsed, end: b.end + elapsed }))],
  ]);
  const bookingsOf = (id: string): readonly Booking[] => moved.get(id) ?? bookingsOfStage(index, id);
  // Dependency order, so each stage sees its predecessors' new times; stages in a cycle come last.
  const order = index.order.filter((i) => dependents.has(i.stage.id)).map((i) => i.stage.id);
  for (const id of [...dependents].sort()) if (index.blocked.has(id)) order.push(id);
  for (const id of order) {
    const list = bookingsOfStage(index, id);
    const stage = index.stages.get(id)?.stage;
    if (!list.length || !stage) continue;
    moved.set(
      id,
      list.map((b) => {
        const bc = resourceCalendarOf(index, b.resourceId);
        const length = workingMinutesBetween(bc, b.start, b.end);
        const shifted = addWorkingMinutes(bc, b.start, delta);
        const floor = index.blocked.has(id)
          ? shifted
          : earliestStartFromPredecessors(index, id, b.resourceId, bookingsOf);
        // A stage kept to one working day keeps its whole booked length within the day it lands on.
        const fit = mustFitInOneDay(stage, bc)
          ? { fitMinutes: Math.min(Math.max(stage.durationMinutes, length), longestWorkingDayMinutes(bc)) }
          : {};
        // Landing on the end of a working day means starting at the next working instant (bookableStart does).
        const start = bookableStart(bc, Math.max(shifted, floor), { stepMinutes: step, ...fit });
        return { ...b, start, end: length > 0 ? addWorkingMinutes(bc, start, length) : start + (b.end - b.start) };
      }),
    );
  }
  return [...dependents]
    .sort()
    .filter((id) => moved.has(id))
    .map((id) => ({ stageId: id, bookings: moved.get(id) as Booking[] }));
}

/**
 * Violations that refuse a write. A stage that is not yet fully resourced (capacity) is a normal
 * moment of planning — the lift is put on the crane's row before the crew's — so it is shown as a
 * warning until the stage is complete, not a refusal. Board and server both decide with this.
 *
 * @example
 * checkMove(index, move).some(isBlocking) // true: the drop is refused
 */
export function isBlocking(v: Violation): boolean {
  return v.severity === 'error' && v.kind !== 'capacity';
}

/**
 * The same violations with the not-yet-resourced ones shown as warnings.
 *
 * @example
 * const { errors, warnings } = asWriteVerdict(checkStageBookings(index, 'lift-1', own))
 */
export function asWriteVerdict(violations: readonly Violation[]): { errors: Violation[]; warnings: Violation[] } {
  const errors = violations.filter(isBlocking);
  const warnings = violations
    .filter((v) => !isBlocking(v))
    .map((v) => (v.severity === 'error' ? { ...v, severity: 'warning' as const } : v));
  return { errors, warnings };
}
