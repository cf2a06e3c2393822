import { describe, expect, it } from 'vitest';
import { analyseBoard, autoPlace, createBoardIndex, findSlots } from '../../../shared/scheduler/index.js';
import { at, booking, emptyBoard } from './scenario.js';

const NOW = at(2026, 5, 1, 9); // Fri 1 May 2026 09:00 BST

describe('finding a slot for the lift crane', () => {
  const board = emptyBoard();
  board.jobs = [...board.jobs, { id: 'job-2', firmId: 'installer-1' }];
  board.stages = [
    ...board.stages,
    {
      id: 'lift-2',
      jobId: 'job-2',
      kind: 'lift',
      name: 'Lift',
      durationMinutes: 540,
      requirements: [{ kind: 'crane', count: 1 }],
    },
  ];
  board.bookings = [
    booking('b-base', 'base', 'ground-1', at(2026, 5, 5, 8), at(2026, 5, 5, 12)),
    // The crane is out on another lift on Tue 12 May.
    booking('b-other', 'lift-2', 'crane-1', at(2026, 5, 12, 8), at(2026, 5, 12, 17)),
  ];
  const index = createBoardIndex(board, { now: NOW });

  it("the earliest start waits for the cure and steps past the crane's other booking", () => {
    // Cure: poured until Tue 5 May 12:00 BST, 70% at + 6.9136 d = Tue 12 May 09:56; the crane is
    // busy all of Tue 12 May, so the first slot is Wed 13 May 08:00.
    const slots = findSlots(index, { stageId: 'lift', resourceId: 'crane-1', earliest: NOW }, { alternatives: 2 });
    expect(slots.map((s) => s.start)).toEqual([at(2026, 5, 13, 8), at(2026, 5, 14, 8), at(2026, 5, 15, 8)]);
    expect(slots[0]?.end).toBe(at(2026, 5, 13, 12));
    expect(slots[0]?.cost.extraHireDays).toBe(0);
  });

  it('each slot, booked, passes every error check of the stage except the other kinds still to book', () => {
    for (const s of findSlots(index, { stageId: 'lift', resourceKind: 'crane', earliest: NOW })) {
      const vs = analyseBoard(
        { ...board, bookings: [...board.bookings, ...s.bookings] },
        { now: NOW },
      ).violations.filter((v) => v.severity === 'error' && v.stageIds.includes('lift'));
      expect(vs.map((v) => v.kind)).toEqual(['capacity', 'capacity']);
    }
  });

  it('a hired excavator outside its hire is offered with the extra hire days priced', () => {
    const slots = findSlots(
      createBoardIndex(emptyBoard(), { now: NOW }),
      { stageId: 'dig', resourceId: 'digger-1', earliest: at(2026, 5, 7, 8) },
      { alternatives: 1 },
    );
    // 12 working hours from Thu 7 May 08:00 runs to Fri 8 May 17:00: inside hire (1–9 May).
    // Its early start is Fri 1 May 09:00: Fri 09–17 (480) + Tue 5 (540) + Wed 6 (540) = 1560 working
    // minutes of float used; the job has no spare float, so it finishes later.
    expect(slots[0]?.cost).toEqual({ extraHireDays: 0, extraHirePence: 0, floatUsedMinutes: 1560, delaysJob: true });
    // Next alternative starts Fri 8 May and runs into Mon 11 May: one working day beyond off-hire.
    expect(slots[1]?.start).toBe(at(2026, 5, 8, 8));
    expect(slots[1]?.cost.extraHireDays).toBe(1);
    expect(slots[1]?.cost.extraHirePence).toBe(15_000);
  });
});

describe("the stage's other bookings move with a slot", () => {
  it('keeping their working time: a crew booked 15:00 to 10:00 next morning (4 working hours) comes along as 08:00–12:00', () => {
    const board = emptyBoard();
    board.bookings = [
      booking('b-crane', 'lift', 'crane-1', at(2026, 6, 2, 15), at(2026, 6, 3, 10)),
      booking('b-crew', 'lift', 'crew-a', at(2026, 6, 2, 15), at(2026, 6, 3, 10)),
    ];
    const [slot] = findSlots(
      createBoardIndex(board, { now: NOW }),
      { stageId: 'lift', resourceId: 'crane-1', earliest: at(2026, 6, 4, 8) },
      { alternatives: 0 },
    );
    expect(slot?.bookings.map((b) => [b.resourceId, b.start, b.end])).toEqual([
      ['crane-1', at(2026, 6, 4, 8), at(2026, 6, 4, 12)],
      ['crew-a', at(2026, 6, 4, 8), at(2026, 6, 4, 12)],
    ]);
  });
});

