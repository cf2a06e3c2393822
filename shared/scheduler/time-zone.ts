import { SchedulerError } from './errors.js';
import type { Instant } from './types.js';

/**
 * Milliseconds in a nominal (24-hour) day; local day numbers count these from 1970-01-01.
 *
 * @example
 * Math.floor(instant / DAY_MS)
 */
export const DAY_MS = 86_400_000;
/**
 * Milliseconds in a minute.
 *
 * @example
 * 90 * MINUTE_MS // an hour and a half
 */
export const MINUTE_MS = 60_000;
/**
 * Milliseconds in an hour.
 *
 * @example
 * 2 * HOUR_MS
 */
export const HOUR_MS = 3_600_000;

interface ZoneCache {
  format: Intl.DateTimeFormat;
  /** Covered span [lo, hi) and, inside it, offset segments: starts[i] .. starts[i+1] has offsets[i]. */
  lo: number;
  hi: number;
  starts: number[];
  offsets: number[];
  /** Segment of the last lookup: most lookups fall in the same one. */
  hint: number;
  /** Offsets of far-off chunks (by chunk number), kept apart so one far instant costs one chunk, not every year between. */
  far: Map<number, { starts: number[]; offsets: number[] }>;
}

const zones = new Map<string, ZoneCache>();
let lastName = '';
let lastZone: ZoneCache | undefined;

function zone(timeZone: string): ZoneCache {
  if (timeZone === lastName && lastZone !== undefined) return lastZone;
  let z = zones.get(timeZone);
  if (z === undefined) {
    let format: Intl.DateTimeFormat;
    try {
      format = new Intl.DateTimeFormat('en-US', {
        timeZone,
        hourCycle: 'h23',
        year: 'numeric',
        month: 'numeric',
        day: 'numeric',
        hour: 'numeric',
        minute: 'numeric',
        second: 'numeric',
      });
    } catch {
      throw new SchedulerError('invalid_time_zone', `"${timeZone}" is not a time zone this engine knows`);
    }
    z = { format, lo: 0, hi: 0, starts: [], offsets: [], hint: 0, far: new Map() };
    zones.set(timeZone, z);
  }
  lastName = timeZone;
  lastZone = z;
  return z;
}

function exactOffset(z: ZoneCache, instant: Instant): number {
  let y = 0,
    mo = 0,
    d = 0,
    h = 0,
    mi = 0,
    s = 0;
  for (const p of z.format.formatToParts(instant)) {
    switch (p.type) {
      case 'year':
        y = Number(p.value);
        break;
      case 'month':
        mo = Number(p.value);
        break;
      case 'day':
        d = Number(p.value);
        break;
      case 'hour':
        h = Number(p.value);
        break;
      case 'minute':
        mi = Number(p.value);
        break;
      case 'second':
        s = Number(p.value);
        break;
      default:
        break;
    }
  }
  const wholeSecond = Math.floor(instant / 1000) * 1000;
  return Date.UTC(y, mo - 1, d, h, mi, s) - wholeSecond;
}

const SAMPLE_MS = 6 * HOUR_MS;
const CHUNK_MS = 366 * DAY_MS;

/** Offset segments for [from, to): sampled every 6 hours, each change narrowed to the second. */
function segments(z: ZoneCache, from: number, to: number): { starts: number[]; offsets: number[] } {
  const starts = [from];
  const offsets = [exactOffset(z, from)];
  let prevT = from,
    prev = offsets[0] as number;
  for (let t = from + SAMPLE_MS; t < to + SAMPLE_MS; t += SAMPLE_MS) {
    const probe = Math.min(t, to);
    const o = exactOffset(z, probe);
    if (o !== prev) {
      let lo = prevT,
        hi = probe; // offset(lo) = prev, offset(hi) = o
      while (hi - lo > 1000) {
        const mid = lo + Math.floor((hi - lo) / 2000) * 1000;
        if (mid <= lo) break;
        if (exactOffset(z, mid) === prev) lo = mid;
        else hi = mid;
      }
      starts.push(hi);
      offsets.push(o);
      prev = o;
    }
    prevT = probe;
    if (probe === to) break;
  }
  return { starts, offsets };
}

/** Instants further than this from the covered years are looked up in a chunk of their own. */
const FAR_MS = 4 * CHUNK_MS;

function farOffset(z: ZoneCache, instant: number): number {
  const n = Math.floor(instant / CHUNK_MS);
  let chunk = z.far.get(n);
  if (chunk === undefined) {
    chunk = segments(z, n * CHUNK_MS, (n + 1) * CHUNK_MS);
    z.far.set(n, chunk);
  }
  let i = chunk.starts.length - 1;
  while (i > 0 && (chunk.starts[i] as number) > instant) i--;
  return chunk.offsets[i] as number;
}

