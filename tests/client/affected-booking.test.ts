import { describe, expect, it } from 'vitest';
import { affectedBookingText } from '@/components/resources/affected-booking';

describe('a booking the Resources page names', () => {
  const b = { bookingId: '7', startsAt: '2026-06-04T12:00:00Z', endsAt: '2026-06-04T15:00:00Z' };
  it("names the firm's own job and stage, and the start on the firm's clock (13:00 BST is 12:00 UTC)", () => {
    expect(affectedBookingText({ ...b, jobReference: 'TW-2402', stageName: 'Commission' }, 'Europe/London', 2026)).toBe(
      'TW-2402 · Commission · Thu 4 Jun, 13:00',
    );
  });
  it("says only that an installer booked it where the job isn't the reader's, with the year when it isn't this one", () => {
    expect(affectedBookingText({ ...b, jobReference: null, stageName: null }, 'Europe/London', 2027)).toBe(
      "An installer's booking · Thu 4 Jun 2026, 13:00",
    );
  });
});
