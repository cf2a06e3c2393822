import { SchedulerError } from './errors.js';
import { holidayDaysOf } from './holidays.js';
import {
  DAY_MS,
  MINUTE_MS,
  assertTimeZone,
  localToInstant,
  offsetSpanAt,
  weekdayOfDay,
  type OffsetSpan,
} from './time-zone.js';
import type { Instant, Interval, WorkingCalendar } from './types.js';

/** How far the engine looks for working time before giving up (about ten years). */
const SEARCH_DAYS = 3660;
const EMPTY: readonly number[] = [];

/**
 * A calendar prepared for fast arithmetic: working intervals per local day are worked out once
 * and cached (flat [start0, end0, start1, end1, …] in epoch ms). Build with {@link compileCalendar}.
 */
export interface CompiledCalendar {
  readonly source: WorkingCalendar;
  readonly timeZone: string;
  /** Local day number holding an instant. */
  dayOf(instant: Instant): number;
  /** Working intervals of a local day, flat [s0, e0, s1, e1, …], sorted, in epoch ms. */
  dayIntervals(day: number): readonly number[];
  /** Working milliseconds from a fixed origin to the instant (differences give working time). */
  workedUntil(instant: Instant): number;
}

class CalendarImpl implements CompiledCalendar {
  readonly source: WorkingCalendar;
  readonly timeZone: string;
  // Day intervals by local day, in a dense array from dayBase (days in use span a year or two, so
  // an array beats a Map on the hot path). Far-off days fall back to the Map.
  private dayBase = 0;
  private dayArr: (readonly number[] | undefined)[] = [];
  private readonly farDays = new Map<number, readonly number[]>();
  private readonly closures: number[];
  private cumBase = 0;
  private cum: number[] = [];
  /** The zone's offset over a span of time, from the last look-up (empty at first). */
  private readonly span: OffsetSpan = { lo: 0, hi: 0, offset: 0 };

  constructor(cal: WorkingCalendar) {
    validateCalendar(cal);
    this.source = cal;
    this.timeZone = cal.timeZone;
    const sorted = (cal.closures ?? []).map((c) => [c.start, c.end] as const).sort((a, b) => a[0] - b[0]);
    const merged: number[] = [];
    for (const [s, e] of sorted) {
      const n = merged.length;
      if (n > 0 && s <= (merged[n - 1] as number)) merged[n - 1] = Math.max(merged[n - 1] as number, e);
      else merged.push(s, e);
    }
    this.closures = merged;
  }

  dayOf(instant: Instant): number {
    // Inside the span of the last offset looked up (clocks change twice a year) this is one sum, small
    // enough to be inlined; a call with an instant would box it on the heap, on every calendar step.
    const span = this.span;
    if (instant >= span.lo && instant < span.hi) return Math.floor((instant + span.offset) / DAY_MS);
    return this.dayOfElsewhere(instant);
  }

  private dayOfElsewhere(instant: Instant): number {
    offsetSpanAt(this.timeZone, instant, this.span);
    return Math.floor((instant + this.span.offset) / DAY_MS);
  }

  dayIntervals(day: number): readonly number[] {
    // The day already built is the hot path: kept this small, it is inlined into the arithmetic
    // below (and its callers), which then has room left to inline the rest of its steps too.
    const hit = this.dayArr[day - this.dayBase];
    return hit !== undefined ? hit : this.dayIntervalsToBuild(day);
  }

  /** {@link dayIntervals} of a day not built yet, or outside the dense array. */
  private dayIntervalsToBuild(day: number): readonly number[] {
    const i = day - this.dayBase;
    const arr = this.dayArr;
    if (i >= 0 && i < arr.length) {
      const built = this.build(day);
      arr[i] = built;
      return built;
    }
    if (arr.length === 0) {
      this.dayBase = day - 366;
      this.dayArr = new Array<readonly number[] | undefined>(3 * 366).fill(undefined);
      return this.dayIntervals(day);
    }
    // Grow towards the day when it is near (within about four years), else keep it aside.
    if (i < 0 && i > -1500) {
      const grow = -i + 366;
      this.dayArr = new Array<readonly number[] | undefined>(grow).fill(undefined).concat(arr);
      this.dayBase -= grow;
      return this.dayIntervals(day);
    }
    if (i >= arr.length && i < arr.length + 1500) {
      const target = i + 366;
      while (arr.length < target) arr.push(undefined);
      return this.dayIntervals(day);
    }
    let far = this.farDays.get(day);
    if (far === undefined) {
      far = this.build(day);
      this.farDays.set(day, far);
    }
    return far;
  }

