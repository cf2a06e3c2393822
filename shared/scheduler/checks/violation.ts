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
  kind: ViolationKind,
  severity: Severity,
  stageIds: string[],
  resourceIds: string[],
  bookingIds: string[],
  message: string,
  details?: Record<string, unknown>,
): Violation {
  return violationOf(
    kind,
    severity,
    uniqueSorted(stageIds),
    uniqueSorted(resourceIds),
    uniqueSorted(bookingIds),
    message,
    details,
  );
}

/**
 * {@link makeViolation} for the full analysis's hot paths: the id lists are taken as they are, so
 * each must be a fresh array the caller gives up, already sorted and without repeats (a single id
 * always is). Copying three one-id arrays per violation was a good part of the analysis's garbage.
 *
 * @example
 * violationOf('split', 'error', [b.stageId], [b.resourceId], [b.id], message, details)
 */
export function violationOf(
  kind: ViolationKind,
  severity: Severity,
  stageIds: string[],
  resourceIds: string[],
  bookingIds: string[],
  message: string,
  details?: Record<string, unknown>,
): Violation {
  const v: Violation = { kind, severity, stageIds, resourceIds, bookingIds, message };
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

const BAR = 124; // '|'
const COMMA = 44; // ','

/**
 * Compares one list of ids as it stands in two keys (`a,b,c`), and what follows it (`|`).
 * Returns the order, or NaN when the lists' texts tie in a way only the full keys can settle (an
 * id holding ',' or '|').
 */
function compareIdLists(x: readonly string[], y: readonly string[]): number {
  const n = Math.min(x.length, y.length);
  for (let i = 0; i < n; i++) {
    const a = x[i] as string,
      b = y[i] as string;
    if (a === b) continue;
    // The texts differ inside these ids unless one is a prefix of the other; then the shorter
    // one's separator meets the longer one's next character.
    const m = Math.min(a.length, b.length);
    for (let k = 0; k < m; k++) {
      const d = a.charCodeAt(k) - b.charCodeAt(k);
      if (d !== 0) return d;
    }
    const sepA = i + 1 < x.length ? COMMA : BAR,
      sepB = i + 1 < y.length ? COMMA : BAR;
    const d = a.length < b.length ? sepA - b.charCodeAt(m) : a.charCodeAt(m) - sepB;
    return d === 0 ? Number.NaN : d;
  }
  if (x.length === y.length) return 0;
  if (n > 0) return x.length > y.length ? COMMA - BAR : BAR - COMMA; // one goes on (',') where the other ends ('|')
  // An empty list ends at once ('|') where the other's first id begins.
  const d = x.length === 0 ? BAR - firstChar(y) : firstChar(x) - BAR;
  return d === 0 ? Number.NaN : d;
}

/** The first character of a non-empty list's text (NaN, settled by the full keys, for an empty first id). */
function firstChar(list: readonly string[]): number {
  const first = list[0] as string;
  return first.length > 0 ? first.charCodeAt(0) : Number.NaN;
}

/**
 * The order of two violations' keys ({@link violationKey}) without building them: field by
 * field, which gives the same order as comparing the joined text (the full keys settle the rare
 * tie field by field can't).
 *
 * @example
 * violations.slice().sort(compareViolations)
 */
export function compareViolations(a: Violation, b: Violation): number {
  let d: number;
  if (a.kind !== b.kind) d = compareText(a.kind, b.kind);
  else if (a.severity !== b.severity) d = compareText(a.severity, b.severity);
  else {
    d = compareIdLists(a.stageIds, b.stageIds);
    if (d === 0) d = compareIdLists(a.resourceIds, b.resourceIds);
    if (d === 0) d = compareIdLists(a.bookingIds, b.bookingIds);
    if (d === 0) return a.message < b.message ? -1 : a.message > b.message ? 1 : 0;
  }
  if (Number.isNaN(d)) {
    const ka = violationKey(a),
      kb = violationKey(b);
    return ka < kb ? -1 : ka > kb ? 1 : 0;
  }
  return d;
}

/** Two words that are followed by '|' in the key (a kind or a severity). */
function compareText(a: string, b: string): number {
  const m = Math.min(a.length, b.length);
  for (let k = 0; k < m; k++) {
    const d = a.charCodeAt(k) - b.charCodeAt(k);
    if (d !== 0) return d;
  }
  const d = a.length < b.length ? BAR - b.charCodeAt(m) : a.charCodeAt(m) - BAR;
  return d === 0 ? Number.NaN : d;
}

/**
 * Removes duplicates and sorts violations by key (errors and warnings mixed, stable order).
 * Of equal violations the first is kept.
 *
 * @example
 * normaliseViolations([v, v]).length // 1
 */
export function normaliseViolations(list: readonly Violation[]): Violation[] {
  return normaliseOwnViolations(list.slice());
}

/**
 * {@link normaliseViolations} of a list the caller gives up: sorted and compacted in place
 * (the full analysis's own list, not worth a copy).
 *
 * @example
 * normaliseOwnViolations(out) === out // true
 */
export function normaliseOwnViolations(list: Violation[]): Violation[] {
  // A stable sort keeps equal keys in list order, so the first of each run is the one kept.
  list.sort(compareViolations);
  let n = 0;
  for (let i = 0; i < list.length; i++) {
    const v = list[i] as Violation;
    if (n > 0 && compareViolations(list[n - 1] as Violation, v) === 0) continue;
    list[n++] = v;
  }
  list.length = n;
  return list;
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
