/**
 * The board's zoom levels and dates in our own words: which view the URL names, how far a step
 * goes, the title above the board, the header labels of each zoom level and the hours a day shows.
 * Pure (no calendar component, no clock reads beyond `todayIso`'s default), so it is tested alone.
 */
import type { WorkingCalendar } from '@shared/scheduler/index';
import { WORK_YEARS } from '@shared/schemas/common';

/** The timeline's views: a day of hours, a week of mornings and afternoons, a fortnight and a month of days. */
export type BoardViewName =
  'resourceTimelineDay' | 'resourceTimelineWeek' | 'resourceTimelineFortnight' | 'resourceTimelineMonth';

/** The `view` URL parameter. */
export const VIEW_PARAM: Record<string, BoardViewName> = {
  day: 'resourceTimelineDay',
  week: 'resourceTimelineWeek',
  fortnight: 'resourceTimelineFortnight',
  month: 'resourceTimelineMonth',
};

/** The zoom levels in the order the switch shows them, with the word for one step of each. */
export const ZOOM_LEVELS: { view: BoardViewName; param: string; label: string; unit: string }[] = [
  { view: 'resourceTimelineDay', param: 'day', label: 'Day', unit: 'day' },
  { view: 'resourceTimelineWeek', param: 'week', label: 'Week', unit: 'week' },
  { view: 'resourceTimelineFortnight', param: 'fortnight', label: 'Fortnight', unit: 'fortnight' },
  { view: 'resourceTimelineMonth', param: 'month', label: 'Month', unit: 'month' },
];

/** The word for one step of a view ("week"), for the buttons' names. */
export function unitOf(view: BoardViewName): string {
  return ZOOM_LEVELS.find((z) => z.view === view)?.unit ?? 'week';
}

/** Views whose columns are whole days: a drop lands on a day and starts at the row's first working minute. */
export function showsWholeDays(view: BoardViewName): boolean {
  return view === 'resourceTimelineFortnight' || view === 'resourceTimelineMonth';
}

const DAY = 86_400_000;
const WEEKDAYS = ['Sun', 'Mon', 'Tue', 'Wed', 'Thu', 'Fri', 'Sat'];
const WEEKDAYS_LONG = ['Sunday', 'Monday', 'Tuesday', 'Wednesday', 'Thursday', 'Friday', 'Saturday'];
const MONTHS = ['Jan', 'Feb', 'Mar', 'Apr', 'May', 'Jun', 'Jul', 'Aug', 'Sep', 'Oct', 'Nov', 'Dec'];
const MONTHS_LONG = [
  'January',
  'February',
  'March',
  'April',
  'May',
  'June',
  'July',
  'August',
  'September',
  'October',
  'November',
  'December',
];

/** Today's date in a time zone as YYYY-MM-DD. */
export function todayIso(timeZone: string, now = new Date()): string {
  return new Intl.DateTimeFormat('en-CA', { timeZone, year: 'numeric', month: '2-digit', day: '2-digit' }).format(now);
}

const utcNoon = (date: string) => new Date(`${date}T12:00:00Z`);
const iso = (d: Date) => d.toISOString().slice(0, 10);

/** The Monday of a date's week. @example mondayOf('2026-09-16') // '2026-09-14' */
export function mondayOf(date: string): string {
  const d = utcNoon(date);
  d.setUTCDate(d.getUTCDate() - ((d.getUTCDay() + 6) % 7));
  return iso(d);
}

/** One range earlier or later: a day, a week, a fortnight or a month. @example stepDate('resourceTimelineWeek', '2026-12-07', 1) // '2026-12-14' */
export function stepDate(view: BoardViewName, date: string, direction: -1 | 1): string {
  const d = utcNoon(date);
  if (view === 'resourceTimelineDay') d.setUTCDate(d.getUTCDate() + direction);
  else if (view === 'resourceTimelineWeek') d.setUTCDate(d.getUTCDate() + 7 * direction);
  else if (view === 'resourceTimelineFortnight') d.setUTCDate(d.getUTCDate() + 14 * direction);
  else {
    // From the 31st, a month on is the last day of the next month, never the 1st of the one after.
    const day = d.getUTCDate();
    d.setUTCDate(1);
    d.setUTCMonth(d.getUTCMonth() + direction);
    d.setUTCDate(Math.min(day, new Date(Date.UTC(d.getUTCFullYear(), d.getUTCMonth() + 1, 0)).getUTCDate()));
  }
  return iso(d);
}

