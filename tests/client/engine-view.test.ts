import { describe, expect, it } from 'vitest';
import type { BoardData } from '@shared/board-data';
import { boardAnalysisOf, boardIndexOf, seesAllBookingsAs } from '@/components/board/engine-view';
import { stageLines } from '@/components/board/job-panel';
import { HOUR, MON, boardJob, WEEK_BOARD } from './board-week';

/**
 * A job of three stages in a row — dig (a day), pour the base (half a day), lift — where only the
 * lift is booked, on Crew Heron on Monday afternoon: before the unbooked dig and base could be done.
 * A crew member's board holds just this: the dig and base may well be booked on rows they don't see.
 */
function board(): BoardData {
  return {
    ...WEEK_BOARD,
    resources: [
      {
        id: 'r1',
        firmId: 'f1',
        category: 'crew',
        kind: 'install_crew',
        calendarId: 'c1',
        name: 'Crew Heron',
        firmName: 'Tideway',
        firmKind: 'installer',
        ownership: 'owned',
      },
    ],
    jobs: [boardJob()],
    stages: [
      {
        id: 'dig',
        jobId: 'j1',
        kind: 'excavation',
        name: 'Excavate pit',
        durationMinutes: 540,
        requirements: [{ kind: 'install_crew', count: 1 }],
        sequence: 1,
      },
      {
        id: 'base',
        jobId: 'j1',
        kind: 'base_pour',
        name: 'Pour base',
        durationMinutes: 240,
        requirements: [{ kind: 'install_crew', count: 1 }],
        sequence: 2,
      },
      {
        id: 'lift',
        jobId: 'j1',
        kind: 'lift',
        name: 'Crane lift',
        durationMinutes: 180,
        requirements: [{ kind: 'install_crew', count: 1 }],
        sequence: 3,
      },
    ],
    dependencies: [
      { id: 'd1', fromStageId: 'dig', toStageId: 'base', type: 'FS', lag: { amount: 0, unit: 'working_hours' } },
      { id: 'd2', fromStageId: 'base', toStageId: 'lift', type: 'FS', lag: { amount: 0, unit: 'working_hours' } },
    ],
    bookings: [
      {
        id: 'b1',
        stageId: 'lift',
        resourceId: 'r1',
        start: MON + 5 * HOUR,
        end: MON + 8 * HOUR,
        state: 'pencilled',
        installerFirmId: 'f1',
        version: 1,
      },
    ],
    hirePeriods: [],
    leadTimeRules: [],
  };
}

const analysed = (data: BoardData, seesAll: boolean) => boardAnalysisOf(data, boardIndexOf(data, seesAll));

describe("the engine over a crew member's part of the board", () => {
  it('is told the board is partial for crew only', () => {
    expect(seesAllBookingsAs('crew')).toBe(false);
    for (const role of ['owner', 'scheduler', 'manager', 'viewer'] as const) expect(seesAllBookingsAs(role)).toBe(true);
    expect(boardIndexOf(board(), false).seesAllBookings).toBe(false);
    expect(boardIndexOf(board(), true).seesAllBookings).toBe(true);
  });

  it("warns of the unbooked stages before the lift on the office's board, and not on a crew member's", () => {
    const office = analysed(board(), seesAllBookingsAs('scheduler')).violations.filter(
      (v) => v.kind === 'unbooked_predecessor',
    );
    expect(office.map((v) => v.stageIds)).toEqual([['base', 'dig', 'lift']]);
    expect(analysed(board(), seesAllBookingsAs('crew')).violations).toEqual([]);
  });
});

describe("the job panel's earliest times", () => {
  it("count an unbooked stage's unbooked predecessors, in working time", () => {
    // Now is Monday 09:07.
    const data = { ...board(), bookings: [], now: MON + 67 * 60_000 };
    const analysis = analysed(data, true);
    const lines = stageLines(
      data,
      boardIndexOf(data, true),
      'j1',
      analysis.criticalPaths.find((p) => p.jobId === 'j1'),
      analysis.violations,
    );
    // A dig of one whole working day must be done within one (it may not run on overnight), so not
    // from 09:15 Monday: Tuesday 08:00–17:00; the base then Wednesday 08:00–12:00, the lift from 12:00 (BST).
    const DAY = 24 * HOUR;
    expect(lines.map((l) => [l.stage.id, l.booked, l.earliestStart])).toEqual([
      ['dig', false, MON + DAY],
      ['base', false, MON + 2 * DAY],
      ['lift', false, MON + 2 * DAY + 4 * HOUR],
    ]);
  });
});