  workedUntil(instant: Instant): number {
    const day = this.dayOf(instant);
    // The running total is nearly always there already: read it here, since a double handed back
    // from a call (cumAt's) is boxed on the heap, and this runs for every working-time difference.
    const i = day - this.cumBase;
    const cum = this.cum;
    const before = i >= 0 && i < cum.length ? (cum[i] as number) : this.cumAt(day);
    return before + workedBefore(this.dayIntervals(day), instant);
  }

  /**
   * Working minutes from `start` to `end`: (workedUntil(end) - workedUntil(start)) / MINUTE_MS
   * written out, so the two large running totals never leave this function (each would be boxed
   * on the heap), nor does their difference in milliseconds: whole minutes come back as small
   * integers, which need no box.
   */
  minutesBetween(start: Instant, end: Instant): number {
    // End first, as workedUntil(end) - workedUntil(start) would ask (cumAt may grow the totals).
    const b = this.dayOf(end);
    let i = b - this.cumBase;
    const atEnd =
      (i >= 0 && i < this.cum.length ? (this.cum[i] as number) : this.cumAt(b)) +
      workedBefore(this.dayIntervals(b), end);
    const a = this.dayOf(start);
    i = a - this.cumBase;
    const atStart =
      (i >= 0 && i < this.cum.length ? (this.cum[i] as number) : this.cumAt(a)) +
      workedBefore(this.dayIntervals(a), start);
    return (atEnd - atStart) / MINUTE_MS;
  }

  private cumAt(day: number): number {
    const cum = this.cum;
    if (cum.length === 0) {
      this.cumBase = day;
      cum.push(0);
    }
    let i = day - this.cumBase;
    // Working time is counted day by day from the first day asked about: a span of more than about
    // ten years is refused rather than counted (year 9999 would take minutes and block everyone).
    if (i < -SEARCH_DAYS || i > cum.length + SEARCH_DAYS) {
      throw tooFar(this.source.id);
    }
    if (i < 0) {
      // Prepend earlier days with negative totals so the origin (and every value handed out) stays put.
      const part: number[] = new Array<number>(-i);
      let acc = cum[0] as number;
      for (let d = this.cumBase - 1, k = -i - 1; d >= day; d--, k--) {
        acc -= dayLength(this.dayIntervals(d));
        part[k] = acc;
      }
      this.cum = part.concat(cum);
      this.cumBase = day;
      i = 0;
    }
    const c = this.cum;
    while (c.length <= i) {
      const d = this.cumBase + c.length - 1;
      c.push((c[c.length - 1] as number) + dayLength(this.dayIntervals(d)));
    }
    return c[i] as number;
  }

  private build(day: number): readonly number[] {
    const cal = this.source;
    const ranges = cal.weekly[weekdayOfDay(day)] ?? [];
    if (ranges.length === 0) return EMPTY;
    if (holidayDaysOf(cal).has(day)) return EMPTY;
    const out: number[] = [];
    const sortedRanges = ranges.slice().sort((a, b) => a[0] - b[0]);
    for (const [sm, em] of sortedRanges) {
      const s = localToInstant(this.timeZone, day, sm);
      const e = em >= 1440 ? localToInstant(this.timeZone, day + 1, 0) : localToInstant(this.timeZone, day, em);
      if (e <= s) continue; // a range lost to a spring clock change
      const n = out.length;
      if (n > 0 && s <= (out[n - 1] as number)) out[n - 1] = Math.max(out[n - 1] as number, e);
      else out.push(s, e);
    }
    return this.closures.length === 0 ? out : subtractClosures(out, this.closures);
  }
}

