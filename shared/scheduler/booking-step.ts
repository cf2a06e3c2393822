import {
  calendarWords,
  compileCalendar,
  isWorkingInstant,
  nextWorkingInstant,
  type CompiledCalendar,
} from './calendar.js';
import { SchedulerError } from './errors.js';
import { workWords } from './format.js';
import { MINUTE_MS, localToInstant, timeZoneOffset } from './time-zone.js';
import type { Instant, Stage, WorkingCalendar } from './types.js';

/**
 * The booking step when a caller names none: a quarter of an hour (common practice, no source).
 *
 * @example
 * DEFAULT_BOOKING_STEP_MINUTES // 15
 */
export const DEFAULT_BOOKING_STEP_MINUTES = 15;

/**
 * Throws RangeError unless the step is a whole number of minutes from 1 to 1440.
 *
 * @example
 * assertBookingStep(15) // ok
 * assertBookingStep(7.5) // RangeError
 */
export function assertBookingStep(stepMinutes: number): void {
  if (!(Number.isInteger(stepMinutes) && stepMinutes >= 1 && stepMinutes <= 1440)) {
    throw new RangeError(`A booking step must be a whole number of minutes from 1 to 1440, not ${stepMinutes}`);
  }
}

function round(instant: Instant, timeZone: string, stepMinutes: number, up: boolean): Instant {
  if (!Number.isFinite(instant)) throw new RangeError('An instant must be finite');
  assertBookingStep(stepMinutes);
  const step = stepMinutes * MINUTE_MS;
  const to = up ? Math.ceil : Math.floor;
  let offset = timeZoneOffset(timeZone, instant);
  let r = to((instant + offset) / step) * step - offset;
  // Across a clock change the offset at the answer differs from the one at the start: align again
  // in the new offset (London 01:52 BST on the October night rounds up to 01:00 GMT, the next
  // quarter hour the clock shows). Twice is enough: clocks change at most once a day.
  for (let i = 0; i < 2; i++) {
    const there = timeZoneOffset(timeZone, r);
    if (there === offset) break;
    offset = there;
    const again = to((r + offset) / step) * step - offset;
    r = up ? Math.max(again, instant) : Math.min(again, instant);
    if ((r + offset) % step === 0) break;
  }
  return r;
}

/**
 * The first instant at or after `instant` whose local wall-clock time (in `timeZone`) is a whole
 * number of steps past midnight: with 15 minutes, :00, :15, :30 or :45 local, also in zones whose
 * offset is not a whole hour.
 *
 * @example
 * roundUpToStep(Date.UTC(2026, 4, 12, 12, 56), 'Europe/London', 15) // Date.UTC(2026, 4, 12, 13, 0) (14:00 BST)
 * roundUpToStep(Date.UTC(2026, 0, 5, 4, 50), 'Asia/Kolkata', 60)   // Date.UTC(2026, 0, 5, 5, 30) (11:00 IST)
 */
export function roundUpToStep(
  instant: Instant,
  timeZone: string,
  stepMinutes: number = DEFAULT_BOOKING_STEP_MINUTES,
): Instant {
  return round(instant, timeZone, stepMinutes, true);
}

/**
 * The last instant at or before `instant` on a step of local time (see {@link roundUpToStep}).
 *
 * @example
 * roundDownToStep(Date.UTC(2026, 4, 12, 11, 37), 'Europe/London', 15) // Date.UTC(2026, 4, 12, 11, 30) (12:30 BST)
 */
export function roundDownToStep(
  instant: Instant,
  timeZone: string,
  stepMinutes: number = DEFAULT_BOOKING_STEP_MINUTES,
): Instant {
  return round(instant, timeZone, stepMinutes, false);
}

type Cal = WorkingCalendar | CompiledCalendar;

const longestDay = new WeakMap<WorkingCalendar, number>();

/**
 * The longest working day of a calendar's week, in working minutes (the weekly hours, merged;
 * holidays and closures only ever shorten a day).
 *
 * @example
 * longestWorkingDayMinutes(electricians) // 540 (Mon–Fri 07:30–16:30; Saturday's 08:00–12:00 is shorter)
 */
