import type { Interval, WeeklyHours, WorkingCalendar } from './types.js';

/** A resource's own working pattern on top of its firm's calendar. */
export interface ResourceCalendarOptions {
  /** Id of the combined calendar; default `${firm.id}+resource`. */
  id?: string;
  /** The resource's own weekly hours, replacing the firm's. */
  weekly?: WeeklyHours | null;
  /** Holiday leave, sickness, a machine in for service: no work in these spans. */
  absences?: Interval[];
}

/**
 * The calendar a resource actually works to: the firm's time zone, holidays and closures, the
 * resource's own weekly hours (when given) and its absences. Returns a new object.
 *
 * @example
 * const dave = resourceCalendar(firm, { id: 'dave', weekly: MON_THU_7_TO_4, absences: [fortnightInAugust] })
 */
export function resourceCalendar(firm: WorkingCalendar, options: ResourceCalendarOptions = {}): WorkingCalendar {
  return {
    id: options.id ?? `${firm.id}+resource`,
    timeZone: firm.timeZone,
    weekly: (options.weekly ?? firm.weekly).map((day) => day.map((r) => [r[0], r[1]] as const)),
    holidayRegion: firm.holidayRegion ? { ...firm.holidayRegion } : null,
    ...(firm.holidays ? { holidays: firm.holidays } : {}),
    closures: [...(firm.closures ?? []), ...(options.absences ?? [])].map((c) => ({ start: c.start, end: c.end })),
  };
}

/**
 * Weekly hours with the same working ranges on the listed weekdays (0 = Sunday).
 *
 * @example
 * weeklyHours([1, 2, 3, 4, 5], [[8 * 60, 17 * 60]]) // Monday–Friday 08:00–17:00
 */
export function weeklyHours(weekdays: readonly number[], ranges: readonly (readonly [number, number])[]): WeeklyHours {
  return Array.from({ length: 7 }, (_, d) => (weekdays.includes(d) ? ranges.map((r) => [r[0], r[1]] as const) : []));
}
