import { endOfLocalDay, startOfLocalDay } from '@shared/local-dates';

/** A hire's first and last day as typed into the form (YYYY-MM-DD, either may be empty). */
export interface HireDays {
  onHire: string;
  offHire: string;
}

/** A typed day as an instant, or '' (which the hire schema refuses with its own words) when it is not a day. */
function instantOr(at: () => number): string {
  try {
    return new Date(at()).toISOString();
  } catch {
    return '';
  }
}

/**
 * The hire's on- and off-hire instants: the start of the first day and a minute before the end of
 * the last (the machine's days on site), both in the firm's zone rather than the browser's, so a
 * manager away from the firm's zone records the same days.
 *
 * @example
 * hireInstants({ onHire: '2026-07-01', offHire: '2026-07-03' }, 'Europe/London')
 * // { onHireAt: '2026-06-30T23:00:00.000Z', offHireAt: '2026-07-03T22:59:00.000Z' }
 */
export function hireInstants(days: HireDays, zone: string): { onHireAt: string; offHireAt: string } {
  return {
    onHireAt: days.onHire ? instantOr(() => startOfLocalDay(days.onHire, zone)) : '',
    offHireAt: days.offHire ? instantOr(() => endOfLocalDay(days.offHire, zone) - 60_000) : '',
  };
}
