import { dayNumber, isoDateOfDay, localDayOf, localToInstant, timeZoneOffset } from './scheduler/time-zone.ts';
import { formatDayOfWeek } from './scheduler/format.ts';

/**
 * Calendar dates (`YYYY-MM-DD`) as a firm means them: a day on the firm's own clock, never a fixed
 * UTC hour. Every conversion between a firm's dates and instants goes through here, over the
 * engine's zone functions (shared/scheduler/time-zone.ts), so clock changes and firms outside the
 * UK are handled in one place.
 *
 * Where a date stands for a moment:
 * - a promised date is kept if the work is done by the END of that local day (`promisedDeadline`):
 *   the householder was promised a day, not an hour, so finishing at 08:00, 16:00 or 19:00 on the
 *   promised day is on time and only the next day is late;
 * - an order date counts from the START of that local day (`orderedFrom`): a lead time of N working
 *   days from an order placed on Monday ends at the start of work N working days later.
 */

const ISO_DATE = /^(\d{4})-(\d{2})-(\d{2})$/;

/** An instant as epoch milliseconds, or a Date. */
export type InstantLike = number | Date;

const msOf = (instant: InstantLike): number => (typeof instant === 'number' ? instant : instant.getTime());

/**
 * The local day number (days since 1970-01-01 on the zone's calendar) of a `YYYY-MM-DD` date.
 * Throws a RangeError for anything that is not a real calendar date.
 *
 * @example
 * dayOfDate('2026-03-29') // 20541
 */
export function dayOfDate(date: string): number {
  const m = ISO_DATE.exec(date);
  if (!m) throw new RangeError(`"${date}" is not a date like 2026-05-12`);
  const [y, mo, d] = [Number(m[1]), Number(m[2]), Number(m[3])];
  const day = dayNumber(y, mo, d);
  if (isoDateOfDay(day) !== date) throw new RangeError(`"${date}" is not a date on the calendar`);
  return day;
}

/**
 * The calendar date an instant falls on in a zone.
 *
 * @example
 * localDateOf(Date.UTC(2026, 2, 29, 23, 30), 'Europe/London') // '2026-03-30' (BST began that morning)
 */
export function localDateOf(instant: InstantLike, zone: string): string {
  const ms = msOf(instant);
  if (!Number.isFinite(ms)) throw new RangeError('An instant must be finite');
  return isoDateOfDay(localDayOf(zone, ms));
}

/**
 * The date `days` calendar days after (or before, when negative) a date; zones play no part.
 *
 * @example
 * addDays('2026-10-24', 1) // '2026-10-25'
 */
export function addDays(date: string, days: number): string {
  if (!Number.isInteger(days)) throw new RangeError('days must be a whole number');
  return isoDateOfDay(dayOfDate(date) + days);
}

/**
 * The instant a local day starts (local midnight, or the first moment after it where a clock change
 * skips midnight).
 *
 * @example
 * startOfLocalDay('2026-07-01', 'Europe/London') // Date.UTC(2026, 5, 30, 23) (00:00 BST)
 */
export function startOfLocalDay(date: string, zone: string): number {
  return localToInstant(zone, dayOfDate(date), 0);
}

/**
 * The instant a local day ends: the start of the next local day, an exclusive bound, so
 * `[startOfLocalDay(d), endOfLocalDay(d))` holds exactly the instants on `d` (23, 24 or 25 hours).
 *
 * @example
 * endOfLocalDay('2026-10-25', 'Europe/London') - startOfLocalDay('2026-10-25', 'Europe/London') // 25 hours
 */
export function endOfLocalDay(date: string, zone: string): number {
  return localToInstant(zone, dayOfDate(date) + 1, 0);
}

/**
 * The instant a promise "by `date`" runs out: the end of that local day (see the module's note).
 * Work finishing at or before it is on time.
 *
 * @example
 * promisedDeadline('2026-07-01', 'Europe/London') // Date.UTC(2026, 6, 1, 23) (midnight BST)
 */
export function promisedDeadline(date: string, zone: string): number {
  return endOfLocalDay(date, zone);
}

