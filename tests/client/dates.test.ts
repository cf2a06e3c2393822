import { describe, expect, it } from 'vitest';
import {
  formatCalendarDate,
  formatCalendarRange,
  formatInstant,
  formatInstantSpan,
  formatSpan,
  todayIn,
} from '@/utils/dates';

// Weekdays checked against a printed 2026 calendar: 12 May 2026 is a Tuesday, 29 March 2026 a Sunday.
describe('formatCalendarDate', () => {
  it('writes a date British style, leaving out the current year', () => {
    expect(formatCalendarDate('2026-05-12', { currentYear: 2026 })).toBe('Tue 12 May');
  });
  it('shows the year when it is not the current one', () => {
    expect(formatCalendarDate('2027-01-04', { currentYear: 2026 })).toBe('Mon 4 Jan 2027');
  });
  it('never shifts a calendar date by a time zone', () => {
    expect(formatCalendarDate('2026-03-29', { currentYear: 2026 })).toBe('Sun 29 Mar');
  });
  it('gives back what it cannot read, and nothing for no date', () => {
    expect(formatCalendarDate('2026-02-30')).toBe('2026-02-30');
    expect(formatCalendarDate(null)).toBe('');
  });
});

describe('formatSpan (time away)', () => {
  const y = { currentYear: 2026 };
  it('reads whole days as dates alone, and part of a day with its time', () => {
    // 9 December 2026 is a Wednesday (printed 2026 calendar).
    const day = { from: '2026-12-09', to: '2026-12-09' };
    expect(formatSpan({ ...day, fromTime: null, toTime: null }, y)).toBe('Wed 9 Dec');
    expect(formatSpan({ ...day, fromTime: '14:00', toTime: null }, y)).toBe('Wed 9 Dec from 14:00');
    expect(formatSpan({ ...day, fromTime: null, toTime: '10:30' }, y)).toBe('Wed 9 Dec until 10:30');
    expect(formatSpan({ ...day, fromTime: '09:00', toTime: '12:00' }, y)).toBe('Wed 9 Dec 09:00–12:00');
    expect(formatSpan({ from: '2026-12-09', to: '2026-12-10', fromTime: '14:00', toTime: '09:00' }, y)).toBe(
      'Wed 9 Dec 14:00 – Thu 10 Dec 09:00',
    );
    expect(formatSpan({ from: '2026-12-09', to: '2026-12-11' }, y)).toBe('Wed 9 Dec – Fri 11 Dec');
  });
});

describe('formatCalendarRange', () => {
  it('joins two days with an en dash, and shows one day once', () => {
    expect(formatCalendarRange('2026-05-12', '2026-05-14', { currentYear: 2026 })).toBe('Tue 12 May – Thu 14 May');
    expect(formatCalendarRange('2026-05-12', '2026-05-12', { currentYear: 2026 })).toBe('Tue 12 May');
    expect(formatCalendarRange('2026-05-12', null, { currentYear: 2026 })).toBe('Tue 12 May');
    expect(formatCalendarRange(null, null)).toBe('');
  });
});

describe('in the firm time zone', () => {
  it('reads today in London across the spring clock change (01:00 UTC on 29 March 2026)', () => {
    expect(todayIn('Europe/London', new Date('2026-03-29T23:30:00Z'))).toBe('2026-03-30');
    expect(todayIn('Europe/London', new Date('2026-01-15T23:30:00Z'))).toBe('2026-01-15');
  });
  it('shows an instant in British Summer Time as local time', () => {
    expect(formatInstant('2026-05-12T07:30:00Z', 'Europe/London', { currentYear: 2026 })).toBe('Tue 12 May, 08:30');
  });
  it('shows from when to when: the end time alone on the same day, its day too on another', () => {
    expect(
      formatInstantSpan('2026-05-12T07:30:00Z', '2026-05-12T11:30:00Z', 'Europe/London', { currentYear: 2026 }),
    ).toBe('Tue 12 May, 08:30–12:30');
    // A dig of a day and a half, in December (GMT): 14 December 2026 is a Monday.
    expect(
      formatInstantSpan('2026-12-14T08:00:00Z', '2026-12-15T13:00:00Z', 'Europe/London', { currentYear: 2026 }),
    ).toBe('Mon 14 Dec, 08:00 – Tue 15 Dec, 13:00');
    // Past midnight UTC but still the same evening in London: one day.
    expect(
      formatInstantSpan('2026-06-08T19:00:00Z', '2026-06-08T22:30:00Z', 'Europe/London', { currentYear: 2026 }),
    ).toBe('Mon 8 Jun, 20:00–23:30');
  });
});
