import { plural } from './plural.ts';

/**
 * How far from today a booking may lie: a setting of the server (BOOKING_WINDOW_PAST_DAYS and
 * BOOKING_WINDOW_FUTURE_DAYS), sent with the board so a drag or the move dialog refuses what the
 * server would, in the same words, before anything is sent.
 */
export interface BookingWindow {
  pastDays: number;
  futureDays: number;
}

const DAY_MS = 86_400_000;

/** A span of days as a person says it: whole years where it is whole years (730 → 2 years), else days. */
const span = (days: number) => (days >= 365 && days % 365 === 0 ? plural(days / 365, 'year') : plural(days, 'day'));

/** What is wrong with a booking time outside the window, or null when it lies within it. */
export interface OutsideWindow {
  /** The sentence for the person ("Bookings must lie between 2 years ago and 3 years ahead."). */
  detail: string;
  /** The field's message, as the API names it under the field. */
  message: string;
}

/**
 * Whether `instant` lies within the window around `now` (both ends included); not a finite number
 * is outside.
 *
 * @example
 * outsideBookingWindow({ pastDays: 730, futureDays: 1095 }, Date.UTC(2026, 5, 1), Date.UTC(2030, 0, 1))
 * // { detail: 'Bookings must lie between 2 years ago and 3 years ahead.', message: 'must be within 730 days before and 1095 days after today' }
 */
export function outsideBookingWindow(window: BookingWindow, now: number, instant: number): OutsideWindow | null {
  const { pastDays, futureDays } = window;
  if (Number.isFinite(instant) && instant >= now - pastDays * DAY_MS && instant <= now + futureDays * DAY_MS)
    return null;
  return {
    detail: `Bookings must lie between ${span(pastDays)} ago and ${span(futureDays)} ahead.`,
    message: `must be within ${pastDays} days before and ${futureDays} days after today`,
  };
}
