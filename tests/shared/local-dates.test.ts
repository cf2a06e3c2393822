import { describe, expect, it } from 'vitest';
import { createBoardIndex, jobCriticalPath, weeklyHours, type Board } from '../../shared/scheduler/index.ts';
import {
  addDays,
  dateWords,
  dayOfDate,
  deadlineDate,
  endOfLocalDay,
  localDateOf,
  localSpanOf,
  localTimeOf,
  localTimeOn,
  orderedFrom,
  promisedDeadline,
  startOfLocalDay,
  todayIn,
} from '../../shared/local-dates.ts';

const HOUR = 3_600_000;

// Clock changes used below (published dates):
// - Europe/London: BST begins Sun 29 March 2026 at 01:00 UTC and ends Sun 25 October 2026 at 01:00 UTC
//   (gov.uk "When do the clocks change?").
// - America/New_York: daylight time begins Sun 8 March 2026 and ends Sun 1 November 2026 at 02:00 local
//   (US Energy Policy Act of 2005: second Sunday in March, first Sunday in November).

describe('a local day in London across the clock changes', () => {
  it('is 23 hours on the spring day and starts at midnight GMT', () => {
    expect(startOfLocalDay('2026-03-29', 'Europe/London')).toBe(Date.UTC(2026, 2, 29, 0));
    expect(endOfLocalDay('2026-03-29', 'Europe/London')).toBe(Date.UTC(2026, 2, 29, 23));
    expect(endOfLocalDay('2026-03-29', 'Europe/London') - startOfLocalDay('2026-03-29', 'Europe/London')).toBe(
      23 * HOUR,
    );
  });

  it('is 25 hours on the autumn day, starting at midnight BST and ending at midnight GMT', () => {
    expect(startOfLocalDay('2026-10-25', 'Europe/London')).toBe(Date.UTC(2026, 9, 24, 23));
    expect(endOfLocalDay('2026-10-25', 'Europe/London')).toBe(Date.UTC(2026, 9, 26, 0));
    expect(endOfLocalDay('2026-10-25', 'Europe/London') - startOfLocalDay('2026-10-25', 'Europe/London')).toBe(
      25 * HOUR,
    );
  });

  it('puts an instant on the local date, not the UTC one', () => {
    // 23:30 UTC on 29 March is 00:30 BST on 30 March; 23:30 UTC on 24 October is 00:30 BST on 25 October.
    expect(localDateOf(Date.UTC(2026, 2, 29, 23, 30), 'Europe/London')).toBe('2026-03-30');
    expect(localDateOf(new Date(Date.UTC(2026, 9, 24, 23, 30)), 'Europe/London')).toBe('2026-10-25');
    // In winter London is on UTC: the same wall time stays on its date.
    expect(localDateOf(Date.UTC(2026, 0, 15, 23, 30), 'Europe/London')).toBe('2026-01-15');
    expect(todayIn('Europe/London', new Date('2026-03-29T23:30:00Z'))).toBe('2026-03-30');
  });
});

