import { DAY_MS, isoDateOfDay, localDayOf, localToInstant, weekdayOfDay } from '../scheduler/index.ts';

/** One report week: local Monday 00:00 to the next Monday 00:00, clipped to the report's range. */
export interface ReportWeek {
  /** The local date of the week's Monday, e.g. '2026-06-01'. */
  week: string;
  start: number;
  end: number;
}

/**
 * The weeks (Monday to Monday, local time) that a range touches, each clipped to the range.
 *
 * @example
 * weeksOf({ from: Date.UTC(2026, 5, 3), to: Date.UTC(2026, 5, 10) }, 'Europe/London')
 * // [{ week: '2026-06-01', start: from, end: Mon 8 Jun 00:00 BST }, { week: '2026-06-08', start: …, end: to }]
 */
export function weeksOf(range: { from: number; to: number }, timeZone: string): ReportWeek[] {
  if (!(range.to > range.from)) return [];
  const first = localDayOf(timeZone, range.from);
  let monday = first - ((weekdayOfDay(first) + 6) % 7);
  const out: ReportWeek[] = [];
  while (out.length < 600) {
    const start = localToInstant(timeZone, monday, 0);
    if (start >= range.to) break;
    const end = localToInstant(timeZone, monday + 7, 0);
    out.push({ week: isoDateOfDay(monday), start: Math.max(start, range.from), end: Math.min(end, range.to) });
    monday += 7;
  }
  return out;
}

/**
 * The Monday (local date) of the week an instant falls in.
 *
 * @example
 * weekOf(Date.UTC(2026, 5, 3, 12), 'Europe/London') // '2026-06-01'
 */
export function weekOf(instant: number, timeZone: string): string {
  const day = localDayOf(timeZone, instant);
  return isoDateOfDay(day - ((weekdayOfDay(day) + 6) % 7));
}

/**
 * The local date of an instant.
 *
 * @example
 * localDate(Date.UTC(2026, 5, 1, 23, 30), 'Europe/London') // '2026-06-02' (BST)
 */
export function localDate(instant: number, timeZone: string): string {
  return isoDateOfDay(localDayOf(timeZone, instant));
}

/**
 * The Monday of an ISO date's week.
 *
 * @example
 * weekOfDate('2026-06-03') // '2026-06-01'
 */
export function weekOfDate(isoDate: string): string {
  const day = Math.round(Date.parse(`${isoDate}T00:00:00Z`) / DAY_MS);
  return isoDateOfDay(day - ((weekdayOfDay(day) + 6) % 7));
}

/**
 * A report span of whole weeks from the Monday of the week `now` falls in, as ISO instants.
 *
 * @example
 * weeksFrom(Date.UTC(2026, 5, 3), 'Europe/London', 2) // { from: '2026-05-31T23:00:00.000Z', to: '2026-06-14T23:00:00.000Z' }
 */
export function weeksFrom(now: number, timeZone: string, weeks: number): { from: string; to: string } {
  const day = localDayOf(timeZone, now);
  const monday = day - ((weekdayOfDay(day) + 6) % 7);
  return {
    from: new Date(localToInstant(timeZone, monday, 0)).toISOString(),
    to: new Date(localToInstant(timeZone, monday + 7 * weeks, 0)).toISOString(),
  };
}
