import Holidays from 'date-holidays';
import type { HolidayRegion } from './types.js';
import { dayNumber, weekdayOfDay } from './time-zone.js';

/** One public holiday as the working calendar sees it. */
export interface PublicHoliday {
  /** ISO date, YYYY-MM-DD, local to the region. */
  date: string;
  name: string;
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

const instances = new Map<string, Holidays>();
const years = new Map<string, PublicHoliday[]>();
const daySets = new Map<string, Set<number>>();

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
export function publicHolidays(region: HolidayRegion, year: number, options: PublicHolidaysOptions = {}): PublicHoliday[] {
  const observedOnly = options.observedOnly ?? true;
  const key = `${regionKey(region)}:${year}:${observedOnly ? 1 : 0}`;
  const cached = years.get(key);
  if (cached !== undefined) return cached.slice();
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
  return list.slice();
}

/**
 * Local day numbers that are public holidays (observed) in a region and year. Cached.
 *
 * @example
 * holidayDaySet({ country: 'GB', state: 'SCT' }, 2026).has(dayNumber(2026, 11, 30)) // true
 */
export function holidayDaySet(region: HolidayRegion, year: number): ReadonlySet<number> {
  const key = `${regionKey(region)}:${year}`;
  let set = daySets.get(key);
  if (set === undefined) {
    set = new Set(
      publicHolidays(region, year).map((h) => {
        const [y, m, d] = h.date.split('-').map(Number) as [number, number, number];
        return dayNumber(y, m, d);
      }),
    );
    daySets.set(key, set);
  }
  return set;
}
