import { describe, expect, it } from 'vitest';
import {
  analyseBoard,
  autoPlace,
  bookableStart,
  createBoardIndex,
  findSlots,
  formatInstant,
  longestWorkingDayMinutes,
  mustFitInOneDay,
  roundDownToStep,
  roundUpToStep,
  weeklyHours,
  type WorkingCalendar,
} from '../../../shared/scheduler/index.js';
import { at, booking, emptyBoard, LONDON } from './scenario.js';
import { electriciansWeek } from './in-ground.js';

describe('rounding up to the booking step, in local time', () => {
  it('London in summer: 13:56 BST becomes 14:00; a time on the step stays', () => {
    expect(roundUpToStep(Date.UTC(2026, 4, 12, 12, 56), LONDON, 15)).toBe(Date.UTC(2026, 4, 12, 13, 0));
    expect(roundUpToStep(Date.UTC(2026, 4, 12, 13, 45), LONDON, 15)).toBe(Date.UTC(2026, 4, 12, 13, 45));
    expect(roundDownToStep(Date.UTC(2026, 4, 12, 11, 37), LONDON, 15)).toBe(Date.UTC(2026, 4, 12, 11, 30));
  });

  it('a zone half an hour off the hour (India, UTC+5:30) lands on the local hour, not the UTC one', () => {
    // 04:50 UTC is 10:20 IST: the next whole local hour is 11:00 IST = 05:30 UTC (05:00 UTC would be 10:30 IST).
    expect(roundUpToStep(Date.UTC(2026, 0, 5, 4, 50), 'Asia/Kolkata', 60)).toBe(Date.UTC(2026, 0, 5, 5, 30));
    expect(roundUpToStep(Date.UTC(2026, 0, 5, 4, 50), 'Asia/Kolkata', 15)).toBe(Date.UTC(2026, 0, 5, 5, 0));
    // Nepal, UTC+5:45: 10:35 NPT rounds to 11:00 NPT on a half-hour step = 05:15 UTC.
    expect(roundUpToStep(Date.UTC(2026, 0, 5, 4, 50), 'Asia/Kathmandu', 30)).toBe(Date.UTC(2026, 0, 5, 5, 15));
  });

  it('across the October clock change in London (Sun 25 Oct 2026, 02:00 BST becomes 01:00 GMT)', () => {
    // 00:52 UTC is 01:52 BST; 02:00 BST never shows on the clock, which goes back to 01:00 GMT at 01:00 UTC.
    expect(roundUpToStep(Date.UTC(2026, 9, 25, 0, 52), LONDON, 15)).toBe(Date.UTC(2026, 9, 25, 1, 0));
    // The Monday after: GMT, so 09:37 local is 09:37 UTC and rounds to 09:45 UTC.
    expect(roundUpToStep(Date.UTC(2026, 9, 26, 9, 37), LONDON, 15)).toBe(Date.UTC(2026, 9, 26, 9, 45));
  });

  it('across the October clock change in Adelaide (Sun 4 Oct 2026, 02:00 ACST becomes 03:00 ACDT), half an hour off UTC', () => {
    // 16:10 UTC on 3 Oct is 01:40 ACST; the next whole local hour the clock shows is 03:00 ACDT = 16:30 UTC.
    expect(roundUpToStep(Date.UTC(2026, 9, 3, 16, 10), 'Australia/Adelaide', 60)).toBe(Date.UTC(2026, 9, 3, 16, 30));
    // After the change, UTC+10:30: 09:25 ACDT on Mon 5 Oct (22:55 UTC on the 4th) rounds to 10:00 ACDT = 23:30 UTC.
    expect(roundUpToStep(Date.UTC(2026, 9, 4, 22, 55), 'Australia/Adelaide', 60)).toBe(Date.UTC(2026, 9, 4, 23, 30));
  });

  it('where the clocks move by half an hour (Lord Howe Island, Sun 4 Oct 2026: 02:00 becomes 02:30), to the hour the clock next shows', () => {
    // 15:20 UTC on 3 Oct is 01:50 (UTC+10:30). At 02:00 the clock jumps to 02:30 (UTC+11), which is not a
    // whole hour: the next one shown is 03:00 = 16:00 UTC.
    expect(roundUpToStep(Date.UTC(2026, 9, 3, 15, 20), 'Australia/Lord_Howe', 60)).toBe(Date.UTC(2026, 9, 3, 16, 0));
  });

  it('refuses a step that is not a whole number of minutes from 1 to 1440', () => {
    expect(() => roundUpToStep(0, LONDON, 7.5)).toThrow(RangeError);
    expect(() => createBoardIndex(emptyBoard(), { now: 0, bookingStepMinutes: 0 })).toThrow(RangeError);
  });
});

