import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import {
  analyseBoard,
  applyMove,
  autoPlace,
  checkMove,
  createBoardIndex,
  findSlots,
  violationKey,
  type Board,
} from '../../../shared/scheduler/index.js';
import { at, booking, emptyBoard } from './scenario.js';
import { randomBoard, randomMove, T0 } from './random-board.js';

const NOW = at(2026, 5, 1, 9);

function deepFreeze<T>(o: T): T {
  if (o !== null && typeof o === 'object' && !Object.isFrozen(o)) {
    Object.freeze(o);
    for (const v of Object.values(o as object)) deepFreeze(v);
  }
  return o;
}

describe('checking one drag of the lift', () => {
  const board = emptyBoard();
  board.bookings = [
    booking('b-base', 'base', 'ground-1', at(2026, 6, 1, 8), at(2026, 6, 1, 12)),
    booking('b-crane', 'lift', 'crane-1', at(2026, 6, 10, 8), at(2026, 6, 10, 12)),
    booking('b-crew', 'lift', 'crew-a', at(2026, 6, 10, 8), at(2026, 6, 10, 12)),
    booking('b-pt1', 'lift', 'pt-1', at(2026, 6, 10, 8), at(2026, 6, 10, 12)),
    booking('b-pt2', 'lift', 'pt-2', at(2026, 6, 10, 8), at(2026, 6, 10, 12)),
  ];
  const index = createBoardIndex(board, { now: NOW });

  it('where it is, nothing is wrong', () => {
    expect(checkMove(index, { stageId: 'lift', start: at(2026, 6, 10, 8) })).toEqual([]);
  });

  it('dragged to the day after the pour, the base has not cured', () => {
    const vs = checkMove(index, { stageId: 'lift', start: at(2026, 6, 2, 8) });
    expect(vs.map((v) => v.kind)).toEqual(['cure']);
    // Poured until Mon 1 Jun 12:00 BST; + 6.9136 d = Mon 8 Jun 09:55:33 → 09:56.
    expect(vs[0]?.message).toBe(
      "'Lift' can't start before the base has cured: 70% strength is reached at Mon 8 Jun 09:56",
    );
  });

  it('the crane swapped for the groundworks crew leaves the lift short of a crane', () => {
    const vs = checkMove(index, {
      stageId: 'lift',
      start: at(2026, 6, 10, 8),
      bookingId: 'b-crane',
      resourceId: 'ground-1',
    });
    expect(vs.map((v) => v.message)).toEqual(["'Lift' needs 1 crane but 0 are booked"]);
  });
});

describe('properties', () => {
  it('the incremental verdict equals the full analysis restricted to the moved stage', () => {
    fc.assert(
      fc.property(
        fc.integer({ min: 1, max: 2 ** 31 - 1 }),
        fc.integer({ min: 1, max: 2 ** 31 - 1 }),
        (seed, moveSeed) => {
          const board = randomBoard(seed);
          const index = createBoardIndex(board, { now: T0 });
          const move = randomMove(board, moveSeed);
          const incremental = checkMove(index, move).map(violationKey);
          const full = analyseBoard(applyMove(board, index, move), { now: T0, skipCriticalPath: true })
            .violations.filter((v) => v.stageIds.includes(move.stageId))
            .map(violationKey);
          expect(incremental).toEqual(full);
        },
      ),
      { numRuns: 400 },
    );
  });

  it('auto-place never adds an error, and on an empty board leaves none', () => {
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 2 ** 31 - 1 }), fc.boolean(), (seed, empty) => {
        const board = randomBoard(seed, { bookedFraction: empty ? 0 : 0.5 });
        const before = new Set(
          analyseBoard(board, { now: T0, skipCriticalPath: true })
            .violations.filter((v) => v.severity === 'error')
            .map(violationKey),
        );
        const placed = autoPlace(board, { now: T0, horizonDays: 60 });
        const after = analyseBoard(
          { ...board, bookings: [...board.bookings, ...placed.bookings] },
          { now: T0, skipCriticalPath: true },
        );
        const added = after.violations.filter((v) => v.severity === 'error' && !before.has(violationKey(v)));
        expect(added).toEqual([]);
        if (empty) expect(after.violations.filter((v) => v.severity === 'error' && v.kind !== 'cycle')).toEqual([]);
        const accounted = new Set([...placed.placed.map((p) => p.stageId), ...placed.unplaced.map((u) => u.stageId)]);
        for (const s of board.stages) {
          if (!board.bookings.some((b) => b.stageId === s.id && b.state !== 'declined'))
            expect(accounted.has(s.id)).toBe(true);
        }
      }),
      { numRuns: 60 },
    );
  });

  it('no function changes its input', () => {
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 2 ** 31 - 1 }), (seed) => {
        const board = randomBoard(seed);
        const copy = structuredClone(board);
        deepFreeze(board);
        const index = createBoardIndex(board, { now: T0 });
        const move = randomMove(board, seed);
        checkMove(index, move);
        applyMove(board, index, move);
        analyseBoard(board, { now: T0 });
        autoPlace(board, { now: T0, horizonDays: 30 });
        const s = board.stages[0];
        if (s !== undefined && s.requirements[0] !== undefined)
          findSlots(index, { stageId: s.id, resourceKind: s.requirements[0].kind, earliest: T0 }, { horizonDays: 20 });
        expect(board).toEqual(copy);
      }),
      { numRuns: 40 },
    );
  });
});

describe('determinism', () => {
  it('auto-place gives the same answer twice', () => {
    const b: Board = randomBoard(42, { bookedFraction: 0.2 });
    expect(autoPlace(b, { now: T0 })).toEqual(autoPlace(b, { now: T0 }));
  });
});
