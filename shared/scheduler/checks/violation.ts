import type { BoardIndex } from '../board-index.js';
import type { Booking, Severity, Violation, ViolationKind } from '../types.js';

/** Active bookings of a stage as a check should see them (the board's, or a move's). */
export type BookingsOf = (stageId: string) => readonly Booking[];

/**
 * Builds a violation with ids sorted so every path (full or incremental) produces the same one.
 *
 * @example
 * makeViolation('clash', 'error', ['lift-1'], ['crane-1'], ['b1', 'b2'], 'The crane is booked twice')
 */
export function makeViolation(
  kind: ViolationKind, severity: Severity, stageIds: string[], resourceIds: string[], bookingIds: string[],
  message: string, details?: Record<string, unknown>,
): Violation {
  const v: Violation = {
    kind, severity, stageIds: uniqueSorted(stageIds), resourceIds: uniqueSorted(resourceIds), bookingIds: uniqueSorted(bookingIds), message,
  };
  if (details !== undefined) v.details = details;
  return v;
}

function uniqueSorted(ids: string[]): string[] {
  if (ids.length < 2) return ids.slice();
  if (ids.length === 2) {
    const [a, b] = ids as [string, string];
    return a === b ? [a] : a < b ? [a, b] : [b, a];
  }
  return [...new Set(ids)].sort();
}

/**
 * A stable key for de-duplicating and comparing violations.
 *
 * @example
 * violationKey(v) // 'clash|lift-1|crane-1|b1,b2|The crane …'
 */
export function violationKey(v: Violation): string {
  return `${v.kind}|${v.severity}|${v.stageIds.join(',')}|${v.resourceIds.join(',')}|${v.bookingIds.join(',')}|${v.message}`;
}

/**
 * Removes duplicates and sorts violations by key (errors and warnings mixed, stable order).
 *
 * @example
 * normaliseViolations([v, v]).length // 1
 */
export function normaliseViolations(list: readonly Violation[]): Violation[] {
  const seen = new Map<string, Violation>();
  for (const v of list) {
    const k = violationKey(v);
    if (!seen.has(k)) seen.set(k, v);
  }
  return [...seen.entries()].sort((a, b) => (a[0] < b[0] ? -1 : a[0] > b[0] ? 1 : 0)).map((e) => e[1]);
}

/**
 * "the crane (crane-1)": how messages name a resource.
 *
 * @example
 * resourceLabel(index, 'crane-1') // 'the crane (crane-1)'
 */
export function resourceLabel(index: BoardIndex, resourceId: string): string {
  const r = index.resources.get(resourceId);
  if (r === undefined) return resourceId;
  // A named resource reads as a scheduler would say it: "the dumper Tracked dumper" is clumsy, so the name alone.
  return r.name ? r.name : `the ${r.kind.replace(/_/g, ' ')} (${r.id})`;
}

/**
 * A stage's name in quotes for messages.
 *
 * @example
 * stageLabel(index, 'lift-1') // "'Lift'"
 */
export function stageLabel(index: BoardIndex, stageId: string): string {
  return `'${index.stages.get(stageId)?.stage.name ?? stageId}'`;
}

/**
 * First letter upper case.
 *
 * @example
 * capitalise('the crane') // 'The crane'
 */
export function capitalise(s: string): string {
  return s.charAt(0).toUpperCase() + s.slice(1);
}
