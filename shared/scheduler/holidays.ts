import { SchedulerError } from './errors.js';
import { dayNumber, isoDateOfDay } from './time-zone.js';
import type { PublicHoliday, WorkingCalendar } from './types.js';

const NONE: ReadonlySet<number> = new Set();
const daySets = new WeakMap<readonly PublicHoliday[], ReadonlySet<number>>();
const ISO_DATE = /^(\d{4})-(\d{2})-(\d{2})$/;

/**
 * The local day numbers a calendar keeps free as public holidays: the days its `holidays` list
 * (the engine's only source of holidays; the server fills them in for the loaded range). Cached
 * per list.
 *
 * @example
 * holidayDaysOf({ ...firm, holidays: [{ date: '2026-11-30', name: "St Andrew's Day" }] }).has(dayNumber(2026, 11, 30)) // true
 */
export function holidayDaysOf(cal: WorkingCalendar): ReadonlySet<number> {
  const list = cal.holidays;
  if (list === undefined || list.length === 0) return NONE;
  let set = daySets.get(list);
  if (set === undefined) {
    const days = new Set<number>();
    for (const h of list) {
      const m = ISO_DATE.exec(h.date);
      const day = m ? dayNumber(Number(m[1]), Number(m[2]), Number(m[3])) : NaN;
      // A date that rolls over (2026-02-30) is refused as well as one that is not a date at all.
      if (!Number.isFinite(day) || isoDateOfDay(day) !== h.date)
        throw new SchedulerError(
          'invalid_calendar',
          `Calendar ${cal.id} has a public holiday on "${String(h.date)}", which is not a date (YYYY-MM-DD)`,
        );
      days.add(day);
    }
    set = days;
    daySets.set(list, set);
  }
  return set;
}
