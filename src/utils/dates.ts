/**
 * Dates as the firm reads them, British style ("Tue 12 May").
 * Calendar dates (`YYYY-MM-DD`) name a day, not an instant, so they are never shifted by a
 * time zone; the firm's zone decides only what "today" and "this year" are, and how instants show.
 */

const CALENDAR_DATE = /^(\d{4})-(\d{2})-(\d{2})$/;

function calendarToUtc(date: string): Date | null {
  const match = CALENDAR_DATE.exec(date);
  if (!match) return null;
  const [, y, m, d] = match;
  const value = new Date(Date.UTC(Number(y), Number(m) - 1, Number(d)));
  return Number.isNaN(value.getTime()) || value.getUTCDate() !== Number(d) ? null : value;
}

/**
 * The day an address names (`?date=2026-06-01`) when the pages can show it: a real date within
 * WORK_YEARS, the one rule the API checks it by; otherwise null, and the page shows today. A link
 * typed by hand or cut short (2026-02-30, 0000-01-01, 9999-12-31) never reaches a calendar or the API.
 * @example workDateOf('2026-02-30') // null
 */
export function workDateOf(value: unknown): string | null {
  return WorkDate.safeParse(value).success ? (value as string) : null;
}

/** Today's calendar date in a time zone (the one rule, in shared/local-dates.ts). @example todayIn('Europe/London', new Date('2026-03-29T23:30:00Z')) // '2026-03-30' */
export { todayIn } from '@shared/local-dates';
import { todayIn } from '@shared/local-dates';
import { WorkDate } from '@shared/schemas/common';
import { dayNumber, localToInstant, timeZoneOffset } from '@shared/scheduler/time-zone';

/** The firm's current year, left out of the dates it shows. @example currentYearIn('Europe/London', new Date('2026-12-31T23:30:00Z')) // 2026 */
export function currentYearIn(timeZone: string, now: Parameters<typeof todayIn>[1] = new Date()): number {
  return Number(todayIn(timeZone, now).slice(0, 4));
}

export interface CalendarDateOptions {
  /** Year to leave out (usually the firm's current year); other years are shown. */
  currentYear?: number;
}

/**
 * @example formatCalendarDate('2026-05-12') // 'Tue 12 May 2026'
 * @example formatCalendarDate('2026-05-12', { currentYear: 2026 }) // 'Tue 12 May'
 */
export function formatCalendarDate(date: string | null | undefined, options: CalendarDateOptions = {}): string {
  if (!date) return '';
  const value = calendarToUtc(date);
  if (!value) return date;
  const withYear = value.getUTCFullYear() !== options.currentYear;
  return new Intl.DateTimeFormat('en-GB', {
    timeZone: 'UTC',
    weekday: 'short',
    day: 'numeric',
    month: 'short',
    ...(withYear ? { year: 'numeric' } : {}),
  })
    .format(value)
    .replace(',', '');
}

/** @example formatCalendarRange('2026-05-12', '2026-05-14', { currentYear: 2026 }) // 'Tue 12 May – Thu 14 May' */
export function formatCalendarRange(from: string | null, to: string | null, options: CalendarDateOptions = {}): string {
  if (!from && !to) return '';
  if (!from || !to || from === to) return formatCalendarDate(from ?? to, options);
  return `${formatCalendarDate(from, options)} – ${formatCalendarDate(to, options)}`;
}

/**
 * Time away as days, with the times where it starts or ends inside a day.
 * @example formatSpan({ from: '2026-12-09', to: '2026-12-09', fromTime: '13:00', toTime: null }, { currentYear: 2026 }) // 'Wed 9 Dec from 13:00'
 * @example formatSpan({ from: '2026-12-09', to: '2026-12-10', fromTime: '13:00', toTime: '12:00' }, { currentYear: 2026 }) // 'Wed 9 Dec 13:00 – Thu 10 Dec 12:00'
 */
export function formatSpan(
  span: { from: string; to: string; fromTime?: string | null; toTime?: string | null },
  options: CalendarDateOptions = {},
): string {
  const fromTime = span.fromTime ?? null,
    toTime = span.toTime ?? null;
  if (fromTime === null && toTime === null) return formatCalendarRange(span.from, span.to, options);
  const first = formatCalendarDate(span.from, options);
  if (span.from === span.to) {
    if (fromTime !== null && toTime !== null) return `${first} ${fromTime}–${toTime}`;
    return fromTime !== null ? `${first} from ${fromTime}` : `${first} until ${toTime}`;
  }
  const last = formatCalendarDate(span.to, options);
  return `${first}${fromTime === null ? '' : ` ${fromTime}`} – ${last}${toTime === null ? '' : ` ${toTime}`}`;
}

