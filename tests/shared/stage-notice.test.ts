import { describe, expect, it } from 'vitest';
import {
  analyseBoard,
  createBoardIndex,
  formatInstant,
  unbookedStageTimes,
  type Board,
  type Booking,
} from '../../shared/scheduler/index.js';
import { at, LONDON } from './scheduler/scenario.js';
import { plannedBoard } from './scheduler/in-ground.js';

// The in-ground job of the scheduler fixtures, its unit ordered Fri 15 May 2026 09:00 (Mon 25 May is
// a bank holiday), today Mon 1 Jun 08:00. The firm's rule: 15 working days for any delivery from the
// order (Mon 8 Jun 09:00). The job's own stage rule: this maker's 35 working days from the order:
// 7 weeks of 5 days from Fri 15 May 09:00 is Fri 3 Jul 09:00, one more for the bank holiday: Mon 6 Jul 09:00.
const NOW = at(2026, 6, 1, 8);
const withMakerLead = (bookings: Booking[] = []): Board => {
  const board = plannedBoard();
  return {
    ...board,
    bookings,
    leadTimeRules: [
      ...board.leadTimeRules,
      { appliesTo: { stageId: 'delivery' }, workingDays: 35, from: 'order', reason: "the maker's lead time" },
    ],
  };
};
const delivery = (d: number, m = 6): Booking => ({
  id: 'lorry-1',
  stageId: 'delivery',
  resourceId: 'lorry',
  start: at(2026, m, d, 9),
  end: at(2026, m, d, 11),
  state: 'pencilled',
  installerFirmId: 'tideway',
});
const notice = (board: Board) =>
  analyseBoard(board, { now: NOW, skipCriticalPath: true }).violations.filter((v) => v.kind === 'lead_time');

describe("a stage's own notice (the maker's lead time on the delivery)", () => {
  it('refuses the delivery before the order date plus 35 working days', () => {
    expect(notice(withMakerLead([delivery(10)])).map((v) => v.message)).toEqual([
      "'Delivery' needs 35 working days' notice from the order date (the maker's lead time): the earliest start is Mon 6 Jul 09:00",
    ]);
  });

  it("tells only the rule that holds it back longest when the firm's 15 days are short too", () => {
    expect(notice(withMakerLead([delivery(5)])).map((v) => v.message)).toEqual([
      "'Delivery' needs 35 working days' notice from the order date (the maker's lead time): the earliest start is Mon 6 Jul 09:00",
    ]);
  });

  it('takes it from that day', () => {
    expect(notice(withMakerLead([delivery(6, 7)]))).toEqual([]);
  });

  it("holds another job's delivery to the firm's rule alone", () => {
    const board = withMakerLead([delivery(10)]);
    const other = {
      ...board,
      leadTimeRules: board.leadTimeRules.map((r) =>
        r.appliesTo.stageId ? { ...r, appliesTo: { stageId: 'someone-else' } } : r,
      ),
    };
    expect(notice(other)).toEqual([]);
  });

  it('keeps the unbooked delivery in the tray until then, saying whose notice it is', () => {
    const times = unbookedStageTimes(createBoardIndex(withMakerLead(), { now: NOW }), 'delivery');
    expect(formatInstant(times?.start ?? 0, LONDON)).toBe('Mon 6 Jul 09:00');
    expect(times?.heldBy).toEqual({
      kind: 'lead_time',
      workingDays: 35,
      from: 'order',
      ordered: true,
      reason: "the maker's lead time",
    });
  });
});
