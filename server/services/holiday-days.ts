/**
 * Public holidays for the engine's calendars, worked out on the server from date-holidays (its
 * world-wide tables stay out of the browser's bundle). The board's calendars carry the days of
 * their region for the loaded range and a margin (`holidaysFor`), and the engine reads only those
 * (shared/scheduler/holidays.ts); every server use of the engine gets its calendars from
 * `loadBoard`, so the board and the server's checks count the same days off.
 */
import Holidays from 'date-holidays';
import type { HolidayRegion, PublicHoliday as CalendarHoliday } from '../../shared/scheduler/index.ts';
import { dayNumber, isoDateOfDay, weekdayOfDay } from '../../shared/scheduler/index.ts';

/** One public holiday of a region, as date-holidays gives it (observed days by default). */
export interface PublicHoliday extends CalendarHoliday {
  /** A weekday taken off for a holiday that fell on a weekend. */
  substitute: boolean;
}

/** Options for {@link publicHolidays}. */
export interface PublicHolidaysOptions {
  /**
   * Drop a weekend original whose substitute day is listed (gov.uk lists only the weekday that is
   * taken off). Default true.
   */
  observedOnly?: boolean;
}

const DAY_MS = 86_400_000;

/**
 * How far beyond the loaded range the calendars list holidays, in days either side. The engine
 * counts working days further than the range: a notice of up to 250 working days (the most a
 * template may ask, shared/schemas/templates.ts) counted back from a booking to the order date or
 * today, lags and unbooked stages' earliest times forward from the range, and bookings of the jobs
 * in play outside it. 250 working days are about 50 weeks, so 400 days covers them with holidays
 * in between. A day beyond the margin counts as an ordinary day.
 */
export const HOLIDAY_MARGIN_DAYS = 400;

const instances = new Map<string, Holidays>();
const years = new Map<string, PublicHoliday[]>();

function regionKey(region: HolidayRegion): string {
  return region.state ? `${region.country}/${region.state}` : region.country;
}

function instance(region: HolidayRegion): Holidays {
  const key = regionKey(region);
  let h = instances.get(key);
  if (h === undefined) {
    h = region.state ? new Holidays(region.country, region.state) : new Holidays(region.country);
    instances.set(key, h);
  }
  return h;
}

/**
 * Public holidays of a region and year from date-holidays (entries of type 'public' only).
 * England and Wales: GB/ENG (GB/WLS gives the same list), Scotland GB/SCT, Northern Ireland
 * GB/NIR. Cached per region and year.
 *
 * @example
 * publicHolidays({ country: 'GB', state: 'ENG' }, 2026).map(h => h.date)
 * // ['2026-01-01', '2026-04-03', '2026-04-06', '2026-05-04', '2026-05-25', '2026-08-31',
 * //  '2026-12-25', '2026-12-28']
 */
export function publicHolidays(
  region: HolidayRegion,
  year: number,
  options: PublicHolidaysOptions = {},
): PublicHoliday[] {
  const observedOnly = options.observedOnly ?? true;
  const key = `${regionKey(region)}:${year}:${observedOnly ? 1 : 0}`;
  const cached = years.get(key);
  if (cached !== undefined) return cached.map((h) => ({ ...h }));
  const all: PublicHoliday[] = instance(region)
    .getHolidays(year)
    .filter((h) => h.type === 'public')
    .map((h) => ({ date: h.date.slice(0, 10), name: h.name, substitute: h.substitute === true }));
  let list = all;
  if (observedOnly) {
    const substitutes = all.filter((h) => h.substitute);
    list = all.filter((h) => {
      if (h.substitute) return true;
      const [y, m, d] = h.date.split('-').map(Number) as [number, number, number];
      const wd = weekdayOfDay(dayNumber(y, m, d));
      const weekend = wd === 0 || wd === 6;
      return !(weekend && substitutes.some((s) => s.name.startsWith(h.name)));
    });
  }
  years.set(key, list);
  return list.map((h) => ({ ...h }));
}

/**
 * The observed public holidays of a region from `from` − margin to `to` + margin, as the
 * calendar's `holidays` (local dates and names, oldest first). None without a region.
 *
 * @example
 * holidaysFor({ country: 'GB', state: 'SCT' }, { from: Date.UTC(2026, 10, 23), to: Date.UTC(2026, 11, 7) }, 0)
 * // [{ date: '2026-11-30', name: 'St Andrew’s Day' }]
 */
export function holidaysFor(
  region: HolidayRegion | null | undefined,
  range: { from: number; to: number },
  marginDays = HOLIDAY_MARGIN_DAYS,
): CalendarHoliday[] {
  if (!region || !Number.isFinite(range.from) || !Number.isFinite(range.to)) return [];
  const first = isoDateOfDay(Math.floor(range.from / DAY_MS) - marginDays);
  const last = isoDateOfDay(Math.floor(range.to / DAY_MS) + marginDays);
  const fromYear = Number(first.slice(0, 4));
  const toYear = Number(last.slice(0, 4));
  // Ranges are bounded by the callers (a board answer spans at most months); this is a backstop.
  if (!(toYear - fromYear <= 20)) return [];
  const out: CalendarHoliday[] = [];
  for (let year = fromYear; year <= toYear; year++) {
    for (const h of publicHolidays(region, year))
      if (h.date >= first && h.date <= last) out.push({ date: h.date, name: h.name });
  }
  return out;
}
