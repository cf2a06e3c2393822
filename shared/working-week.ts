import type { WeeklyHours } from './scheduler/index.ts';

/**
 * A working week as people say it ("Mon 08:00–17:00") and as the calendars store it (minutes of the
 * local day by weekday, 0 = Sunday). The firm page edits the first, the engine reads the second.
 */

/** The days of the week in the order the page lists them (a UK week starts on Monday). */
export const WEEKDAYS = ['mon', 'tue', 'wed', 'thu', 'fri', 'sat', 'sun'] as const;
export type Weekday = (typeof WEEKDAYS)[number];

/** Each day's name, for labels and sentences. */
export const WEEKDAY_NAMES: Record<Weekday, string> = {
  mon: 'Monday',
  tue: 'Tuesday',
  wed: 'Wednesday',
  thu: 'Thursday',
  fri: 'Friday',
  sat: 'Saturday',
  sun: 'Sunday',
};

/** One span of work in a day, on the firm's clock: `08:00` to `17:00` (`24:00` ends at midnight). */
export interface WorkSpan {
  from: string;
  to: string;
}

/** A week of spans by day; a day with none is not worked. */
export type WeekHours = Record<Weekday, WorkSpan[]>;

/** The stored form: weekday number (0 = Sunday) → [start, end] minutes of the local day. */
export type StoredWeeklyHours = Record<string, [number, number][]>;

/** The bank holiday regions a firm can work to, with their names. */
export const HOLIDAY_REGIONS = {
  'GB-ENG': 'England and Wales',
  'GB-SCT': 'Scotland',
  'GB-NIR': 'Northern Ireland',
} as const;
export type HolidayRegionCode = keyof typeof HOLIDAY_REGIONS;

const minutesOf = (t: string): number => Number(t.slice(0, 2)) * 60 + Number(t.slice(3, 5));
const clockOf = (m: number): string =>
  `${String(Math.floor(m / 60)).padStart(2, '0')}:${String(m % 60).padStart(2, '0')}`;
/** Sunday is 0 in the stored form, as in JavaScript's dates. */
const storedDay = (i: number): string => String((i + 1) % 7);

/**
 * The stored form of a week of spans.
 *
 * @example
 * storedWeeklyHours({ mon: [{ from: '08:00', to: '17:00' }], tue: [], … }) // { '1': [[480, 1020]], … }
 */
export function storedWeeklyHours(hours: WeekHours): StoredWeeklyHours {
  const out: StoredWeeklyHours = {};
  WEEKDAYS.forEach((d, i) => {
    const spans = hours[d];
    if (spans.length) out[storedDay(i)] = spans.map((s) => [minutesOf(s.from), minutesOf(s.to)]);
  });
  return out;
}

/**
 * A week of spans from the stored form (a day not stored is not worked).
 *
 * @example
 * weekHoursOf({ '1': [[480, 1020]] }).mon // [{ from: '08:00', to: '17:00' }]
 */
export function weekHoursOf(stored: StoredWeeklyHours): WeekHours {
  return Object.fromEntries(
    WEEKDAYS.map((d, i) => [d, (stored[storedDay(i)] ?? []).map(([a, b]) => ({ from: clockOf(a), to: clockOf(b) }))]),
  ) as WeekHours;
}

/**
 * The engine's weekly hours (index 0 = Sunday) from the stored form.
 *
 * @example
 * engineWeekly({ '1': [[480, 1020]] })[1] // [[480, 1020]]
 */
export function engineWeekly(stored: StoredWeeklyHours): WeeklyHours {
  return Array.from({ length: 7 }, (_, d) => (stored[String(d)] ?? []).map(([a, b]) => [a, b] as const));
}

const SHORT_DAY: Record<Weekday, string> = {
  mon: 'Mon',
  tue: 'Tue',
  wed: 'Wed',
  thu: 'Thu',
  fri: 'Fri',
  sat: 'Sat',
  sun: 'Sun',
};

/**
 * A week's hours in a line, as people say them: days in a row with the same hours run together
 * (Monday first), a finish at 24:00 is "midnight", and a day with two spans says both.
 *
 * @example
 * weekWords({ '1': [[480, 1020]], '2': [[480, 1020]], '3': [[480, 1020]], '4': [[480, 1020]], '5': [[480, 1020]], '6': [[480, 720]] })
 * // 'Mon–Fri 08:00–17:00; Sat 08:00–12:00'
 */
export function weekWords(stored: StoredWeeklyHours): string {
  const week = weekHoursOf(stored);
  const spansOf = (d: Weekday) => week[d].map((s) => `${s.from}–${s.to === '24:00' ? 'midnight' : s.to}`).join(' and ');
  const runs: { first: Weekday; last: Weekday; hours: string }[] = [];
  for (const d of WEEKDAYS) {
    const hours = spansOf(d);
    const last = runs.at(-1);
    if (hours === '') continue;
    if (last && last.hours === hours && WEEKDAYS.indexOf(last.last) === WEEKDAYS.indexOf(d) - 1) last.last = d;
    else runs.push({ first: d, last: d, hours });
  }
  if (runs.length === 0) return 'No working days';
  return runs
    .map((r) => {
      const days =
        r.first === r.last
          ? SHORT_DAY[r.first]
          : `${SHORT_DAY[r.first]}${WEEKDAYS.indexOf(r.last) - WEEKDAYS.indexOf(r.first) === 1 ? ', ' : '–'}${SHORT_DAY[r.last]}`;
      return `${days} ${r.hours}`;
    })
    .join('; ');
}