describe('auto-placing a whole install', () => {
  it('books every stage in order, on the earliest working slots, with nothing wrong', () => {
    const board = emptyBoard();
    const result = autoPlace(board, { now: NOW });
    expect(result.unplaced).toEqual([]);
    expect(result.order).toEqual(['dig', 'base', 'lift', 'connect']);
    // dig: 12 working hours from Fri 1 May 09:00: Fri 09–17 (8 h), Mon 4 May bank holiday, Tue 08–12.
    expect(result.placed[0]).toEqual({
      stageId: 'dig',
      start: at(2026, 5, 1, 9),
      end: at(2026, 5, 5, 12),
      resourceIds: ['ground-1', 'digger-1'],
    });
    expect(result.placed[1]).toMatchObject({ stageId: 'base', start: at(2026, 5, 5, 12), end: at(2026, 5, 5, 16) });
    // Poured until Tue 5 May 16:00; 70% at Tue 12 May 13:56 (ACI 209R-92, 6.9136 days), on the
    // 15-minute step 14:00; the crane's 5 working days' notice ends Mon 11 May 09:00. The lift's
    // 4 h would run from 14:00 into Wednesday (the calendar ends at 17:00), and a lift is done in
    // one working day: Wed 13 May 08:00.
    expect(result.placed[2]).toMatchObject({
      stageId: 'lift',
      start: at(2026, 5, 13, 8),
      end: at(2026, 5, 13, 12),
      resourceIds: ['crane-1', 'crew-a', 'pt-1', 'pt-2'],
    });
    // 1 working hour after the lift: Wed 13 May 13:00, 3 h to 16:00.
    expect(result.placed[3]).toMatchObject({
      stageId: 'connect',
      start: at(2026, 5, 13, 13),
      end: at(2026, 5, 13, 16),
    });
    const after = analyseBoard({ ...board, bookings: result.bookings }, { now: NOW });
    expect(after.errorCount).toBe(0);
    expect(result.bookings.every((b) => b.state === 'pencilled' && b.installerFirmId === 'installer-1')).toBe(true);
  });

  it('says why a stage could not be placed', () => {
    const board = emptyBoard();
    board.resources = board.resources.filter((r) => r.kind !== 'crane');
    const result = autoPlace(board, { now: NOW, horizonDays: 30 });
    expect(result.unplaced.map((u) => u.stageId)).toEqual(['lift', 'connect']);
    expect(result.unplaced[0]?.reason).toContain('crane');
    expect(result.unplaced[1]?.reason).toBe("It waits for 'Lift', which couldn't be placed");
  });
});

describe('a resource taken off the books', () => {
  const retired = (id: string) => {
    const board = emptyBoard();
    board.resources = board.resources.map((r) => (r.id === id ? { ...r, retired: true } : r));
    return board;
  };

  it('is never offered for new work: auto-place and slots take the other crew, and no crane means none', () => {
    const withoutA = retired('crew-a');
    expect(autoPlace(withoutA, { now: NOW }).placed[2]?.resourceIds).toEqual(['crane-1', 'crew-b', 'pt-1', 'pt-2']);
    const offered = findSlots(
      createBoardIndex(withoutA, { now: NOW }),
      { stageId: 'lift', resourceKind: 'install_crew', earliest: at(2026, 5, 13, 8) },
      { alternatives: 3 },
    ).flatMap((slot) => slot.bookings.map((b) => b.resourceId));
    expect(offered.length).toBeGreaterThan(0);
    expect(offered).not.toContain('crew-a');
    const noCrane = autoPlace(retired('crane-1'), { now: NOW, horizonDays: 30 });
    expect(noCrane.unplaced.map((u) => u.stageId)).toEqual(['lift', 'connect']);
  });

  it('still has its past bookings checked and shown like any other', () => {
    const board = retired('ground-1');
    board.bookings = [booking('b-dig', 'dig', 'ground-1', at(2026, 5, 1, 9), at(2026, 5, 5, 12))];
    const index = createBoardIndex(board, { now: NOW });
    expect(index.resources.get('ground-1')?.retired).toBe(true);
    expect(analyseBoard(board, { now: NOW }).criticalPaths[0]?.stages[0]).toMatchObject({
      stageId: 'dig',
      booked: true,
    });
  });
});