export function longestWorkingDayMinutes(cal: Cal): number {
  const source = compileCalendar(cal).source;
  let n = longestDay.get(source);
  if (n === undefined) {
    n = 0;
    for (const day of source.weekly) {
      const ranges = day.slice().sort((a, b) => a[0] - b[0]);
      let total = 0,
        reach = 0;
      for (const [s, e] of ranges) {
        const from = Math.max(s, reach);
        if (e > from) total += e - from;
        reach = Math.max(reach, e);
      }
      n = Math.max(n, total);
    }
    longestDay.set(source, n);
  }
  return n;
}

/**
 * True when a stage's bookings on this calendar must be done within one working day: it is no
 * longer than the calendar's longest working day and its template does not let it continue next day.
 *
 * @example
 * mustFitInOneDay({ ...connectStage, durationMinutes: 240 }, electricians) // true
 * mustFitInOneDay({ ...wallsStage, durationMinutes: 960 }, groundworks)    // false: longer than a day
 */
export function mustFitInOneDay(stage: Pick<Stage, 'durationMinutes' | 'mayContinueNextDay'>, cal: Cal): boolean {
  return (
    stage.mayContinueNextDay !== true &&
    stage.durationMinutes > 0 &&
    stage.durationMinutes <= longestWorkingDayMinutes(cal)
  );
}

/** Working milliseconds of a day's intervals from `t` on. */
function workLeft(ivs: readonly number[], t: number): number {
  let w = 0;
  for (let i = 0; i < ivs.length; i += 2) {
    const s = Math.max(ivs[i] as number, t),
      e = ivs[i + 1] as number;
    if (e > s) w += e - s;
  }
  return w;
}

/** Options for {@link bookableStart}. */
export interface BookableStartOptions {
  /** Booking step in minutes (default 15). */
  stepMinutes?: number;
  /** Working minutes that must fit in the rest of the start's local day (a stage that can't continue next day). */
  fitMinutes?: number;
}

/**
 * The first start at or after `instant` a person would book: inside working time, on the booking
 * step of local time and, with `fitMinutes`, leaving that much working time on the same local day
 * (otherwise the next day's first start where it fits).
 *
 * @example
 * // Electricians Mon–Fri 07:30–16:30: 4 h from Fri 13:00 would run into Saturday, so Monday 07:30.
 * bookableStart(electricians, fri1300, { fitMinutes: 240 }) // Mon 07:30
 * bookableStart(firm, tue1256, { stepMinutes: 15 })          // Tue 13:00
 */
export function bookableStart(cal: Cal, instant: Instant, options: BookableStartOptions = {}): Instant {
  const c = compileCalendar(cal);
  const step = options.stepMinutes ?? DEFAULT_BOOKING_STEP_MINUTES;
  const fit = (options.fitMinutes ?? 0) * MINUTE_MS;
  let t = instant;
  // Each turn moves to a working instant, then to the step, then (if it doesn't fit) to the next
  // day: a few turns a day at most, within the ten years the calendar searches.
  for (let n = 0; n < 4 * 3660; n++) {
    t = nextWorkingInstant(c, t);
    const stepped = roundUpToStep(t, c.timeZone, step);
    if (stepped !== t && !isWorkingInstant(c, stepped)) {
      t = stepped;
      continue;
    }
    t = stepped;
    if (fit <= 0) return t;
    const day = c.dayOf(t);
    if (workLeft(c.dayIntervals(day), t) >= fit) return t;
    t = localToInstant(c.timeZone, day + 1, 0);
  }
  throw new SchedulerError(
    'no_working_time',
    `${calendarWords(c)} has no working day with ${workWords(fit / MINUTE_MS)} of working time within ten years: the stage can't be done in one day on it.`,
    { calendarId: c.source.id, fitMinutes: fit / MINUTE_MS },
  );
}

/**
 * The local days with working time inside [start, end) on a calendar, up to `limit` of them
 * (enough to tell one day from several).
 *
 * @example
 * workingDaysWithin(electricians, fri1300, sat0830) // [day of Fri, day of Sat]
 */
export function workingDaysWithin(cal: Cal, start: Instant, end: Instant, limit = 2): number[] {
  const c = compileCalendar(cal);
  const out: number[] = [];
  const first = c.dayOf(start),
    last = Math.min(c.dayOf(end - 1), first + 3660);
  for (let d = first; d <= last && out.length < limit; d++) {
    const ivs = c.dayIntervals(d);
    for (let i = 0; i < ivs.length; i += 2) {
      if ((ivs[i + 1] as number) > start && (ivs[i] as number) < end) {
        out.push(d);
        break;
      }
    }
  }
  return out;
}