describe('a time of day on a date (part of a day away)', () => {
  it('is the wall clock on the day, in summer, in winter and on both clock-change days', () => {
    expect(localTimeOn('2026-06-03', '13:00', 'Europe/London')).toBe(Date.UTC(2026, 5, 3, 12));
    expect(localTimeOn('2026-12-09', '13:00', 'Europe/London')).toBe(Date.UTC(2026, 11, 9, 13));
    // Spring day: 01:00 GMT is the change, so 13:00 is BST (12:00 UTC); autumn: back on GMT by 13:00.
    expect(localTimeOn('2026-03-29', '13:00', 'Europe/London')).toBe(Date.UTC(2026, 2, 29, 12));
    expect(localTimeOn('2026-10-25', '13:00', 'Europe/London')).toBe(Date.UTC(2026, 9, 25, 13));
    // New York in winter is UTC−5.
    expect(localTimeOn('2026-12-09', '09:30', 'America/New_York')).toBe(Date.UTC(2026, 11, 9, 14, 30));
    expect(() => localTimeOn('2026-12-09', '24:00', 'Europe/London')).toThrow(RangeError);
  });

  it('reads back from an instant as the wall clock, not the hours since midnight (25 on the autumn day)', () => {
    expect(localTimeOf(Date.UTC(2026, 9, 25, 13), 'Europe/London')).toBe('13:00');
    expect(localTimeOf(Date.UTC(2026, 2, 29, 12), 'Europe/London')).toBe('13:00');
    expect(localTimeOf(Date.UTC(2026, 5, 3, 23, 15), 'Europe/London')).toBe('00:15');
  });

  it('reads a span as whole days, or with the times where it starts or ends inside a day', () => {
    const zone = 'Europe/London';
    // Wed 3 – Thu 4 June, whole days: 00:00 BST Wed to 00:00 BST Fri.
    expect(localSpanOf(Date.UTC(2026, 5, 2, 23), Date.UTC(2026, 5, 4, 23), zone)).toEqual({
      from: '2026-06-03',
      to: '2026-06-04',
      fromTime: null,
      toTime: null,
    });
    // From 14:00 BST Wed to 10:30 BST Thu.
    expect(localSpanOf(Date.UTC(2026, 5, 3, 13), Date.UTC(2026, 5, 4, 9, 30), zone)).toEqual({
      from: '2026-06-03',
      to: '2026-06-04',
      fromTime: '14:00',
      toTime: '10:30',
    });
    // The whole autumn day (25 hours) is still one whole day.
    expect(localSpanOf(startOfLocalDay('2026-10-25', zone), endOfLocalDay('2026-10-25', zone), zone)).toEqual({
      from: '2026-10-25',
      to: '2026-10-25',
      fromTime: null,
      toTime: null,
    });
  });
});

describe('a promised date', () => {
  it('runs to the end of the local day: an 08:00 or a 19:00 finish on the day in summer is on time', () => {
    const deadline = promisedDeadline('2026-07-01', 'Europe/London');
    expect(deadline).toBe(Date.UTC(2026, 6, 1, 23)); // midnight BST
    const eightBst = Date.UTC(2026, 6, 1, 7);
    const sevenPmBst = Date.UTC(2026, 6, 1, 18); // after the old fixed 17:00 UTC
    expect(eightBst <= deadline).toBe(true);
    expect(sevenPmBst <= deadline).toBe(true);
    // The next morning is late.
    expect(Date.UTC(2026, 6, 2, 7) <= deadline).toBe(false);
  });

  it('runs to the end of the promised day in New York too, which is the next day in UTC', () => {
    // 1 July 2026 is in daylight time, UTC−4: midnight local is 04:00 UTC on 2 July.
    expect(promisedDeadline('2026-07-01', 'America/New_York')).toBe(Date.UTC(2026, 6, 2, 4));
    // A 14:00 local finish (18:00 UTC) was late under the old 17:00 UTC rule; it is on time.
    expect(Date.UTC(2026, 6, 1, 18) <= promisedDeadline('2026-07-01', 'America/New_York')).toBe(true);
    // And the deadline reads back as the promised date in the firm's zone, though its UTC date is the 2nd.
    expect(deadlineDate(promisedDeadline('2026-07-01', 'America/New_York'), 'America/New_York')).toBe('2026-07-01');
    expect(new Date(promisedDeadline('2026-07-01', 'America/New_York')).toISOString().slice(0, 10)).toBe('2026-07-02');
  });

  it('follows New York across its own clock changes (UTC−5 in winter, 23 and 25 hour days)', () => {
    expect(promisedDeadline('2026-01-15', 'America/New_York')).toBe(Date.UTC(2026, 0, 16, 5));
    expect(endOfLocalDay('2026-03-08', 'America/New_York') - startOfLocalDay('2026-03-08', 'America/New_York')).toBe(
      23 * HOUR,
    );
    expect(endOfLocalDay('2026-11-01', 'America/New_York') - startOfLocalDay('2026-11-01', 'America/New_York')).toBe(
      25 * HOUR,
    );
  });

  it('reads back as its own date on the clock-change days', () => {
    expect(deadlineDate(promisedDeadline('2026-03-29', 'Europe/London'), 'Europe/London')).toBe('2026-03-29');
    expect(deadlineDate(promisedDeadline('2026-10-25', 'Europe/London'), 'Europe/London')).toBe('2026-10-25');
  });
});