/**
 * The instant lead times count from for a unit ordered on `date`: the start of that local day.
 *
 * @example
 * orderedFrom('2026-01-12', 'Europe/London') // Date.UTC(2026, 0, 12)
 */
export function orderedFrom(date: string, zone: string): number {
  return startOfLocalDay(date, zone);
}

/**
 * The instant a promise ran out back as its calendar date (the last instant before the deadline).
 *
 * @example
 * deadlineDate(promisedDeadline('2026-07-01', 'America/New_York'), 'America/New_York') // '2026-07-01'
 */
export function deadlineDate(deadline: InstantLike, zone: string): string {
  return localDateOf(msOf(deadline) - 1, zone);
}

/**
 * Today's date in a zone.
 *
 * @example
 * todayIn('Europe/London', new Date('2026-03-29T23:30:00Z')) // '2026-03-30'
 */
export function todayIn(zone: string, now: InstantLike): string {
  return localDateOf(now, zone);
}

const CLOCK_TIME = /^([01]\d|2[0-3]):([0-5]\d)$/;

/**
 * The instant of a local wall-clock time (`HH:MM`) on a date (a time a spring clock change skips
 * maps forward, as the engine's zone functions do).
 *
 * @example
 * localTimeOn('2026-06-03', '13:00', 'Europe/London') // Date.UTC(2026, 5, 3, 12) (13:00 BST)
 */
export function localTimeOn(date: string, time: string, zone: string): number {
  const m = CLOCK_TIME.exec(time);
  if (!m) throw new RangeError(`"${time}" is not a time of day like 13:00`);
  return localToInstant(zone, dayOfDate(date), Number(m[1]) * 60 + Number(m[2]));
}

/**
 * The local wall-clock time (`HH:MM`) of an instant.
 *
 * @example
 * localTimeOf(Date.UTC(2026, 5, 3, 12), 'Europe/London') // '13:00'
 */
export function localTimeOf(instant: InstantLike, zone: string): string {
  const ms = msOf(instant);
  // The wall clock, not the time elapsed since midnight (a clock-change day is 23 or 25 hours).
  const local = ms + timeZoneOffset(zone, ms);
  const minute = Math.floor((((local % 86_400_000) + 86_400_000) % 86_400_000) / 60_000);
  return `${String(Math.floor(minute / 60)).padStart(2, '0')}:${String(minute % 60).padStart(2, '0')}`;
}

/** A span of time away as its firm reads it (see {@link localSpanOf}). */
export interface LocalSpan {
  /** First and last local day it touches, `to` included. */
  from: string;
  to: string;
  /** When it starts on the first day; null from the day's start. */
  fromTime: string | null;
  /** When it ends on the last day; null to the day's end. */
  toTime: string | null;
}

/**
 * The local days and times of `[start, end)`: whole days read as dates alone; a span that starts
 * or ends inside a day gives that time.
 *
 * @example
 * localSpanOf(Date.UTC(2026, 5, 3, 12), Date.UTC(2026, 5, 3, 23), 'Europe/London')
 * // { from: '2026-06-03', to: '2026-06-03', fromTime: '13:00', toTime: null }
 */
export function localSpanOf(start: InstantLike, end: InstantLike, zone: string): LocalSpan {
  const s = msOf(start),
    e = msOf(end);
  const from = localDateOf(s, zone);
  const endDay = localDateOf(e, zone);
  const endsAtMidnight = e === startOfLocalDay(endDay, zone);
  return {
    from,
    to: endsAtMidnight ? localDateOf(e - 1, zone) : endDay,
    fromTime: s === startOfLocalDay(from, zone) ? null : localTimeOf(s, zone),
    toTime: endsAtMidnight ? null : localTimeOf(e, zone),
  };
}

/**
 * A date as the server's sentences say it, "Tue 13 Oct" (no year: the sentence is about the plan
 * at hand); a date outside the years 1000 to 9999 as it is.
 *
 * @example
 * dateWords('2026-10-13') // 'Tue 13 Oct'
 */
export function dateWords(date: string): string {
  return formatDayOfWeek(dayOfDate(date)) ?? date;
}
