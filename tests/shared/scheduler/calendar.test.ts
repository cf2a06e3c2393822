import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import {
  addWorkingDays,
  addWorkingMinutes,
  compileCalendar,
  countWorkingDays,
  dayNumber,
  isWorkingInstant,
  localToInstant,
  nextWorkingInstant,
  resourceCalendar,
  SchedulerError,
  timeZoneOffset,
  weeklyHours,
  workingIntervals,
  workingMinutesBetween,
  type WorkingCalendar,
} from '../../../shared/scheduler/index.js';
import { at, firmCal, LONDON, MON_FRI_8_TO_5 } from './scenario.js';

describe('public holidays come from the calendar (the server lists them; the engine holds no tables)', () => {
  it('keeps the listed days free and treats other days as ordinary', () => {
    // St Andrew's Day, Monday 30 November 2026, is a bank holiday in Scotland only (gov.uk, from memory).
    const scotland: WorkingCalendar = {
      id: 'sct',
      timeZone: LONDON,
      weekly: MON_FRI_8_TO_5,
      holidays: [{ date: '2026-11-30', name: "St Andrew's Day" }],
    };
    const england: WorkingCalendar = { id: 'eng', timeZone: LONDON, weekly: MON_FRI_8_TO_5 };
    expect(isWorkingInstant(scotland, at(2026, 11, 30, 10))).toBe(false);
    expect(isWorkingInstant(england, at(2026, 11, 30, 10))).toBe(true);
    expect(nextWorkingInstant(scotland, at(2026, 11, 30, 10))).toBe(at(2026, 12, 1, 8));
    expect(countWorkingDays(scotland, at(2026, 11, 30), at(2026, 12, 7))).toBe(4);
  });

  it('refuses a holiday that is not a date', () => {
    for (const date of ['2026-02-30', '30/11/2026', '']) {
      const cal: WorkingCalendar = {
        id: `bad ${date}`,
        timeZone: LONDON,
        weekly: MON_FRI_8_TO_5,
        holidays: [{ date, name: 'x' }],
      };
      expect(() => nextWorkingInstant(cal, at(2026, 11, 30, 10))).toThrow(SchedulerError);
    }
  });

  it("a resource calendar keeps its firm's holidays", () => {
    const own = resourceCalendar(firmCal, { id: 'dave' });
    expect(own.holidays).toBe(firmCal.holidays);
    expect(isWorkingInstant(own, at(2026, 12, 28, 10))).toBe(false);
  });
});

describe('Europe/London clock changes (last Sunday of March and October at 01:00 UTC, EU/UK summer-time rule)', () => {
  const cases = [
    { date: [2026, 3, 29], change: Date.UTC(2026, 2, 29, 1), hours: 23 },
    { date: [2026, 10, 25], change: Date.UTC(2026, 9, 25, 1), hours: 25 },
    { date: [2027, 3, 28], change: Date.UTC(2027, 2, 28, 1), hours: 23 },
    { date: [2027, 10, 31], change: Date.UTC(2027, 9, 31, 1), hours: 25 },
  ] as const;
  for (const c of cases) {
    it(`${c.date.join('-')} is a ${c.hours}-hour day, the offset changing at ${new Date(c.change).toISOString()}`, () => {
      const [y, m, d] = c.date;
      const day = dayNumber(y, m, d);
      expect((localToInstant(LONDON, day + 1, 0) - localToInstant(LONDON, day, 0)) / 3_600_000).toBe(c.hours);
      const before = timeZoneOffset(LONDON, c.change - 1),
        after = timeZoneOffset(LONDON, c.change);
      expect(before).not.toBe(after);
      expect(Math.abs(after - before)).toBe(3_600_000);
      expect(timeZoneOffset(LONDON, c.change - 3_600_000)).toBe(before);
    });
  }

  it('a round-the-clock calendar has 1380 working minutes on the spring day and 1500 on the autumn day', () => {
    const allDay: WorkingCalendar = {
      id: 'always',
      timeZone: LONDON,
      weekly: weeklyHours([0, 1, 2, 3, 4, 5, 6], [[0, 1440]]),
    };
    expect(workingMinutesBetween(allDay, at(2026, 3, 29), at(2026, 3, 30))).toBe(1380);
    expect(workingMinutesBetween(allDay, at(2026, 10, 25), at(2026, 10, 26))).toBe(1500);
  });

  it('a 01:30 start on the spring day (a time that never happens) moves forward to 02:30 BST', () => {
    expect(localToInstant(LONDON, dayNumber(2026, 3, 29), 90)).toBe(Date.UTC(2026, 2, 29, 1, 30));
  });
});

