import { compareBookings, resourceCalendarOf, type BoardIndex } from '../board-index.js';
import { formatInstant } from '../format.js';
import type { Booking, Violation } from '../types.js';
import { capitalise, makeViolation, resourceLabel, stageLabel, violationOf } from './violation.js';

function ordered(a: Booking, b: Booking): [Booking, Booking] {
  return compareBookings(a, b) <= 0 ? [a, b] : [b, a];
}

function overlapWords(
  index: BoardIndex,
  resourceId: string,
  a: Booking,
  b: Booking,
): { from: number; to: number; words: string } {
  const tz = resourceCalendarOf(index, resourceId).timeZone;
  const from = Math.max(a.start, b.start),
    to = Math.min(a.end, b.end);
  return { from, to, words: `from ${formatInstant(from, tz)} to ${formatInstant(to, tz)}` };
}

/**
 * " on TW-2423" when two bookings are for different jobs and the board's job has a reference (the
 * board's jobs carry one; the engine's own type needs none), so "'Excavate pit' and 'Excavate pit'"
 * says which two jobs they are.
 */
function onJob(index: BoardIndex, b: Booking, other: Booking): string {
  const jobId = index.stages.get(b.stageId)?.stage.jobId;
  if (jobId === undefined || jobId === index.stages.get(other.stageId)?.stage.jobId) return '';
  const reference = (index.jobs.get(jobId) as { reference?: unknown } | undefined)?.reference;
  return typeof reference === 'string' && reference ? ` on ${reference}` : '';
}

/**
 * Violations for two overlapping bookings of the same resource: a 'clash' (error) when one
 * installer made both; two 'cross_firm' errors (one per side, each naming only its own stage and
 * booking, "busy elsewhere") when different installer firms booked a partner's resource.
 *
 * @example
 * resourcePairViolations(index, bookingA, bookingB)
 */
export function resourcePairViolations(index: BoardIndex, x: Booking, y: Booking): Violation[] {
  return pushResourcePair(index, x, y, []);
}

/** {@link resourcePairViolations} appended to `out`. */
function pushResourcePair(index: BoardIndex, x: Booking, y: Booking, out: Violation[]): Violation[] {
  const [a, b] = ordered(x, y);
  const rid = a.resourceId;
  const { from, to, words } = overlapWords(index, rid, a, b);
  const who = capitalise(resourceLabel(index, rid));
  if (a.installerFirmId === b.installerFirmId) {
    const what =
      a.stageId === b.stageId
        ? `twice for ${stageLabel(index, a.stageId)}`
        : `for both ${stageLabel(index, a.stageId)}${onJob(index, a, b)} and ${stageLabel(index, b.stageId)}${onJob(index, b, a)}`;
    out.push(
      makeViolation(
        'clash',
        'error',
        [a.stageId, b.stageId],
        [rid],
        [a.id, b.id],
        `${who} is booked ${what} ${words}`,
        { from, to },
      ),
    );
    return out;
  }
  for (const own of [a, b]) {
    out.push(
      violationOf('cross_firm', 'error', [own.stageId], [rid], [own.id], `${who} is busy elsewhere ${words}`, {
        from,
        to,
      }),
    );
  }
  return out;
}

/**
 * Violations for one person booked on two resources (crews sharing a person, or a person booked
 * on their own and with a crew) at overlapping times. Severity error.
 *
 * @example
 * personPairViolation(index, 'p-sam', crewABooking, crewBBooking)
 */
export function personPairViolation(index: BoardIndex, personId: string, x: Booking, y: Booking): Violation {
  const [a, b] = ordered(x, y);
  const { from, to, words } = overlapWords(index, a.resourceId, a, b);
  return makeViolation(
    'person_double',
    'error',
    [a.stageId, b.stageId],
    [a.resourceId, b.resourceId],
    [a.id, b.id],
    `${capitalise(resourceLabel(index, personId))} would be in two places ${words}: with ${resourceLabel(index, a.resourceId)} on ${stageLabel(index, a.stageId)}${onJob(index, a, b)} and with ${resourceLabel(index, b.resourceId)} on ${stageLabel(index, b.stageId)}${onJob(index, b, a)}`,
    { personId, from, to },
  );
}

/**
 * Calls `visit` for every overlapping pair among the first `n` bookings of a list sorted by start
 * (sweep, O(n log n + pairs)). `active` is scratch space the caller may reuse between sweeps, and
 * `visit` gets `index` and `out` passed on, so a caller needs no closure per list.
 */
function sweep<C>(
  list: readonly Booking[],
  n: number,
  active: Booking[],
  context: C,
  out: Violation[],
  visit: (context: C, a: Booking, b: Booking, out: Violation[]) => void,
): void {
  // `active` holds the bookings still running, compacted in place; its tail beyond `live` is stale
  // (shrinking an array's length trims the heap and was slow in the benchmark).
  let live = 0;
  for (let k = 0; k < n; k++) {
    const b = list[k] as Booking;
    let keep = 0;
    for (let i = 0; i < live; i++) {
      const a = active[i] as Booking;
      if (a.end > b.start) {
        active[keep++] = a;
        visit(context, a, b, out);
      }
    }
    active[keep] = b;
    live = keep + 1;
  }
}

