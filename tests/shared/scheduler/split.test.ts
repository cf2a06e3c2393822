import { describe, expect, it } from 'vitest';
import {
  analyseBoard,
  autoPlace,
  checkMove,
  createBoardIndex,
  findSlots,
  formatInstant,
  localDayOf,
  type Board,
  type Violation,
} from '../../../shared/scheduler/index.js';
import { isBlocking } from '../../../shared/board-actions.js';
import { at, booking, LONDON } from './scenario.js';
import { JUNE_1, plannedBoard, WALLS_AFTER_CURE } from './in-ground.js';

const splits = (vs: Violation[]) => vs.filter((v) => v.kind === 'split');
const when = (t: number | undefined) => (t === undefined ? '' : formatInstant(t, LONDON));
const NOW = at(2026, 9, 1, 8); // Tue 1 Sep 2026 08:00 BST: every notice period has run by October

/** The in-ground job with the given bookings (made by Tideway); today Tue 1 Sep 2026. */
function boardWith(...bookings: Board['bookings']): Board {
  return { ...plannedBoard(WALLS_AFTER_CURE), bookings: bookings.map((b) => ({ ...b, installerFirmId: 'tideway' })) };
}

describe("a 4-hour electrician's visit (electricians work Mon–Fri 07:30–16:30 and Sat 08:00–12:00)", () => {
  it('booked from Friday 13:00 runs 3½ h on Friday and ½ h on Saturday: refused, saying where it fits', () => {
    // What the server made of "book it at Fri 13:00": four working hours end Sat 08:30.
    const b = boardWith(booking('visit', 'electrical_connect', 'priya', at(2026, 10, 2, 13), at(2026, 10, 3, 8, 30)));
    const vs = splits(analyseBoard(b, { now: NOW }).violations);
    expect(vs.map((v) => v.message)).toEqual([
      // Latest start that still fits Friday: 16:30 − 4 h = 12:30. Saturday's four hours hold it exactly.
      "'Connect and certify' would be split over two working days (Fri 2 Oct 13:00 to Sat 3 Oct 08:30): its 4 h must be done within one working day — start by 12:30 or from Sat 3 Oct 08:00",
    ]);
    expect(vs.every(isBlocking)).toBe(true);
    expect(vs[0]?.details).toMatchObject({
      earliestStart: at(2026, 10, 3, 8),
      latestStartThatDay: at(2026, 10, 2, 12, 30),
      neededMinutes: 240,
    });
  });

  it("is refused the same way while it is dragged from the tray (the board's incremental check)", () => {
    const index = createBoardIndex(boardWith(), { now: NOW });
    const vs = checkMove(index, { stageId: 'electrical_connect', start: at(2026, 10, 2, 13), resourceId: 'priya' });
    expect(splits(vs).map((v) => v.message)).toEqual([
      "'Connect and certify' would be split over two working days (Fri 2 Oct 13:00 to Sat 3 Oct 08:30): its 4 h must be done within one working day — start by 12:30 or from Sat 3 Oct 08:00",
    ]);
    expect(
      splits(checkMove(index, { stageId: 'electrical_connect', start: at(2026, 10, 2, 12, 30), resourceId: 'priya' })),
    ).toEqual([]);
  });

  it('booked for longer than the day has left from a good start: told when to end it', () => {
    const b = boardWith(booking('visit', 'electrical_connect', 'priya', at(2026, 10, 5, 8), at(2026, 10, 6, 12)));
    expect(splits(analyseBoard(b, { now: NOW }).violations).map((v) => v.message)).toEqual([
      "'Connect and certify' would be split over two working days (Mon 5 Oct 08:00 to Tue 6 Oct 12:00): its 4 h must be done within one working day — end it by 16:30",
    ]);
  });

  it('once on site (or done) it is what happened: not checked, so marking progress is never refused for it', () => {
    const b = boardWith(
      booking('visit', 'electrical_connect', 'priya', at(2026, 10, 2, 13), at(2026, 10, 3, 8, 30), {
        state: 'on_site',
      }),
    );
    expect(splits(analyseBoard(b, { now: NOW }).violations)).toEqual([]);
  });

  it('within one day is fine; so is running over when the template lets the stage continue next day', () => {
    expect(
      splits(
        analyseBoard(
          boardWith(booking('visit', 'electrical_connect', 'priya', at(2026, 10, 2, 8), at(2026, 10, 2, 12))),
          { now: NOW },
        ).violations,
      ),
    ).toEqual([]);
    const b = boardWith(booking('visit', 'electrical_connect', 'priya', at(2026, 10, 2, 13), at(2026, 10, 3, 8, 30)));
    b.stages = b.stages.map((s) => (s.id === 'electrical_connect' ? { ...s, mayContinueNextDay: true } : s));
    expect(splits(analyseBoard(b, { now: NOW }).violations)).toEqual([]);
  });
});

