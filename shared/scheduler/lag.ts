import { addWorkingDays, addWorkingMinutes, type CompiledCalendar } from './calendar.js';
import { DAY_MS, HOUR_MS } from './time-zone.js';
import type { Instant, Lag, WorkingCalendar } from './types.js';

/**
 * Applies a dependency lag to an instant. Working lags count on the successor's calendar
 * (crews don't work bank holidays); elapsed lags run through nights, weekends and holidays.
 * Negative amounts are leads. Working days move whole days (see addWorkingDays).
 *
 * @example
 * applyLag(electricianCal, liftEnd, { amount: 2, unit: 'working_hours' })
 */
export function applyLag(cal: WorkingCalendar | CompiledCalendar, instant: Instant, lag: Lag): Instant {
  return shift(cal, instant, lag, 1);
}

function shift(cal: WorkingCalendar | CompiledCalendar, instant: Instant, lag: Lag, sign: 1 | -1): Instant {
  if (!Number.isFinite(lag.amount)) throw new RangeError('A lag amount must be finite');
  if (lag.amount === 0) return instant;
  const amount = sign * lag.amount;
  switch (lag.unit) {
    case 'working_hours':
      return addWorkingMinutes(cal, instant, amount * 60);
    case 'working_days':
      return addWorkingDays(cal, instant, Math.round(amount));
    case 'elapsed_hours':
      return instant + amount * HOUR_MS;
    case 'elapsed_days':
      return instant + amount * DAY_MS;
    default:
      throw new RangeError(`Unknown lag unit ${String((lag as Lag).unit)}`);
  }
}

/**
 * Undoes a lag approximately (for backward passes): applies the negated amount.
 *
 * @example
 * reverseLag(cal, successorLatestStart, { amount: 2, unit: 'working_hours' })
 */
export function reverseLag(cal: WorkingCalendar | CompiledCalendar, instant: Instant, lag: Lag): Instant {
  return shift(cal, instant, lag, -1);
}

/**
 * Describes a lag in words, e.g. "2 working hours".
 *
 * @example
 * describeLag({ amount: 7, unit: 'elapsed_days' }) // '7 elapsed days'
 */
export function describeLag(lag: Lag): string {
  const [kind, unit] = lag.unit.split('_') as [string, string];
  const n = Math.abs(lag.amount);
  return `${n} ${kind} ${n === 1 ? unit.slice(0, -1) : unit}`;
}
