import { describe, expect, it } from 'vitest';
import { analyseBoard, autoPlace, checkMove, createBoardIndex, type Board } from '../../../shared/scheduler/index.js';
import { JUNE_1, plannedBoard } from './in-ground.js';
import { at } from './scenario.js';

// The in-ground install from the default template, placed by auto-place: the lift on Wed 10 Jun
// 2026 at 11:00 BST and the delivery, wanted just in time, 09:00–11:00 that morning. Then the
// delivery is moved by hand.
function placed(justInTime = true): Board {
  const board = plannedBoard();
  board.stages = board.stages.map((s) => (s.id === 'delivery' ? { ...s, justInTime } : s));
  return { ...board, bookings: autoPlace(board, { now: JUNE_1, budgetMs: 0 }).bookings };
}
function withDelivery(board: Board, start: number, end: number): Board {
  return {
    ...board,
    bookings: board.bookings.map((b) => (b.stageId === 'delivery' ? { ...b, start, end } : b)),
  };
}
const warnings = (board: Board) =>
  analyseBoard(board, { now: JUNE_1 }).violations.filter((v) => v.kind === 'just_in_time');

describe('a stage wanted just in time, booked days early', () => {
  it('is in time on the morning of the lift, as auto-place books it', () => {
    const board = placed();
    expect(board.bookings.find((b) => b.stageId === 'delivery')).toMatchObject({
      start: at(2026, 6, 10, 9),
      end: at(2026, 6, 10, 11),
    });
    expect(warnings(board)).toEqual([]);
  });

  it('is in time the afternoon before', () => {
    expect(warnings(withDelivery(placed(), at(2026, 6, 9, 15), at(2026, 6, 9, 17)))).toEqual([]);
  });

  it('is warned of two working days ahead: the unit would stand on site (a warning: the booking stands)', () => {
    const board = withDelivery(placed(), at(2026, 6, 8, 9), at(2026, 6, 8, 11));
    const analysis = analyseBoard(board, { now: JUNE_1 });
    expect(analysis.errorCount).toBe(0);
    expect(warnings(board)).toEqual([
      {
        kind: 'just_in_time',
        severity: 'warning',
        stageIds: ['delivery', 'lift'],
        resourceIds: [],
        bookingIds: [],
        message:
          "'Delivery' ends 2 working days before 'Crane lift into pit' starts (Mon 8 Jun 11:00, then Wed 10 Jun 11:00): it is wanted just in time, on that day or the working day before, so nothing stands waiting on site",
        details: {
          dependencyId: 'delivery>lift',
          predecessorId: 'delivery',
          successorId: 'lift',
          workingDaysBefore: 2,
        },
      },
    ]);
  });

  it('says so while the delivery is dragged there, as the full analysis does', () => {
    const index = createBoardIndex(placed(), { now: JUNE_1 });
    const verdict = checkMove(index, { stageId: 'delivery', start: at(2026, 6, 8, 9) });
    expect(verdict.map((v) => `${v.severity} ${v.kind}`)).toEqual(['warning just_in_time']);
  });

  it('is not asked of a stage without the wish', () => {
    expect(warnings(withDelivery(placed(false), at(2026, 6, 8, 9), at(2026, 6, 8, 11)))).toEqual([]);
  });
});

describe('a stage wanted just in time, linked to the stage after it by its start or by a gap', () => {
  /** The in-ground install with the delivery's one link to the lift changed as given. */
  function placedWith(link: { type: 'SS' | 'FF' | 'FS'; lag: { amount: number; unit: 'working_hours' } }) {
    const board = plannedBoard();
    board.dependencies = board.dependencies.map((d) => (d.id === 'delivery>lift' ? { ...d, ...link } : d));
    const result = autoPlace(board, { now: JUNE_1, budgetMs: 0 });
    const when = (id: string) => result.bookings.find((b) => b.stageId === id);
    return { result, delivery: when('delivery'), lift: when('lift'), board: { ...board, bookings: result.bookings } };
  }

  it('starts an hour before the lift when the lift may start an hour after the lorry arrives (start to start)', () => {
    const { result, delivery, lift, board } = placedWith({ type: 'SS', lag: { amount: 1, unit: 'working_hours' } });
    expect(result.unplaced).toEqual([]);
    // The lift waits for the walls and the base's cure whatever the delivery does: Wed 10 Jun 11:00
    // BST, as above. Start to start with one working hour: the lorry arrives at 10:00 and its two
    // hours run to 12:00, while the crane lifts (worked out by hand from the link).
    expect(lift?.start).toBe(at(2026, 6, 10, 11));
    expect(delivery).toMatchObject({ start: at(2026, 6, 10, 10), end: at(2026, 6, 10, 12) });
    expect(analyseBoard(board, { now: JUNE_1 }).errorCount).toBe(0);
    expect(warnings(board)).toEqual([]);
  });

  it('is warned of, start to start as finish to start, when booked two working days before the lift', () => {
    const { board } = placedWith({ type: 'SS', lag: { amount: 1, unit: 'working_hours' } });
    const early = withDelivery(board, at(2026, 6, 8, 9), at(2026, 6, 8, 11));
    expect(warnings(early).map((v) => v.details)).toEqual([
      { dependencyId: 'delivery>lift', predecessorId: 'delivery', successorId: 'lift', workingDaysBefore: 2 },
    ]);
  });

  it('ends the working day before when a two-hour gap must follow it (finish to start with a gap)', () => {
    const { delivery, lift, board } = placedWith({ type: 'FS', lag: { amount: 2, unit: 'working_hours' } });
    // The lift stays at Wed 10 Jun 11:00 BST. Two working hours (Mon–Fri 08:00–17:00) before it is
    // 09:00, and the lorry's two hours would then start at 16:00 the day before, over a night it may
    // not span; so it goes that afternoon, 15:00–17:00, and the gap is 08:00–10:00 Wednesday
    // (worked out by hand from the calendar).
    expect(lift?.start).toBe(at(2026, 6, 10, 11));
    expect(delivery).toMatchObject({ start: at(2026, 6, 9, 15), end: at(2026, 6, 9, 17) });
    expect(analyseBoard(board, { now: JUNE_1 }).errorCount).toBe(0);
  });
});