describe('stages longer than a working day', () => {
  it('are split over days as before (the walls: 16 h on a 9-hour day)', () => {
    const b = boardWith(booking('w', 'walls', 'gang', at(2026, 10, 5, 8), at(2026, 10, 6, 16)));
    b.stages = b.stages.map((s) => (s.id === 'walls' ? { ...s, mayContinueNextDay: false } : s));
    expect(splits(analyseBoard(b, { now: NOW }).violations)).toEqual([]);
  });
});

describe('the slot finder and auto-place keep such stages to one working day', () => {
  it('the first slot for the visit from Friday 13:00 is Saturday 08:00–12:00, then Monday 07:30', () => {
    const index = createBoardIndex(boardWith(), { now: NOW });
    const slots = findSlots(
      index,
      { stageId: 'electrical_connect', resourceId: 'priya', earliest: at(2026, 10, 2, 13) },
      { alternatives: 1 },
    );
    expect(slots.map((s) => [when(s.start), when(s.end)])).toEqual([
      ['Sat 3 Oct 08:00', 'Sat 3 Oct 12:00'],
      ['Mon 5 Oct 07:30', 'Mon 5 Oct 11:30'],
    ]);
  });

  it('auto-placing the whole job puts the connection on Saturday morning after the Friday lift, and every short stage within a day', () => {
    const board = plannedBoard(WALLS_AFTER_CURE);
    const result = autoPlace(board, { now: JUNE_1 });
    expect(result.unplaced).toEqual([]);
    const placed = new Map(result.placed.map((p) => [p.stageId, p]));
    // The lift's earliest is Fri 12 Jun 09:00 (see unbooked.test.ts); the delivery's two hours
    // don't fit before it that morning, so the lift waits an hour for the lorry: delivery 08:00–10:00,
    // lift 10:00–14:00. The connection after it: Friday 14:00 + 4 h would end past the electricians'
    // 16:30, so Sat 13 Jun 08:00–12:00.
    expect([when(placed.get('delivery')?.start), when(placed.get('delivery')?.end)]).toEqual([
      'Fri 12 Jun 08:00',
      'Fri 12 Jun 10:00',
    ]);
    expect([when(placed.get('lift')?.start), when(placed.get('lift')?.end)]).toEqual([
      'Fri 12 Jun 10:00',
      'Fri 12 Jun 14:00',
    ]);
    expect([when(placed.get('electrical_connect')?.start), when(placed.get('electrical_connect')?.end)]).toEqual([
      'Sat 13 Jun 08:00',
      'Sat 13 Jun 12:00',
    ]);
    const after = analyseBoard({ ...board, bookings: result.bookings }, { now: JUNE_1 });
    expect(after.violations.filter((v) => v.severity === 'error')).toEqual([]);
    for (const b of result.bookings) {
      const stage = board.stages.find((s) => s.id === b.stageId)!;
      if (stage.durationMinutes <= 540 && !stage.mayContinueNextDay)
        expect(localDayOf(LONDON, b.end - 1), b.stageId).toBe(localDayOf(LONDON, b.start));
    }
  });
});
