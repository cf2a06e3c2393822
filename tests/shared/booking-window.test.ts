import { describe, expect, it } from 'vitest';
import { outsideBookingWindow } from '@shared/booking-window';

// The server's defaults (server/config.ts): two years back, three ahead.
const WINDOW = { pastDays: 730, futureDays: 1095 };
const NOW = Date.UTC(2026, 5, 1, 7);
const DAY = 86_400_000;

describe('how far from today a booking may lie', () => {
  it('takes both ends of the window, and refuses a millisecond beyond either', () => {
    expect(outsideBookingWindow(WINDOW, NOW, NOW + 1095 * DAY)).toBeNull();
    expect(outsideBookingWindow(WINDOW, NOW, NOW - 730 * DAY)).toBeNull();
    const said = {
      detail: 'Bookings must lie between 2 years ago and 3 years ahead.',
      message: 'must be within 730 days before and 1095 days after today',
    };
    expect(outsideBookingWindow(WINDOW, NOW, NOW + 1095 * DAY + 1)).toEqual(said);
    expect(outsideBookingWindow(WINDOW, NOW, NOW - 730 * DAY - 1)).toEqual(said);
  });

  it('refuses year 9999 and what is not a time at all', () => {
    expect(outsideBookingWindow(WINDOW, NOW, Date.UTC(9999, 0, 4, 9))).not.toBeNull();
    expect(outsideBookingWindow(WINDOW, NOW, Number.NaN)).not.toBeNull();
    expect(outsideBookingWindow(WINDOW, NOW, Number.POSITIVE_INFINITY)).not.toBeNull();
  });

  it("says the server's own setting as a person would: whole years as years, else days", () => {
    expect(outsideBookingWindow({ pastDays: 365, futureDays: 3650 }, NOW, NOW - 400 * DAY)?.detail).toBe(
      'Bookings must lie between 1 year ago and 10 years ahead.',
    );
    expect(outsideBookingWindow({ pastDays: 1, futureDays: 100 }, NOW, NOW + 101 * DAY)?.detail).toBe(
      'Bookings must lie between 1 day ago and 100 days ahead.',
    );
  });
});