function cover(z: ZoneCache, instant: number): void {
  if (z.starts.length === 0) {
    const from = Math.floor(instant / CHUNK_MS) * CHUNK_MS;
    const seg = segments(z, from, from + CHUNK_MS);
    z.lo = from;
    z.hi = from + CHUNK_MS;
    z.starts = seg.starts;
    z.offsets = seg.offsets;
  }
  while (instant >= z.hi) {
    const seg = segments(z, z.hi, z.hi + CHUNK_MS);
    const lastOffset = z.offsets[z.offsets.length - 1];
    seg.starts.forEach((st, i) => {
      const o = seg.offsets[i] as number;
      if (i === 0 && o === lastOffset) return;
      z.starts.push(st);
      z.offsets.push(o);
    });
    z.hi += CHUNK_MS;
  }
  while (instant < z.lo) {
    const seg = segments(z, z.lo - CHUNK_MS, z.lo);
    if (seg.offsets[seg.offsets.length - 1] === z.offsets[0]) {
      z.starts.shift();
      z.offsets.shift();
    }
    z.starts = seg.starts.concat(z.starts);
    z.offsets = seg.offsets.concat(z.offsets);
    z.lo -= CHUNK_MS;
  }
}

/**
 * Throws SchedulerError('invalid_time_zone') unless Intl knows the zone.
 *
 * @example
 * assertTimeZone('Europe/London') // ok
 */
export function assertTimeZone(timeZone: string): void {
  zone(timeZone);
}

/**
 * Offset of local time from UTC in milliseconds at an instant (positive east of Greenwich).
 * Each zone's changes are found once per year of use (Intl, sampled every 6 hours and narrowed to
 * the second); after that a lookup is a binary search over a handful of segments.
 *
 * @example
 * timeZoneOffset('Europe/London', Date.UTC(2026, 6, 1)) // 3_600_000 (BST)
 */
export function timeZoneOffset(timeZone: string, instant: Instant): number {
  const z = zone(timeZone);
  if (!(instant >= z.lo && instant < z.hi)) {
    if (!Number.isFinite(instant)) throw new RangeError('An instant must be finite');
    if (z.starts.length > 0 && (instant < z.lo - FAR_MS || instant >= z.hi + FAR_MS)) return farOffset(z, instant);
    cover(z, instant);
  }
  const starts = z.starts;
  const h = z.hint;
  if ((starts[h] as number) <= instant && (h + 1 >= starts.length || instant < (starts[h + 1] as number)))
    return z.offsets[h] as number;
  let lo = 0,
    hi = starts.length - 1;
  while (lo < hi) {
    const mid = (lo + hi + 1) >> 1;
    if ((starts[mid] as number) <= instant) lo = mid;
    else hi = mid - 1;
  }
  z.hint = lo;
  return z.offsets[lo] as number;
}

/** A span of time over which a zone's offset stays the same (see {@link offsetSpanAt}). */
export interface OffsetSpan {
  /** First instant of the span. */
  lo: number;
  /** First instant after it (lo = hi: an empty span). */
  hi: number;
  /** The offset throughout, as {@link timeZoneOffset} gives it. */
  offset: number;
}

/**
 * Writes into `span` the zone's offset at an instant and a span around it with that same offset
 * (within the years already looked up; empty for far-off instants), so a caller can skip the
 * look-up for the next instants inside it. Allocates nothing.
 *
 * @example
 * const span = { lo: 0, hi: 0, offset: 0 }
 * offsetSpanAt('Europe/London', Date.UTC(2026, 6, 1), span) // span.offset 3_600_000, lo 29 Mar 01:00 UTC
 */
export function offsetSpanAt(timeZone: string, instant: Instant, span: OffsetSpan): void {
  const offset = timeZoneOffset(timeZone, instant);
  const z = zone(timeZone);
  span.offset = offset;
  if (!(instant >= z.lo && instant < z.hi)) {
    span.lo = instant;
    span.hi = instant;
    return;
  }
  // timeZoneOffset left the segment it used as the hint.
  const k = z.hint;
  span.lo = z.starts[k] as number;
  span.hi = k + 1 < z.starts.length ? (z.starts[k + 1] as number) : z.hi;
}

/**
 * The local day number (days since 1970-01-01 in that zone) holding an instant.
 *
 * @example
 * localDayOf('Europe/London', Date.UTC(2026, 2, 29, 23, 30)) // day of 30 March 2026 (BST)
 */