/** An instant in the firm's zone. @example formatInstant('2026-05-12T07:30:00Z', 'Europe/London') // 'Tue 12 May 2026, 08:30' */
export function formatInstant(iso: string, timeZone: string, options: CalendarDateOptions = {}): string {
  const value = new Date(iso);
  if (Number.isNaN(value.getTime())) return iso;
  const year = Number(new Intl.DateTimeFormat('en-GB', { timeZone, year: 'numeric' }).format(value));
  const parts = new Intl.DateTimeFormat('en-GB', {
    timeZone,
    weekday: 'short',
    day: 'numeric',
    month: 'short',
    ...(year !== options.currentYear ? { year: 'numeric' } : {}),
  }).format(value);
  return `${parts.replace(',', '')}, ${clockTime(value, timeZone)}`;
}

/** The 24-hour clock time of an instant in a zone. @example clockTime(new Date('2026-07-14T07:42:00Z'), 'Europe/London') // '08:42' */
function clockTime(value: Date, timeZone: string): string {
  return new Intl.DateTimeFormat('en-GB', { timeZone, hour: '2-digit', minute: '2-digit', hourCycle: 'h23' }).format(
    value,
  );
}

/**
 * From when to when, in the firm's zone: the end's time alone on the same day, else its day too.
 * @example formatInstantSpan('2026-05-12T07:30:00Z', '2026-05-12T11:30:00Z', 'Europe/London', { currentYear: 2026 }) // 'Tue 12 May, 08:30–12:30'
 * @example formatInstantSpan('2026-12-14T08:00:00Z', '2026-12-15T13:00:00Z', 'Europe/London', { currentYear: 2026 }) // 'Mon 14 Dec, 08:00 – Tue 15 Dec, 13:00'
 */
export function formatInstantSpan(
  startIso: string,
  endIso: string,
  timeZone: string,
  options: CalendarDateOptions = {},
): string {
  const start = formatInstant(startIso, timeZone, options);
  const end = formatInstant(endIso, timeZone, options);
  const [startDay, endDay] = [start.slice(0, start.lastIndexOf(', ')), end.slice(0, end.lastIndexOf(', '))];
  return startDay === endDay ? `${start}–${end.slice(end.lastIndexOf(', ') + 2)}` : `${start} – ${end}`;
}

const WEEKDAY_NAMES = ['Sun', 'Mon', 'Tue', 'Wed', 'Thu', 'Fri', 'Sat'];

/**
 * A booking's hours as a list of one day shows them (the board's day list, a crew member's day, a
 * day sheet): "08:00–12:00" within the day; running into or out of it, the other end names its day
 * by weekday and date ("Mon 14 16:00 – 10:00"), the month being plain from the page.
 *
 * @example hoursOnDay(Date.parse('2026-09-14T15:00Z'), Date.parse('2026-09-15T09:00Z'), '2026-09-15', 'Europe/London')
 * // 'Mon 14 16:00 – 10:00'
 */
export function hoursOnDay(start: number, end: number, date: string, timeZone: string): string {
  const [y, m, d] = date.split('-').map(Number) as [number, number, number];
  const day = dayNumber(y, m, d);
  const from = localToInstant(timeZone, day, 0),
    to = localToInstant(timeZone, day + 1, 0);
  const at = (t: number, inDay: boolean) => {
    const local = new Date(t + timeZoneOffset(timeZone, t));
    const time = `${String(local.getUTCHours()).padStart(2, '0')}:${String(local.getUTCMinutes()).padStart(2, '0')}`;
    return inDay ? time : `${WEEKDAY_NAMES[local.getUTCDay()]} ${local.getUTCDate()} ${time}`;
  };
  const a = at(start, start >= from);
  const b = at(end, end <= to);
  return start >= from && end <= to ? `${a}–${b}` : `${a} – ${b}`;
}

/**
 * When a kept answer was loaded, as a sentence's end: its time alone on the same day in the firm's
 * zone, else its day too.
 * @example keptSince(Date.parse('2026-12-05T07:42:00Z'), 'Europe/London', new Date('2026-12-05T10:00:00Z')) // 'at 07:42'
 * @example keptSince(Date.parse('2026-12-04T16:05:00Z'), 'Europe/London', new Date('2026-12-05T10:00:00Z')) // 'on Fri 4 Dec at 16:05'
 */
export function keptSince(at: number, timeZone: string, now: Date = new Date()): string {
  const when = new Date(at);
  const time = clockTime(when, timeZone);
  const day = todayIn(timeZone, when);
  if (day === todayIn(timeZone, now)) return `at ${time}`;
  return `on ${formatCalendarDate(day, { currentYear: currentYearIn(timeZone, now) })} at ${time}`;
}