/** "Mon 7 – Sun 13 Sep 2026"; the month and year appear once unless the span crosses them. */
export function spanTitle(first: Date, last: Date): string {
  const day = (d: Date) => `${WEEKDAYS[d.getUTCDay()]} ${d.getUTCDate()}`;
  const month = (d: Date) => MONTHS[d.getUTCMonth()];
  if (first.getUTCFullYear() !== last.getUTCFullYear())
    return `${day(first)} ${month(first)} ${first.getUTCFullYear()} – ${day(last)} ${month(last)} ${last.getUTCFullYear()}`;
  if (first.getUTCMonth() !== last.getUTCMonth())
    return `${day(first)} ${month(first)} – ${day(last)} ${month(last)} ${last.getUTCFullYear()}`;
  return `${day(first)} – ${day(last)} ${month(last)} ${last.getUTCFullYear()}`;
}

/**
 * The heading above the board.
 * @example boardTitle('resourceTimelineWeek', '2026-09-09') // 'Mon 7 – Sun 13 Sep 2026'
 * @example boardTitle('resourceTimelineMonth', '2026-12-07') // 'December 2026'
 */
export function boardTitle(view: BoardViewName, date: string): string {
  const d = utcNoon(date);
  if (view === 'resourceTimelineMonth') return `${MONTHS_LONG[d.getUTCMonth()]} ${d.getUTCFullYear()}`;
  if (view === 'resourceTimelineDay')
    return `${WEEKDAYS_LONG[d.getUTCDay()]} ${d.getUTCDate()} ${MONTHS_LONG[d.getUTCMonth()]} ${d.getUTCFullYear()}`;
  const first = utcNoon(mondayOf(date));
  const last = new Date(first.getTime() + ((view === 'resourceTimelineFortnight' ? 14 : 7) - 1) * DAY);
  return spanTitle(first, last);
}

/**
 * The instants a view of `date` shows, with a day's margin each side (so the firm's time zone never
 * cuts a booking off): what the board loads before the timeline is drawn.
 * @example rangeOf('resourceTimelineWeek', '2026-12-09') // Mon 7 Dec − 1 day … Mon 14 Dec + 1 day
 */
export function rangeOf(view: BoardViewName, date: string): { from: number; to: number } {
  const d = new Date(`${date}T00:00:00Z`);
  let start = d.getTime();
  let end = start + DAY;
  if (view === 'resourceTimelineWeek' || view === 'resourceTimelineFortnight') {
    start -= ((d.getUTCDay() + 6) % 7) * DAY;
    end = start + (view === 'resourceTimelineWeek' ? 7 : 14) * DAY;
  } else if (view === 'resourceTimelineMonth') {
    start = Date.UTC(d.getUTCFullYear(), d.getUTCMonth(), 1);
    end = Date.UTC(d.getUTCFullYear(), d.getUTCMonth() + 1, 1);
  }
  // Never past the years work is planned in (WORK_YEARS), which the API's window keeps to: the last
  // week of 2100 loads up to the year's end instead of being refused.
  return {
    from: Math.max(start - DAY, Date.UTC(WORK_YEARS.min, 0, 1)),
    to: Math.min(end + DAY, Date.UTC(WORK_YEARS.max + 1, 0, 1) - 1),
  };
}

/** The ISO 8601 week number of a calendar day (weeks start on Monday; week 1 holds the year's first Thursday). */
export function isoWeek(year: number, month: number, day: number): number {
  const thursdayOf = (t: number) => t + (3 - ((new Date(t).getUTCDay() + 6) % 7)) * DAY;
  const thursday = thursdayOf(Date.UTC(year, month, day));
  // 4 January is always in week 1.
  const firstThursday = thursdayOf(Date.UTC(new Date(thursday).getUTCFullYear(), 0, 4));
  return 1 + Math.round((thursday - firstThursday) / (7 * DAY));
}

