import { addDays } from './local-dates.ts';

/**
 * A firm's service plan: after a handover the first service visit falls `firstAfterMonths` later,
 * then one every `everyMonths`; `visitsAhead` visits are planned at a time. Three months, then
 * yearly, two ahead is the default (common practice, no source); each firm edits its own.
 */
export interface ServicePlan {
  firstAfterMonths: number;
  everyMonths: number;
  visitsAhead: number;
}

export const DEFAULT_SERVICE_PLAN: ServicePlan = { firstAfterMonths: 3, everyMonths: 12, visitsAhead: 2 };

/** A visit is promised within two weeks either side of its due date (common practice, no source). */
export const SERVICE_WINDOW_DAYS = 14;

/**
 * A service job waits out of the board's tray until its promised window opens within this many
 * days of the board's range, so the office books it about a month ahead (common practice, no source).
 */
export const SERVICE_TRAY_LEAD_DAYS = 28;

/**
 * The date `months` calendar months after `date` (YYYY-MM-DD); a day the month lacks becomes its
 * last day.
 *
 * @example
 * addMonths('2026-11-30', 3) // '2027-02-28'
 */
export function addMonths(date: string, months: number): string {
  const [y, m, d] = date.split('-').map(Number) as [number, number, number];
  const index = y * 12 + (m - 1) + months;
  const year = Math.floor(index / 12);
  const month = index - year * 12 + 1;
  const last = new Date(Date.UTC(year, month, 0)).getUTCDate();
  return `${String(year).padStart(4, '0')}-${String(month).padStart(2, '0')}-${String(Math.min(d, last)).padStart(2, '0')}`;
}

export interface ServiceVisitDate {
  number: number;
  dueOn: string;
  promisedFrom: string;
  promisedTo: string;
}

/**
 * The visits a plan sets up from a handover day (the firm's local date).
 *
 * @example
 * serviceVisitDates('2026-06-01', DEFAULT_SERVICE_PLAN).map((v) => v.dueOn) // ['2026-09-01', '2027-09-01']
 */
export function serviceVisitDates(handedOverOn: string, plan: ServicePlan): ServiceVisitDate[] {
  return Array.from({ length: plan.visitsAhead }, (_, i) => {
    const dueOn = addMonths(handedOverOn, plan.firstAfterMonths + i * plan.everyMonths);
    return {
      number: i + 1,
      dueOn,
      promisedFrom: addDays(dueOn, -SERVICE_WINDOW_DAYS),
      promisedTo: addDays(dueOn, SERVICE_WINDOW_DAYS),
    };
  });
}

/** "September 2026", the way the householder's notice names a visit. */
export function monthName(date: string): string {
  return new Intl.DateTimeFormat('en-GB', { timeZone: 'UTC', month: 'long', year: 'numeric' }).format(
    new Date(`${date}T12:00:00Z`),
  );
}
