import { describe, expect, it } from 'vitest';
import { describeWindow } from '../../shared/slot-window.ts';

// UK clocks go back at 02:00 BST on Sunday 25 October 2026 (the last Sunday of October; GOV.UK,
// "When do the clocks change?").
describe("a slot's days and hours in words", () => {
  it('says one day and its hours, in the firm’s zone and its summer-time name', () => {
    expect(describeWindow(new Date('2026-10-06T07:00:00Z'), new Date('2026-10-06T11:00:00Z'), 'Europe/London')).toEqual(
      {
        date: 'Tuesday 6 October 2026',
        window: '08:00–12:00',
        zone: 'Europe/London, BST',
      },
    );
  });

  it('names the zone as it is on the day: GMT once the clocks have gone back', () => {
    expect(describeWindow(new Date('2026-10-26T08:00:00Z'), new Date('2026-10-26T12:00:00Z'), 'Europe/London')).toEqual(
      { date: 'Monday 26 October 2026', window: '08:00–12:00', zone: 'Europe/London, GMT' },
    );
  });

  it('says both days of a slot that runs over a night (a dig of a day and a half)', () => {
    expect(describeWindow(new Date('2026-12-14T08:00:00Z'), new Date('2026-12-15T13:00:00Z'), 'Europe/London')).toEqual(
      {
        date: 'Monday 14 December 2026 to Tuesday 15 December 2026',
        window: '08:00 on the first day to 13:00 on the last',
        zone: 'Europe/London, GMT',
      },
    );
  });

  it('counts the day in the firm’s zone, not UTC: 23:30 UTC on a summer Sunday is Monday in London', () => {
    expect(
      describeWindow(new Date('2026-06-07T23:30:00Z'), new Date('2026-06-08T03:30:00Z'), 'Europe/London').date,
    ).toBe('Monday 8 June 2026');
  });
});