/**
 * Every pair of overlapping active bookings on the same resource: group by resource, sort by
 * start, sweep with the set of bookings still running. O(n log n + pairs), never pairwise.
 *
 * @example
 * overlappingPairs(board.bookings).length // number of double bookings
 */
export function overlappingPairs(bookings: readonly Booking[]): [Booking, Booking][] {
  const byResource = new Map<string, Booking[]>();
  for (const b of bookings) {
    if (b.state === 'declined') continue;
    const l = byResource.get(b.resourceId);
    if (l === undefined) byResource.set(b.resourceId, [b]);
    else l.push(b);
  }
  const out: [Booking, Booking][] = [];
  const active: Booking[] = [];
  for (const list of byResource.values()) {
    list.sort(compareBookings);
    sweep(list, list.length, active, out, [], (pairs, a, b) => {
      pairs.push([a, b]);
    });
  }
  return out;
}

/**
 * All clash and cross-firm violations on the board: one sweep per resource over its bookings
 * sorted by start, appended to `out`.
 *
 * @example
 * checkAllResourceClashes(index).filter(v => v.kind === 'clash')
 */
export function checkAllResourceClashes(index: BoardIndex, out: Violation[] = []): Violation[] {
  const active: Booking[] = [];
  for (const { list } of index.bookingsByResource.values())
    sweep(list, list.length, active, index, out, pushResourcePair);
  return out;
}

/** One person's context for {@link pushPersonPair}. */
interface PersonSweep {
  index: BoardIndex;
  personId: string;
}

function pushPersonPair(p: PersonSweep, a: Booking, b: Booking, out: Violation[]): void {
  if (a.resourceId !== b.resourceId) out.push(personPairViolation(p.index, p.personId, a, b));
}

/**
 * All one-person-in-two-places violations: one sweep per person over the bookings of every
 * resource they belong to, appended to `out`.
 *
 * @example
 * checkAllPersonDoubles(index)
 */
export function checkAllPersonDoubles(index: BoardIndex, out: Violation[] = []): Violation[] {
  // One merge buffer, sweep space and context for every person: a person is in two or three
  // crews, and a fresh list, sort and closure per person was a good part of this check's garbage.
  const all: Booking[] = [];
  const active: Booking[] = [];
  const heads: number[] = [];
  const context: PersonSweep = { index, personId: '' };
  for (const [personId, rids] of index.resourcesOfPerson) {
    if (rids.length < 2) continue;
    const n = mergeBookings(index, rids, all, heads);
    context.personId = personId;
    sweep(all, n, active, context, out, pushPersonPair);
  }
  return out;
}

/**
 * The bookings of several resources in compareBookings order, written over the start of `all`;
 * returns how many. Each resource's list is already in that order, so a merge of the few lists
 * does (a sort for many).
 */
function mergeBookings(index: BoardIndex, rids: readonly string[], all: Booking[], heads: number[]): number {
  let n = 0;
  if (rids.length > 4) {
    const many: Booking[] = [];
    for (const rid of rids) for (const b of index.bookingsByResource.get(rid)?.list ?? []) many.push(b);
    many.sort(compareBookings);
    for (const b of many) all[n++] = b;
    return n;
  }
  const lists: (readonly Booking[])[] = [];
  for (let r = 0; r < rids.length; r++) {
    lists.push(index.bookingsByResource.get(rids[r] as string)?.list ?? NO_BOOKINGS);
    heads[r] = 0;
  }
  for (;;) {
    let best = -1;
    let pick: Booking | undefined;
    for (let r = 0; r < lists.length; r++) {
      const b = (lists[r] as readonly Booking[])[heads[r] as number];
      if (b !== undefined && (pick === undefined || compareBookings(b, pick) < 0)) {
        pick = b;
        best = r;
      }
    }
    if (pick === undefined) return n;
    all[n++] = pick;
    heads[best] = (heads[best] as number) + 1;
  }
}

const NO_BOOKINGS: readonly Booking[] = Object.freeze([]);

/**
 * Bookings on a resource (from the index) overlapping [start, end), skipping one stage's own.
 * Binary search on start, bounded below by the longest booking on that resource.
 *
 * @example
 * overlappingOnResource(index, 'crane-1', start, end, 'lift-1')
 */
export function overlappingOnResource(
  index: BoardIndex,
  resourceId: string,
  start: number,
  end: number,
  skipStageId: string,
): Booking[] {
  const rb = index.bookingsByResource.get(resourceId);
  if (rb === undefined) return [];
  const { list, maxLength } = rb;
  const lowStart = start - maxLength;
  let lo = 0,
    hi = list.length;
  while (lo < hi) {
    const mid = (lo + hi) >> 1;
    if ((list[mid] as Booking).start <= lowStart) lo = mid + 1;
    else hi = mid;
  }
  const out: Booking[] = [];
  for (let i = lo; i < list.length; i++) {
    const b = list[i] as Booking;
    if (b.start >= end) break;
    if (b.end > start && b.stageId !== skipStageId) out.push(b);
  }
  return out;
}