describe('the first start a person would book', () => {
  const lateStarter: WorkingCalendar = {
    id: 'late',
    timeZone: LONDON,
    weekly: weeklyHours([1, 2, 3, 4, 5], [[7 * 60 + 40, 16 * 60]]),
  };

  it('is in working time and on the step', () => {
    expect(bookableStart(lateStarter, at(2026, 6, 1, 7), { stepMinutes: 15 })).toBe(at(2026, 6, 1, 7, 45));
    expect(bookableStart(lateStarter, at(2026, 6, 1, 15, 50), { stepMinutes: 15 })).toBe(at(2026, 6, 2, 7, 45));
  });

  it("with a stage to fit in the day: 4 h from Friday 13:00 on the electricians' week goes to Saturday 08:00, 5 h to Monday 07:30", () => {
    expect(bookableStart(electriciansWeek, at(2026, 10, 2, 13), { fitMinutes: 240 })).toBe(at(2026, 10, 3, 8));
    expect(bookableStart(electriciansWeek, at(2026, 10, 2, 13), { fitMinutes: 300 })).toBe(at(2026, 10, 5, 7, 30));
    expect(bookableStart(electriciansWeek, at(2026, 10, 2, 13))).toBe(at(2026, 10, 2, 13));
  });

  it('refuses, naming the week and the time wanted, when no day of the week is long enough', () => {
    // 07:40–16:00 is 8 h 20 min a day: 9 h never fits.
    const named = { ...lateStarter, name: 'Late start' };
    expect(() => bookableStart(named, at(2026, 6, 1, 7), { fitMinutes: 540 })).toThrowError(
      expect.objectContaining({
        code: 'no_working_time',
        message:
          'The working week "Late start" has no working day with 9 h of working time within ten years: the stage can\'t be done in one day on it.',
        details: { calendarId: 'late', fitMinutes: 540 },
      }),
    );
  });

  it("a working day is the week's longest (ranges merged); a stage fits one when no longer and not allowed to continue", () => {
    expect(longestWorkingDayMinutes(electriciansWeek)).toBe(540);
    expect(
      longestWorkingDayMinutes({
        id: 'x',
        timeZone: LONDON,
        weekly: weeklyHours(
          [1],
          [
            [480, 720],
            [600, 900],
          ],
        ),
      }),
    ).toBe(420);
    expect(mustFitInOneDay({ durationMinutes: 540 }, electriciansWeek)).toBe(true);
    expect(mustFitInOneDay({ durationMinutes: 541 }, electriciansWeek)).toBe(false);
    expect(mustFitInOneDay({ durationMinutes: 240, mayContinueNextDay: true }, electriciansWeek)).toBe(false);
  });
});

describe('times the engine works out for people land on the step', () => {
  it('the slot finder: the connection 1 working hour after a lift ending at 12:07 is offered from 13:15', () => {
    const b = emptyBoard();
    b.bookings = [booking('l', 'lift', 'crane-1', at(2026, 6, 2, 8, 7), at(2026, 6, 2, 12, 7))];
    const slots = findSlots(
      createBoardIndex(b, { now: at(2026, 5, 1, 9) }),
      { stageId: 'connect', resourceId: 'spark-1', earliest: at(2026, 5, 1, 9) },
      { alternatives: 0 },
    );
    expect(slots.map((s) => [formatInstant(s.start, LONDON), formatInstant(s.end, LONDON)])).toEqual([
      ['Tue 2 Jun 13:15', 'Tue 2 Jun 16:15'],
    ]);
  });

  it('auto-place: from a "now" of 09:07 the first stage starts at 09:15 (or on a half-hour step, 09:30)', () => {
    expect(autoPlace(emptyBoard(), { now: at(2026, 5, 1, 9, 7) }).placed[0]).toMatchObject({
      stageId: 'dig',
      start: at(2026, 5, 1, 9, 15),
    });
    expect(autoPlace(emptyBoard(), { now: at(2026, 5, 1, 9, 7), bookingStepMinutes: 30 }).placed[0]).toMatchObject({
      stageId: 'dig',
      start: at(2026, 5, 1, 9, 30),
    });
  });

  it('a notice period counted from 09:07 gives the earliest start as 09:15 (the check itself is exact)', () => {
    const b = emptyBoard();
    b.bookings = [booking('b-lift', 'lift', 'crane-1', at(2026, 5, 7, 8), at(2026, 5, 7, 12), { state: 'pencilled' })];
    // 5 working days from Fri 1 May 09:07, skipping the bank holiday on Mon 4 May: Mon 11 May 09:07.
    const lead = analyseBoard(b, { now: at(2026, 5, 1, 9, 7) }).violations.filter((v) => v.kind === 'lead_time');
    expect(lead.map((v) => v.message)).toEqual([
      "The crane (crane-1) needs 5 working days' notice from today: the earliest start is Mon 11 May 09:15",
    ]);
    expect(lead[0]?.details).toMatchObject({ earliest: at(2026, 5, 11, 9, 7), earliestStart: at(2026, 5, 11, 9, 15) });
  });
});