export function localDayOf(timeZone: string, instant: Instant): number {
  return Math.floor((instant + timeZoneOffset(timeZone, instant)) / DAY_MS);
}

/**
 * The instant at a local wall-clock time. A time skipped by a spring clock change maps forward
 * (01:30 on the London spring day is 02:30 BST); a time repeated in autumn takes its first
 * occurrence.
 *
 * @example
 * localToInstant('Europe/London', dayNumber(2026, 7, 1), 8 * 60) // 2026-07-01T07:00:00Z
 */
export function localToInstant(timeZone: string, day: number, minuteOfDay: number): Instant {
  const local = day * DAY_MS + minuteOfDay * MINUTE_MS;
  const before = timeZoneOffset(timeZone, local - 14 * HOUR_MS);
  const after = timeZoneOffset(timeZone, local + 14 * HOUR_MS);
  const a = local - before;
  if (before === after) return a;
  const b = local - after;
  const aValid = timeZoneOffset(timeZone, a) === before;
  const bValid = timeZoneOffset(timeZone, b) === after;
  if (aValid && bValid) return Math.min(a, b);
  if (aValid) return a;
  if (bValid) return b;
  return a;
}

/**
 * Local day number of a calendar date (month 1..12), independent of any zone.
 *
 * @example
 * dayNumber(1970, 1, 2) // 1
 */
export function dayNumber(year: number, month: number, day: number): number {
  return Math.round(Date.UTC(year, month - 1, day) / DAY_MS);
}

/**
 * ISO date (YYYY-MM-DD) of a local day number.
 *
 * @example
 * isoDateOfDay(dayNumber(2026, 12, 28)) // '2026-12-28'
 */
export function isoDateOfDay(day: number): string {
  // Plain arithmetic for four-digit years (a Date and its ISO text per day showed up in the
  // idle-hire check); anything else as a Date says it.
  if (isFourDigitYearDay(day)) {
    const c = packedCivilDate(day);
    const year = Math.floor(c / 512);
    return `${year}-${PAD2[(c >> 5) & 15] as string}-${PAD2[c & 31] as string}`;
  }
  return new Date(day * DAY_MS).toISOString().slice(0, 10);
}

const PAD2 = Array.from({ length: 32 }, (_, i) => String(i).padStart(2, '0'));
/** 1 January 1000 and 31 December 9999: the days whose dates {@link packedCivilDate} words need no Date for. */
const FIRST_PLAIN_DAY = Date.UTC(1000, 0, 1) / DAY_MS;
const LAST_PLAIN_DAY = Date.UTC(9999, 11, 31) / DAY_MS;

/**
 * True for the days of years 1000 to 9999.
 *
 * @example
 * isFourDigitYearDay(dayNumber(2026, 5, 12)) // true
 */
export function isFourDigitYearDay(day: number): boolean {
  return Number.isInteger(day) && day >= FIRST_PLAIN_DAY && day <= LAST_PLAIN_DAY;
}

/**
 * The civil date of a whole day number as one number, year * 512 + month * 32 + day of month
 * (month 1..12), so hot loops get it without an object: after H. Hinnant's civil_from_days
 * ("chrono-Compatible Low-Level Date Algorithms"), proleptic Gregorian.
 *
 * @example
 * const c = packedCivilDate(dayNumber(2026, 5, 12)) // Math.floor(c / 512) === 2026, (c >> 5) & 15 === 5, c & 31 === 12
 */
export function packedCivilDate(day: number): number {
  const z = day + 719_468;
  const era = Math.floor(z / 146_097);
  const doe = z - era * 146_097;
  const yoe = Math.floor((doe - Math.floor(doe / 1460) + Math.floor(doe / 36_524) - Math.floor(doe / 146_096)) / 365);
  const doy = doe - (365 * yoe + Math.floor(yoe / 4) - Math.floor(yoe / 100));
  const mp = Math.floor((5 * doy + 2) / 153);
  const date = doy - Math.floor((153 * mp + 2) / 5) + 1;
  const month = mp < 10 ? mp + 3 : mp - 9;
  const year = yoe + era * 400 + (month <= 2 ? 1 : 0);
  return year * 512 + month * 32 + date;
}

/**
 * Weekday of a local day number, 0 = Sunday .. 6 = Saturday.
 *
 * @example
 * weekdayOfDay(0) // 4 (1 January 1970 was a Thursday)
 */
export function weekdayOfDay(day: number): number {
  return (((day + 4) % 7) + 7) % 7;
}