describe('working time on a Monday–Friday 08:00–17:00 calendar in England', () => {
  it('adds working time across a bank-holiday weekend: Fri 1 May 16:00 + 2 h is Tue 5 May 09:00', () => {
    // 4 May 2026 is the early May bank holiday (gov.uk, from memory; tests/server/holiday-days.test.ts: date-holidays agrees).
    expect(addWorkingMinutes(firmCal, at(2026, 5, 1, 16), 120)).toBe(at(2026, 5, 5, 9));
  });

  it('subtracts with negative minutes, landing at the start', () => {
    expect(addWorkingMinutes(firmCal, at(2026, 5, 5, 9), -120)).toBe(at(2026, 5, 1, 16));
  });

  it('finishing exactly at 17:00 stays at 17:00 rather than jumping to the next morning', () => {
    expect(addWorkingMinutes(firmCal, at(2026, 6, 1, 8), 540)).toBe(at(2026, 6, 1, 17));
  });

  it('next working instant from a Saturday is Monday 08:00', () => {
    expect(nextWorkingInstant(firmCal, at(2026, 6, 6, 10))).toBe(at(2026, 6, 8, 8));
    expect(isWorkingInstant(firmCal, at(2026, 6, 8, 8))).toBe(true);
    expect(isWorkingInstant(firmCal, at(2026, 6, 8, 17))).toBe(false);
  });

  it('counts working days between dates over Christmas 2026: 8 from Fri 18 Dec to Mon 4 Jan', () => {
    // 18, 21, 22, 23, 24, 29, 30, 31 Dec; 25 and 28 Dec and 1 Jan are bank holidays.
    expect(countWorkingDays(firmCal, at(2026, 12, 18), at(2027, 1, 4))).toBe(8);
    expect(countWorkingDays(firmCal, at(2027, 1, 4), at(2026, 12, 18))).toBe(-8);
  });

  it('lists the working intervals of a range for the board to shade the rest', () => {
    expect(workingIntervals(firmCal, { start: at(2026, 6, 5, 12), end: at(2026, 6, 8, 10) })).toEqual([
      { start: at(2026, 6, 5, 12), end: at(2026, 6, 5, 17) },
      { start: at(2026, 6, 8, 8), end: at(2026, 6, 8, 10) },
    ]);
  });

  it('moves whole working days keeping the time of day: Tue 10:00 + 5 is next Tue 10:00; Fri 17:00 + 1 is Mon 17:00', () => {
    expect(addWorkingDays(firmCal, at(2026, 6, 2, 10), 5)).toBe(at(2026, 6, 9, 10));
    expect(addWorkingDays(firmCal, at(2026, 6, 5, 17), 1)).toBe(at(2026, 6, 8, 17));
    expect(addWorkingDays(firmCal, at(2026, 6, 9, 10), -5)).toBe(at(2026, 6, 2, 10));
    expect(addWorkingDays(firmCal, at(2026, 6, 6, 12), 1)).toBe(at(2026, 6, 9, 8));
  });
});

describe('a resource calendar: firm calendar, own hours and absences', () => {
  const sam = resourceCalendar(firmCal, {
    id: 'sam',
    weekly: weeklyHours([1, 2, 3, 4], [[7 * 60, 16 * 60]]),
    absences: [{ start: at(2026, 6, 9), end: at(2026, 6, 11) }],
  });

  it('works Monday to Thursday 07:00–16:00 and not on the absence', () => {
    expect(nextWorkingInstant(sam, at(2026, 6, 5, 9))).toBe(at(2026, 6, 8, 7));
    expect(nextWorkingInstant(sam, at(2026, 6, 8, 16))).toBe(at(2026, 6, 11, 7));
  });

  it("keeps the firm's bank holidays: Spring bank holiday 25 May 2026 is off", () => {
    expect(nextWorkingInstant(sam, at(2026, 5, 25, 9))).toBe(at(2026, 5, 26, 7));
  });

  it('does not change the firm calendar', () => {
    expect(firmCal.closures).toBeUndefined();
    expect(firmCal.weekly).toBe(MON_FRI_8_TO_5);
  });
});