function subtractClosures(ivs: number[], closures: number[]): number[] {
  const out: number[] = [];
  for (let i = 0; i < ivs.length; i += 2) {
    let s = ivs[i] as number;
    const e = ivs[i + 1] as number;
    // first closure that might overlap: binary search on closure ends
    let lo = 0,
      hi = closures.length / 2;
    while (lo < hi) {
      const mid = (lo + hi) >> 1;
      if ((closures[mid * 2 + 1] as number) <= s) lo = mid + 1;
      else hi = mid;
    }
    for (let c = lo; c < closures.length / 2 && s < e; c++) {
      const cs = closures[c * 2] as number,
        ce = closures[c * 2 + 1] as number;
      if (cs >= e) break;
      if (cs > s) out.push(s, cs);
      s = Math.max(s, ce);
    }
    if (s < e) out.push(s, e);
  }
  return out;
}

function validateCalendar(cal: WorkingCalendar): void {
  assertTimeZone(cal.timeZone);
  if (!Array.isArray(cal.weekly) || cal.weekly.length !== 7) {
    throw new SchedulerError('invalid_calendar', `Calendar ${cal.id} needs working hours for all seven weekdays`);
  }
  for (const day of cal.weekly) {
    for (const r of day) {
      const [s, e] = r;
      if (!(Number.isFinite(s) && Number.isFinite(e) && s >= 0 && e <= 1440 && s < e)) {
        throw new SchedulerError(
          'invalid_calendar',
          `Calendar ${cal.id} has working hours ${s}–${e}, which are not minutes of a day`,
        );
      }
    }
  }
  for (const c of cal.closures ?? []) {
    if (!(c.end >= c.start))
      throw new SchedulerError('invalid_interval', `Calendar ${cal.id} has a closure that ends before it starts`);
  }
}

const compiled = new WeakMap<WorkingCalendar, CompiledCalendar>();

/**
 * Prepares a calendar for fast arithmetic; cached per calendar object (calendars are treated as
 * immutable: build a new object to change one).
 *
 * @example
 * const c = compileCalendar({ id: 'firm', timeZone: 'Europe/London', weekly: MON_FRI_8_TO_5 })
 */
export function compileCalendar(cal: WorkingCalendar | CompiledCalendar): CompiledCalendar {
  if (cal instanceof CalendarImpl) return cal;
  const src = cal as WorkingCalendar;
  let c = compiled.get(src);
  if (c === undefined) {
    c = new CalendarImpl(src);
    compiled.set(src, c);
  }
  return c;
}

type Cal = WorkingCalendar | CompiledCalendar;

function checkInstant(t: number, what: string): void {
  if (!Number.isFinite(t)) throw new RangeError(`${what} must be a finite epoch-millisecond instant`);
}

/**
 * Adds working time to an instant; negative minutes go back. Landing exactly at the end of a
 * working interval returns that end (not the next start), so add-then-subtract returns the start.
 *
 * @example
 * // Friday 16:00 + 2 working hours on Mon–Fri 08:00–17:00 → Monday 09:00
 * addWorkingMinutes(firm, fri1600, 120)
 */
export function addWorkingMinutes(cal: Cal, instant: Instant, minutes: number): Instant {
  checkInstant(instant, 'instant');
  if (!Number.isFinite(minutes)) throw new RangeError('minutes must be finite');
  const c = compileCalendar(cal);
  let remaining = Math.abs(minutes) * MINUTE_MS;
  if (remaining === 0) return instant;
  let day = c.dayOf(instant);
  if (minutes > 0) {
    for (let n = 0; n < SEARCH_DAYS; n++, day++) {
      const ivs = c.dayIntervals(day);
      for (let i = 0; i < ivs.length; i += 2) {
        const e = ivs[i + 1] as number;
        if (e <= instant) continue;
        const from = Math.max(ivs[i] as number, instant);
        const avail = e - from;
        if (remaining <= avail) return from + remaining;
        remaining -= avail;
      }
    }
  } else {
    for (let n = 0; n < SEARCH_DAYS; n++, day--) {
      const ivs = c.dayIntervals(day);
      for (let i = ivs.length - 2; i >= 0; i -= 2) {
        const s = ivs[i] as number;
        if (s >= instant) continue;
        const to = Math.min(ivs[i + 1] as number, instant);
        const avail = to - s;
        if (remaining <= avail) return to - remaining;
        remaining -= avail;
      }
    }
  }
  throw noWorkingTime(c);
}

