import { describe, expect, it } from 'vitest';
import type { BoardData } from '@shared/board-data';
import { boardLink } from '@shared/reports/context';
import { hireBand, pointerFocus, pointerNotice, pointerOf, pointsAtAnything } from '@/components/board/board-pointer';
import { boardVisibility, NO_FILTER } from '@/components/board/board-search';
import { HOUR, MON, boardJob, WEEK_BOARD } from './board-week';

/** Two jobs clashing on Crew Heron on Tuesday, and a hired excavator on hire Monday to Friday. */
function board(): BoardData {
  return {
    ...WEEK_BOARD,
    resources: [
      {
        id: '1',
        firmId: 'f1',
        category: 'crew',
        kind: 'install_crew',
        calendarId: 'c1',
        name: 'Crew Heron',
        firmName: 'Tideway',
        firmKind: 'installer',
        ownership: 'owned',
      },
      {
        id: '2',
        firmId: 'f1',
        category: 'machine',
        kind: 'excavator',
        calendarId: 'c1',
        hired: true,
        name: '3 t excavator (hired)',
        firmName: 'Tideway',
        firmKind: 'installer',
        ownership: 'hired',
      },
    ],
    jobs: [
      boardJob({ id: '10' }),
      {
        id: '11',
        firmId: 'f1',
        reference: 'TW-2419',
        customerName: 'B Customer',
        siteTown: 'Ilkley',
        status: 'planned',
        installationType: 'slab',
        promisedBy: null,
      },
    ],
    stages: [
      {
        id: '20',
        jobId: '10',
        kind: 'lift',
        name: 'Crane lift',
        durationMinutes: 240,
        requirements: [{ kind: 'install_crew', count: 1 }],
        sequence: 1,
      },
      {
        id: '21',
        jobId: '11',
        kind: 'fill',
        name: 'Fill',
        durationMinutes: 240,
        requirements: [{ kind: 'install_crew', count: 1 }],
        sequence: 1,
      },
    ],
    dependencies: [],
    bookings: [
      {
        id: '31',
        stageId: '20',
        resourceId: '1',
        start: MON + 26 * HOUR,
        end: MON + 30 * HOUR,
        state: 'confirmed',
        installerFirmId: 'f1',
        version: 1,
      },
      {
        id: '32',
        stageId: '21',
        resourceId: '1',
        start: MON + 25 * HOUR,
        end: MON + 29 * HOUR,
        state: 'pencilled',
        installerFirmId: 'f1',
        version: 1,
      },
    ],
    hirePeriods: [
      {
        id: '7',
        resourceId: '2',
        onHire: MON - 8 * HOUR,
        offHire: MON + 4 * 24 * HOUR + 16 * HOUR,
        dayRatePence: 9000,
      },
    ],
    leadTimeRules: [],
  };
}

describe("a report's link on the board", () => {
  it('reads the bookings and the hire from the link the reports page writes', () => {
    const link = boardLink('2026-09-15', { resourceName: 'Crew Heron', highlight: ['32', '31'], hireId: '7' });
    const query = Object.fromEntries(new URL(link, 'http://x').searchParams);
    expect(pointerOf(query)).toEqual({ highlight: ['32', '31'], hireId: '7' });
    expect(pointsAtAnything(pointerOf(query))).toBe(true);
    expect(pointsAtAnything(pointerOf({ view: 'week' }))).toBe(false);
  });

  it('ignores what is not an id, and repeats', () => {
    expect(pointerOf({ highlight: '31,,x,31, 32 ,0', hire: '<b>' })).toEqual({ highlight: ['31', '32'], hireId: null });
    expect(pointerOf({ highlight: ['33', '34'], hire: ['8'] })).toEqual({ highlight: ['33'], hireId: '8' });
  });

  it('keeps both sides of a clash on the board even when a job filter would hide one', () => {
    const data = board();
    const filtered = boardVisibility(data, { ...NO_FILTER, jobId: '10' });
    expect([...filtered.bookings]).toEqual(['31']);
    const pointed = boardVisibility(
      data,
      { ...NO_FILTER, jobId: '10' },
      new Set(pointerOf({ highlight: '31,32' }).highlight),
    );
    expect([...pointed.bookings].sort()).toEqual(['31', '32']);
  });

  it("draws the hire period as a background band on the machine's row only", () => {
    expect(hireBand(board(), '7')).toEqual({
      id: 'hire-7',
      resourceIds: ['2'],
      start: MON - 8 * HOUR,
      end: MON + 4 * 24 * HOUR + 16 * HOUR,
      display: 'background',
      classNames: ['wl-hire-band'],
      title: 'On hire',
    });
    expect(hireBand(board(), '8')).toBeNull();
    expect(hireBand(board(), null)).toBeNull();
  });

  it('scrolls to the earliest outlined booking, else to the start of the hire', () => {
    expect(pointerFocus(board(), { highlight: ['31', '32'], hireId: '7' })).toEqual({
      resourceId: '1',
      start: MON + 25 * HOUR,
      bookingId: '32',
    });
    expect(pointerFocus(board(), { highlight: [], hireId: '7' })).toEqual({
      resourceId: '2',
      start: MON - 8 * HOUR,
      bookingId: null,
    });
    expect(pointerFocus(board(), { highlight: ['99'], hireId: null })).toBeNull();
  });

  it('says what it shows, in the firm’s zone, and what it could not find', () => {
    expect(pointerNotice(board(), { highlight: ['31', '32', '99'], hireId: '7' }, 'Europe/London')).toEqual({
      bookings: [
        'TW-2417 · Crane lift on Crew Heron, Tue 15 Sep 10:00',
        'TW-2419 · Fill on Crew Heron, Tue 15 Sep 09:00',
      ],
      // On hire from midnight Monday to 00:00 on Saturday: paid Monday to Friday.
      hire: '3 t excavator (hired), on hire Mon 14 Sep – Fri 18 Sep',
      missingBookings: 1,
      missingHire: false,
    });
    expect(pointerNotice(board(), { highlight: [], hireId: '8' }, 'Europe/London')).toEqual({
      bookings: [],
      hire: null,
      missingBookings: 0,
      missingHire: true,
    });
  });
});