describe('refuses bad input with typed errors', () => {
  it('an unknown time zone', () => {
    expect(() => compileCalendar({ id: 'x', timeZone: 'Mars/Olympus', weekly: MON_FRI_8_TO_5 })).toThrow(
      SchedulerError,
    );
  });
  it('working hours that are not minutes of a day', () => {
    const bad = { id: 'x', timeZone: LONDON, weekly: weeklyHours([1], [[600, 1500]]) };
    expect(() => compileCalendar(bad)).toThrowError(expect.objectContaining({ code: 'invalid_calendar' }));
  });
  it('a calendar with no working time at all, named by its week where the board gives the name', () => {
    const never = { id: 'never', timeZone: LONDON, weekly: weeklyHours([], []) };
    expect(() => nextWorkingInstant(never, at(2026, 1, 1))).toThrowError(
      expect.objectContaining({ code: 'no_working_time', message: expect.stringMatching(/^Calendar never has no/) }),
    );
    const named = { ...never, name: 'Night shift' };
    for (const attempt of [
      () => nextWorkingInstant(named, at(2026, 1, 1)),
      () => addWorkingMinutes(named, at(2026, 1, 1), 60),
      () => addWorkingMinutes(named, at(2026, 1, 1), -60),
    ])
      expect(attempt).toThrowError(
        expect.objectContaining({
          code: 'no_working_time',
          message:
            'The working week "Night shift" has no working time within ten years: nothing can be booked on it until it has working hours.',
          details: { calendarId: 'never' },
        }),
      );
  });
  it('a non-finite instant', () => {
    expect(() => addWorkingMinutes(firmCal, Number.NaN, 10)).toThrow(RangeError);
  });
  it('working time counted across millennia (year 9999), at once rather than after minutes of work', () => {
    const cal = { ...firmCal, id: 'far' };
    const started = performance.now();
    expect(() => workingMinutesBetween(cal, at(2026, 6, 1), Date.UTC(9999, 0, 4, 9))).toThrowError(
      expect.objectContaining({
        code: 'out_of_range',
        // Said to whoever typed the year, so in their words; the calendar is named for the log only.
        message:
          'That is more than ten years from the rest of the plan: working time is not counted across more than ten years.',
        details: { calendarId: 'far' },
      }),
    );
    expect(() =>
      workingMinutesBetween({ ...cal, id: 'far-back' }, Date.parse('0001-01-04T09:00:00Z'), at(2026, 6, 1)),
    ).toThrowError(expect.objectContaining({ code: 'out_of_range' }));
    expect(performance.now() - started).toBeLessThan(1000);
    // A year still counts: 2026-06-01 to 2027-06-01 holds 261 weekdays, less the 8 England and Wales
    // bank holidays in it (gov.uk lists, as checked above), each of 9 working hours: 253 × 540 minutes.
    expect(workingMinutesBetween(cal, at(2026, 6, 1), at(2027, 6, 1))).toBe(253 * 540);
  });
});

describe('properties of working time', () => {
  const start2026 = at(2026, 1, 1);
  const workingStart = fc
    .integer({ min: 0, max: 2 * 365 * 24 * 60 })
    .map((m) => nextWorkingInstant(firmCal, start2026 + m * 60_000));

  it('adding then subtracting working time returns the start (starts inside working time)', () => {
    fc.assert(
      fc.property(workingStart, fc.integer({ min: 1, max: 20_000 }), (s, minutes) => {
        const end = addWorkingMinutes(firmCal, s, minutes);
        expect(addWorkingMinutes(firmCal, end, -minutes)).toBe(s);
        expect(workingMinutesBetween(firmCal, s, end)).toBeCloseTo(minutes, 6);
      }),
      { numRuns: 300 },
    );
  });

  it('the same holds in New York, across US clock changes and federal holidays', () => {
    // US federal holidays 2026 (observed; from memory): New Year, MLK Day, Presidents' Day, Memorial Day,
    // Juneteenth, Independence Day (Saturday 4 July, observed Friday 3 July), Labor Day, Columbus Day,
    // Veterans Day, Thanksgiving, Christmas.
    const federal = [
      '2026-01-01',
      '2026-01-19',
      '2026-02-16',
      '2026-05-25',
      '2026-06-19',
      '2026-07-03',
      '2026-09-07',
      '2026-10-12',
      '2026-11-11',
      '2026-11-26',
      '2026-12-25',
    ];
    const ny: WorkingCalendar = {
      id: 'ny',
      timeZone: 'America/New_York',
      weekly: MON_FRI_8_TO_5,
      holidays: federal.map((date) => ({ date, name: 'federal holiday' })),
    };
    fc.assert(
      fc.property(fc.integer({ min: 0, max: 365 * 24 * 60 }), fc.integer({ min: 1, max: 5000 }), (m, minutes) => {
        const s = nextWorkingInstant(ny, start2026 + m * 60_000);
        expect(addWorkingMinutes(ny, addWorkingMinutes(ny, s, minutes), -minutes)).toBe(s);
      }),
      { numRuns: 200 },
    );
  });
});