/**
 * The first instant at or after `instant` that is inside working time.
 *
 * @example
 * nextWorkingInstant(firm, sat1000) // Monday 08:00
 */
export function nextWorkingInstant(cal: Cal, instant: Instant): Instant {
  checkInstant(instant, 'instant');
  const c = compileCalendar(cal);
  let day = c.dayOf(instant);
  for (let n = 0; n < SEARCH_DAYS; n++, day++) {
    const ivs = c.dayIntervals(day);
    for (let i = 0; i < ivs.length; i += 2) {
      if ((ivs[i + 1] as number) > instant) return Math.max(ivs[i] as number, instant);
    }
  }
  throw noWorkingTime(c);
}

/**
 * True when work may be going on at the instant (inside [start, end) of a working interval).
 *
 * @example
 * isWorkingInstant(firm, mon0900) // true
 */
export function isWorkingInstant(cal: Cal, instant: Instant): boolean {
  const c = compileCalendar(cal);
  const ivs = c.dayIntervals(c.dayOf(instant));
  for (let i = 0; i < ivs.length; i += 2) {
    if ((ivs[i] as number) <= instant && instant < (ivs[i + 1] as number)) return true;
  }
  return false;
}

/**
 * True when working time runs right up to the instant (inside (start, end] of an interval):
 * a booking may end here.
 *
 * @example
 * isWorkingEnd(firm, mon1700) // true
 */
export function isWorkingEnd(cal: Cal, instant: Instant): boolean {
  const c = compileCalendar(cal);
  const ivs = c.dayIntervals(c.dayOf(instant - 1));
  for (let i = 0; i < ivs.length; i += 2) {
    if ((ivs[i] as number) < instant && instant <= (ivs[i + 1] as number)) return true;
  }
  return false;
}

/**
 * A working week by its name when the board gives one ('The working week "Standard week"'), else by
 * its id: how the engine's refusals name a calendar.
 *
 * @example
 * calendarWords(compileCalendar({ ...week, name: 'Late shift' })) // 'The working week "Late shift"'
 */
export function calendarWords(c: CompiledCalendar): string {
  const name = c.source.name;
  return typeof name === 'string' && name.trim() !== '' ? `The working week "${name}"` : `Calendar ${c.source.id}`;
}

/** A week with no working time to count or search in (every day unworked, or closed, for ten years). */
function noWorkingTime(c: CompiledCalendar): SchedulerError {
  return new SchedulerError(
    'no_working_time',
    `${calendarWords(c)} has no working time within ten years: nothing can be booked on it until it has working hours.`,
    { calendarId: c.source.id },
  );
}

/**
 * A time more than about ten years from the rest of the plan (year 9999 typed in a date box), in the
 * words of whoever chose it; which calendar refused is in the details, for the log.
 */
function tooFar(calendarId: string): SchedulerError {
  return new SchedulerError(
    'out_of_range',
    'That is more than ten years from the rest of the plan: working time is not counted across more than ten years.',
    { calendarId },
  );
}

/**
 * Working minutes between two instants (negative when `end` is before `start`).
 *
 * @example
 * workingMinutesBetween(firm, mon0800, tue1700) // 1080
 */
export function workingMinutesBetween(cal: Cal, start: Instant, end: Instant): number {
  checkInstant(start, 'start');
  checkInstant(end, 'end');
  const c = compileCalendar(cal);
  // Refused before any counting, so the calendar's running totals are never started from a far-off day.
  if (Math.abs(end - start) > SEARCH_DAYS * DAY_MS) {
    throw tooFar(c.source.id);
  }
  return (c as CalendarImpl).minutesBetween(start, end);
}

/**
 * Working intervals overlapping a range, clipped to it and merged across midnight. The board
 * shades everything else.
 *
 * @example
 * workingIntervals(firm, { start: mon0000, end: wed0000 }) // [{Mon 08–17}, {Tue 08–17}]
 */
