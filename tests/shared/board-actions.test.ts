import { describe, expect, it } from 'vitest';
import {
  createBoardIndex,
  formatInstant,
  weeklyHours,
  type Board,
  type WorkingCalendar,
} from '../../shared/scheduler/index.js';
import { shiftDependents } from '../../shared/board-actions.js';
import { at, booking, dep, emptyBoard, LONDON, stage } from './scheduler/scenario.js';

const NOW = at(2026, 5, 1, 9);
const startsOf = (shifts: ReturnType<typeof shiftDependents>, tz = LONDON) =>
  Object.fromEntries(
    shifts.map((s) => [
      s.stageId,
      s.bookings.map((b) => `${formatInstant(b.start, tz)}–${formatInstant(b.end, tz).slice(-5)}`),
    ]),
  );

describe('moving a stage with its dependents', () => {
  // The lift Tue 2 Jun 08:00–12:00 on the crane, the connection 1 working hour later, 13:00–16:00 (both Mon–Fri 08:00–17:00).
  const board: Board = {
    ...emptyBoard(),
    bookings: [
      booking('b-lift', 'lift', 'crane-1', at(2026, 6, 2, 8), at(2026, 6, 2, 12)),
      booking('b-conn', 'connect', 'spark-1', at(2026, 6, 2, 13), at(2026, 6, 2, 16)),
    ],
  };
  const index = createBoardIndex(board, { now: NOW });

  it('by 37 working minutes puts the connection on the next quarter hour: 13:37 becomes 13:45', () => {
    expect(startsOf(shiftDependents(index, 'lift', at(2026, 6, 2, 8, 37)))).toEqual({
      connect: ['Tue 2 Jun 13:45–16:45'],
    });
  });

  it('by 1½ h would run the 3-hour connection past 17:00: it goes to the next morning instead', () => {
    expect(startsOf(shiftDependents(index, 'lift', at(2026, 6, 2, 9, 30)))).toEqual({
      connect: ['Wed 3 Jun 08:00–11:00'],
    });
  });

  it('on an hourly step (an option), 13:37 becomes 14:00', () => {
    expect(startsOf(shiftDependents(index, 'lift', at(2026, 6, 2, 8, 37), { stepMinutes: 60 }))).toEqual({
      connect: ['Tue 2 Jun 14:00–17:00'],
    });
  });
});

describe('moving a pour a working day later over a bank holiday weekend', () => {
  it('keeps the lift after the cure, which counts the elapsed days the working-day shift skips', () => {
    // Poured Fri 22 May 08:00–12:00: 70 % (ACI 209R-92, 6.9136 days) at Fri 29 May 09:56; the lift booked Fri 29 May 10:00.
    const b: Board = {
      ...emptyBoard(),
      bookings: [
        booking('b-base', 'base', 'ground-1', at(2026, 5, 22, 8), at(2026, 5, 22, 12)),
        booking('b-lift', 'lift', 'crane-1', at(2026, 5, 29, 10), at(2026, 5, 29, 14)),
      ],
    };
    // One working day later is Tue 26 May (Mon 25 May is the Spring bank holiday). The same working
    // time moves the lift to Mon 1 Jun 10:00, but the base now cures at Tue 2 Jun 09:56: Tue 2 Jun 10:00.
    const shifts = shiftDependents(createBoardIndex(b, { now: NOW }), 'base', at(2026, 5, 26, 8));
    expect(startsOf(shifts)).toEqual({ lift: ['Tue 2 Jun 10:00–14:00'] });
  });
});

describe('across the October clock change', () => {
  it('in London the connection lands on the local quarter hour (GMT after the change)', () => {
    const b: Board = {
      ...emptyBoard(),
      bookings: [
        booking('b-lift', 'lift', 'crane-1', at(2026, 10, 23, 8), at(2026, 10, 23, 12)), // Fri, BST
        booking('b-conn', 'connect', 'spark-1', at(2026, 10, 26, 9), at(2026, 10, 26, 12)), // Mon, GMT
      ],
    };
    const shifts = shiftDependents(createBoardIndex(b, { now: NOW }), 'lift', at(2026, 10, 23, 8, 37));
    expect(shifts[0]?.bookings[0]?.start).toBe(Date.UTC(2026, 9, 26, 9, 45));
  });

  it('in Adelaide (UTC+9:30, then +10:30 from Sun 4 Oct) on an hourly step the connection lands on the local hour', () => {
    const adelaide: WorkingCalendar = {
      id: 'cal-adl',
      timeZone: 'Australia/Adelaide',
      weekly: weeklyHours([1, 2, 3, 4, 5], [[8 * 60, 17 * 60]]),
    };
    const b: Board = {
      calendars: [adelaide],
      resources: [
        { id: 'crane-sa', firmId: 'sa', category: 'machine', kind: 'crane', calendarId: 'cal-adl' },
        { id: 'spark-sa', firmId: 'sa', category: 'person', kind: 'electrician', calendarId: 'cal-adl' },
      ],
      jobs: [{ id: 'job-1', firmId: 'sa' }],
      stages: [
        stage('lift', 'lift', 240, [['crane', 1]]),
        stage('connect', 'electrical_connect', 180, [['electrician', 1]]),
      ],
      dependencies: [dep('lift', 'connect')],
      bookings: [
        // Fri 2 Oct 08:00–12:00 ACST = Thu 1 Oct 22:30 – Fri 02:30 UTC; Mon 5 Oct 09:00–12:00 ACDT = Sun 4 Oct 22:30 – Mon 01:30 UTC.
        booking('b-lift', 'lift', 'crane-sa', Date.UTC(2026, 9, 1, 22, 30), Date.UTC(2026, 9, 2, 2, 30), {
          installerFirmId: 'sa',
        }),
        booking('b-conn', 'connect', 'spark-sa', Date.UTC(2026, 9, 4, 22, 30), Date.UTC(2026, 9, 5, 1, 30), {
          installerFirmId: 'sa',
        }),
      ],
      hirePeriods: [],
      leadTimeRules: [],
    };
    // 25 working minutes later: 09:25 ACDT = 22:55 UTC; the next whole local hour is 10:00 ACDT = 23:30 UTC
    // (a UTC-hour step would have said 23:00 UTC, 09:30 on the local clock).
    const shifts = shiftDependents(
      createBoardIndex(b, { now: Date.UTC(2026, 8, 1) }),
      'lift',
      Date.UTC(2026, 9, 1, 22, 55),
      { stepMinutes: 60 },
    );
    expect(shifts[0]?.bookings[0]).toMatchObject({
      start: Date.UTC(2026, 9, 4, 23, 30),
      end: Date.UTC(2026, 9, 5, 2, 30),
    });
  });
});
