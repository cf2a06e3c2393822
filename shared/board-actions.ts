import {
  addWorkingMinutes, nextWorkingInstant, resourceCalendarOf, spanOf, workingMinutesBetween,
  type BoardIndex, type Booking, type Instant, type Violation,
} from './scheduler/index.ts';

/** A stage's active (not declined) bookings. */
export function bookingsOfStage(index: BoardIndex, stageId: string): Booking[] {
  return index.stages.get(stageId)?.bookings ?? [];
}

/** Every stage that depends, directly or through others, on `stageId` (in no particular order). */
export function dependentStageIds(index: BoardIndex, stageId: string): string[] {
  const seen = new Set<string>([stageId]);
  const queue = [stageId];
  while (queue.length) {
    const id = queue.shift() as string;
    for (const link of index.stages.get(id)?.depsOut ?? []) {
      const to = link.dep.toStageId;
      if (!seen.has(to)) { seen.add(to); queue.push(to); }
    }
  }
  seen.delete(stageId);
  return [...seen];
}

export interface StageShift { stageId: string; bookings: Booking[] }

/**
 * Moving a stage by some working time moves its booked dependents by the same working time, each
 * on its own resource's calendar, so the gaps between them (their lags) stay as they were.
 * Returns the dependents' new bookings; unbooked dependents are left for the tray.
 *
 * @example
 * shiftDependents(index, 'base-1', thu0800) // [{ stageId: 'lift-1', bookings: [...] }, …]
 */
export function shiftDependents(index: BoardIndex, stageId: string, newStart: Instant): StageShift[] {
  const own = bookingsOfStage(index, stageId);
  const span = spanOf(own);
  const first = own[0];
  if (!span || !first) return [];
  const cal = resourceCalendarOf(index, first.resourceId);
  const forward = newStart >= span.start;
  const delta = forward ? workingMinutesBetween(cal, span.start, newStart) : -workingMinutesBetween(cal, newStart, span.start);
  if (delta === 0) return [];
  const out: StageShift[] = [];
  for (const id of dependentStageIds(index, stageId).sort()) {
    const list = bookingsOfStage(index, id);
    if (!list.length) continue;
    out.push({
      stageId: id,
      bookings: list.map((b) => {
        const bc = resourceCalendarOf(index, b.resourceId);
        const length = workingMinutesBetween(bc, b.start, b.end);
        // Landing on the end of a working day means starting at the next working instant.
        const start = nextWorkingInstant(bc, addWorkingMinutes(bc, b.start, delta));
        return { ...b, start, end: length > 0 ? addWorkingMinutes(bc, start, length) : start + (b.end - b.start) };
      }),
    });
  }
  return out;
}

/**
 * Violations that refuse a write. A stage that is not yet fully resourced (capacity) is a normal
 * moment of planning — the lift is put on the crane's row before the crew's — so it is shown as a
 * warning until the stage is complete, not a refusal. Board and server both decide with this.
 */
export function isBlocking(v: Violation): boolean {
  return v.severity === 'error' && v.kind !== 'capacity';
}

/** The same violations with the not-yet-resourced ones shown as warnings. */
export function asWriteVerdict(violations: readonly Violation[]): { errors: Violation[]; warnings: Violation[] } {
  const errors = violations.filter(isBlocking);
  const warnings = violations.filter((v) => !isBlocking(v)).map((v) => (v.severity === 'error' ? { ...v, severity: 'warning' as const } : v));
  return { errors, warnings };
}