/** A slot's local date and hour, as the calendar component hands them to a label formatter (month from 0). */
export interface SlotDate {
  year: number;
  month: number;
  day: number;
  hour: number;
}

/**
 * The header labels of each zoom level, row by row (the timeline merges neighbouring cells of a
 * row that read the same, so an upper row's text names the span it covers).
 * - day: "08:00"
 * - week: "Mon 7 Sep", then "am" / "pm"
 * - fortnight and month: "Week 37 · 7–13 Sep", then "Mon 7" (the month's on two lines)
 */
export function slotLabels(view: BoardViewName): ((d: SlotDate) => string)[] {
  const weekday = (d: SlotDate) => WEEKDAYS[new Date(Date.UTC(d.year, d.month, d.day)).getUTCDay()] ?? '';
  if (view === 'resourceTimelineDay') return [(d) => `${String(d.hour).padStart(2, '0')}:00`];
  if (view === 'resourceTimelineWeek')
    return [(d) => `${weekday(d)} ${d.day} ${MONTHS[d.month]}`, (d) => (d.hour < 12 ? 'am' : 'pm')];
  const week = (d: SlotDate) => {
    const monday = utcNoon(mondayOf(iso(new Date(Date.UTC(d.year, d.month, d.day)))));
    const sunday = new Date(monday.getTime() + 6 * DAY);
    const span =
      monday.getUTCMonth() === sunday.getUTCMonth()
        ? `${monday.getUTCDate()}–${sunday.getUTCDate()} ${MONTHS[sunday.getUTCMonth()]}`
        : `${monday.getUTCDate()} ${MONTHS[monday.getUTCMonth()]} – ${sunday.getUTCDate()} ${MONTHS[sunday.getUTCMonth()]}`;
    return `Week ${isoWeek(d.year, d.month, d.day)} · ${span}`;
  };
  return [week, view === 'resourceTimelineMonth' ? (d) => `${weekday(d)}\n${d.day}` : (d) => `${weekday(d)} ${d.day}`];
}

const hhmm = (minute: number) =>
  `${String(Math.floor(minute / 60)).padStart(2, '0')}:${String(minute % 60).padStart(2, '0')}`;

/** Slot lengths (hours) that divide a day, so the timeline's slots land on the same hours every day. */
const DAY_DIVISORS = [1, 2, 3, 4, 6, 8, 12];

/**
 * The hours the day and week views show, from every calendar's working hours. The day view shows
 * them widened to whole hours; the week splits each day into a morning and an afternoon of equal
 * length centred on noon (a length that divides the day, as the timeline needs).
 * @example workingWindow([{ weekly: [[], [[450, 1020]]] }]) // { day: { start: '07:00', end: '17:00' }, week: { start: '06:00', end: '18:00', half: '06:00' } }
 */
export function workingWindow(calendars: readonly Pick<WorkingCalendar, 'weekly'>[]): {
  day: { start: string; end: string };
  week: { start: string; end: string; half: string };
} {
  const ranges = calendars.flatMap((c) => c.weekly.flatMap((day) => day));
  const first = ranges.length ? Math.min(...ranges.map(([a]) => a)) : 8 * 60;
  const last = ranges.length ? Math.max(...ranges.map(([, b]) => b)) : 17 * 60;
  const needed = Math.max(12 * 60 - first, last - 12 * 60, 60) / 60;
  const half = DAY_DIVISORS.find((h) => h >= needed) ?? 12;
  return {
    day: { start: hhmm(Math.floor(first / 60) * 60), end: hhmm(Math.min(24 * 60, Math.ceil(last / 60) * 60)) },
    week: { start: hhmm((12 - half) * 60), end: hhmm((12 + half) * 60), half: hhmm(half * 60) },
  };
}