export function workingIntervals(cal: Cal, range: Interval): Interval[] {
  checkInstant(range.start, 'range.start');
  checkInstant(range.end, 'range.end');
  if (range.end < range.start) throw new SchedulerError('invalid_interval', 'The range ends before it starts');
  const c = compileCalendar(cal);
  const out: Interval[] = [];
  const last = c.dayOf(range.end);
  for (let day = c.dayOf(range.start); day <= last; day++) {
    const ivs = c.dayIntervals(day);
    for (let i = 0; i < ivs.length; i += 2) {
      const s = Math.max(ivs[i] as number, range.start);
      const e = Math.min(ivs[i + 1] as number, range.end);
      if (e <= s) continue;
      const prev = out[out.length - 1];
      if (prev !== undefined && prev.end >= s) prev.end = Math.max(prev.end, e);
      else out.push({ start: s, end: e });
    }
  }
  return out;
}

/**
 * Number of local days with any working time in [day of start, day of end): dates, not hours.
 * Negative when end is before start.
 *
 * @example
 * countWorkingDays(firmEngland, fri2026_12_18, mon2027_01_04) // 8 (25, 28 Dec and 1 Jan are off)
 */
export function countWorkingDays(cal: Cal, start: Instant, end: Instant): number {
  checkInstant(start, 'start');
  checkInstant(end, 'end');
  if (end < start) return -countWorkingDays(cal, end, start);
  const c = compileCalendar(cal);
  let n = 0;
  const last = c.dayOf(end);
  for (let day = c.dayOf(start); day < last; day++) if (c.dayIntervals(day).length > 0) n++;
  return n;
}

function workedBefore(ivs: readonly number[], t: number): number {
  let w = 0;
  for (let i = 0; i < ivs.length; i += 2) {
    const s = ivs[i] as number,
      e = ivs[i + 1] as number;
    if (t > s) w += Math.min(e, t) - s;
  }
  return w;
}

function dayLength(ivs: readonly number[]): number {
  let w = 0;
  for (let i = 0; i < ivs.length; i += 2) w += (ivs[i + 1] as number) - (ivs[i] as number);
  return w;
}

function atOffset(ivs: readonly number[], offset: number): number {
  let left = offset;
  for (let i = 0; i < ivs.length; i += 2) {
    const s = ivs[i] as number,
      len = (ivs[i + 1] as number) - s;
    if (left <= len) return s + left;
    left -= len;
  }
  return ivs[ivs.length - 1] as number;
}

/**
 * Moves a whole number of working days, keeping the position within the working day (work done
 * so far that day). From Friday 17:00, +1 is Monday 17:00; from Tuesday 10:00, +5 is next
 * Tuesday 10:00; an instant outside working time moves from the next (or, going back, the
 * previous) working day's edge.
 *
 * @example
 * addWorkingDays(firm, tue1000, 5) // next Tuesday 10:00 (no holidays in between)
 */
export function addWorkingDays(cal: Cal, instant: Instant, days: number): Instant {
  checkInstant(instant, 'instant');
  if (!Number.isInteger(days)) throw new RangeError('days must be a whole number');
  if (days === 0) return instant;
  const c = compileCalendar(cal);
  let day = c.dayOf(instant);
  let ivs = c.dayIntervals(day);
  let offset: number;
  const first = ivs[0],
    last = ivs[ivs.length - 1];
  const step = days > 0 ? 1 : -1;
  if (first !== undefined && last !== undefined && instant >= first && instant <= last) {
    offset = workedBefore(ivs, instant);
  } else if (days > 0 && first !== undefined && instant < first) {
    offset = 0;
  } else if (days < 0 && last !== undefined && instant > last) {
    offset = dayLength(ivs);
  } else {
    let n = 0;
    do {
      day += step;
      ivs = c.dayIntervals(day);
      n++;
    } while (ivs.length === 0 && n < SEARCH_DAYS);
    if (ivs.length === 0) throw noWorkingTime(c);
    offset = days > 0 ? 0 : dayLength(ivs);
  }
  let left = Math.abs(days);
  for (let n = 0; left > 0; n++) {
    if (n > SEARCH_DAYS) throw noWorkingTime(c);
    day += step;
    ivs = c.dayIntervals(day);
    if (ivs.length > 0) left--;
  }
  return atOffset(ivs, Math.min(offset, dayLength(ivs)));
}