describe('an order date', () => {
  it('counts from the start of the local day, in summer and in winter', () => {
    expect(orderedFrom('2026-06-01', 'Europe/London')).toBe(Date.UTC(2026, 4, 31, 23));
    expect(orderedFrom('2026-01-12', 'Europe/London')).toBe(Date.UTC(2026, 0, 12, 0));
    expect(orderedFrom('2026-06-01', 'America/New_York')).toBe(Date.UTC(2026, 5, 1, 4));
  });
});

describe('dates themselves', () => {
  it('step by calendar days over the clock changes', () => {
    expect(addDays('2026-03-28', 1)).toBe('2026-03-29');
    expect(addDays('2026-03-29', 1)).toBe('2026-03-30');
    expect(addDays('2026-10-25', -1)).toBe('2026-10-24');
    expect(addDays('2026-12-31', 1)).toBe('2027-01-01');
    expect(dayOfDate('1970-01-02')).toBe(1);
  });

  it('refuse what is not a calendar date', () => {
    expect(() => startOfLocalDay('2026-02-29', 'Europe/London')).toThrow(RangeError);
    expect(() => promisedDeadline('1 July', 'Europe/London')).toThrow(RangeError);
    expect(() => localDateOf(Number.NaN, 'Europe/London')).toThrow(RangeError);
  });
});

describe("the engine's lateness against a promised date", () => {
  /** One job with a delivery booked 08:00–17:00 local on `day`, promised for 1 July 2026, in `zone`. */
  function lateBy(zone: string, day: number): number {
    const at = (h: number) => startOfLocalDay(`2026-07-0${day}`, zone) + h * HOUR;
    const board: Board = {
      calendars: [{ id: 'cal', timeZone: zone, weekly: weeklyHours([1, 2, 3, 4, 5], [[480, 1020]]) }],
      resources: [{ id: 'crew', firmId: 'f', category: 'crew', kind: 'install_crew', calendarId: 'cal' }],
      jobs: [{ id: 'job-1', firmId: 'f', promisedBy: promisedDeadline('2026-07-01', zone) }],
      stages: [
        {
          id: 'a',
          jobId: 'job-1',
          kind: 'delivery',
          name: 'Delivery',
          durationMinutes: 540,
          requirements: [{ kind: 'install_crew', count: 1 }],
        },
      ],
      dependencies: [],
      bookings: [
        {
          id: 'ba',
          stageId: 'a',
          resourceId: 'crew',
          start: at(8),
          end: at(17),
          state: 'confirmed',
          installerFirmId: 'f',
        },
      ],
      hirePeriods: [],
      leadTimeRules: [],
    };
    return jobCriticalPath(createBoardIndex(board, { now: Date.UTC(2026, 5, 1) }), 'job-1').lateByMs;
  }

  it('does not flag an 08:00 delivery on the promised day in a London summer', () => {
    expect(lateBy('Europe/London', 1)).toBe(0);
  });

  it('does not flag it in New York either, where the day ends at 21:00 UTC (after the old fixed 17:00 UTC)', () => {
    expect(lateBy('America/New_York', 1)).toBe(0);
  });

  it('flags the same delivery a day later, by the time past the end of the promised day', () => {
    // Ends 17:00 BST on 2 July; the promise ran out at midnight BST: 17 hours late.
    expect(lateBy('Europe/London', 2)).toBe(17 * HOUR);
  });
});

describe('a date in words', () => {
  it('gives the weekday, day and month, and a date it cannot name as it is', () => {
    // Checked against GNU date (`date -d 2026-10-13 '+%a %-d %b'` and so on): 13 Oct 2026 is a
    // Tuesday, 29 Feb 2028 a Tuesday, 1 Jan 2000 a Saturday.
    expect(dateWords('2026-10-13')).toBe('Tue 13 Oct');
    expect(dateWords('2028-02-29')).toBe('Tue 29 Feb');
    expect(dateWords('2000-01-01')).toBe('Sat 1 Jan');
    expect(dateWords('0999-12-31')).toBe('0999-12-31');
  });
});
