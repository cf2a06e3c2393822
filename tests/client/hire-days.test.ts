import { describe, expect, it } from 'vitest';
import { hireInstants } from '../../src/components/reports/hire-days.ts';

describe('the days a hire is recorded for', () => {
  it("are the firm's local days, whatever zone the browser is in", () => {
    // 1 July 2026 is in British Summer Time (UTC+1): local midnight is 23:00 UTC the day before.
    expect(hireInstants({ onHire: '2026-07-01', offHire: '2026-07-03' }, 'Europe/London')).toEqual({
      onHireAt: '2026-06-30T23:00:00.000Z',
      offHireAt: '2026-07-03T22:59:00.000Z',
    });
  });

  it('follow the clock change inside the hire (BST ended on Sun 25 Oct 2026)', () => {
    expect(hireInstants({ onHire: '2026-10-24', offHire: '2026-10-26' }, 'Europe/London')).toEqual({
      onHireAt: '2026-10-23T23:00:00.000Z',
      offHireAt: '2026-10-26T23:59:00.000Z',
    });
  });

  it('leave a day that is not on the calendar empty, for the form to refuse with its own words', () => {
    expect(hireInstants({ onHire: '2026-02-30', offHire: '' }, 'Europe/London')).toEqual({
      onHireAt: '',
      offHireAt: '',
    });
  });
});
