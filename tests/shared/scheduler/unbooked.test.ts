import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import {
  analyseBoard,
  applyMove,
  checkMove,
  checkStageBookings,
  createBoardIndex,
  findSlots,
  formatInstant,
  unbookedStageTimes,
  violationKey,
  type Board,
  type Booking,
  type StageMove,
  type Violation,
} from '../../../shared/scheduler/index.js';
import { isBlocking } from '../../../shared/board-actions.js';
import { at, booking, dep, emptyBoard, LONDON } from './scenario.js';
import { DECK_TEMPLATE, JUNE_1, plannedBoard, WALLS_AFTER_CURE } from './in-ground.js';
import { randomBoard, randomMove, prng, T0 } from './random-board.js';

const unbookedOf = (vs: Violation[]) => vs.filter((v) => v.kind === 'unbooked_predecessor');
const messages = (vs: Violation[]) =>
  unbookedOf(vs)
    .map((v) => v.message)
    .sort();
const when = (t: number | undefined) => (t === undefined ? '' : formatInstant(t, LONDON));

// Hand-worked: the job below, nothing booked, today Mon 1 Jun 2026 08:00 BST. Crews, the crane and
// the lorry work Mon–Fri 08:00–17:00, electricians Mon–Fri 07:30–16:30 and Sat 08:00–12:00.
//   survey 2 h: Mon 1 Jun 08:00–10:00 (from now)
//   excavation 12 h (may run over days): Mon 10:00–17:00 (7 h) + Tue 2 Jun 08:00–13:00 (5 h)
//   base pour 5 h, in one working day: Tue 13:00–18:00 would run past 17:00, so Wed 3 Jun 08:00–13:00
//   walls 16 h: after the base has set a day and cured to 70 %: ACI 209R-92 t = 4·0.7/(1 − 0.85·0.7)
//     = 6.9136 days after Wed 13:00 = Wed 10 Jun 10:56, on the quarter hour 11:00; 16 h = Wed 11–17
//     (6 h) + Thu 11 Jun (9 h) + Fri 12 Jun 08:00–09:00
//   first fix 4 h: 3 working days' notice from now on the electricians' week: Thu 4 Jun 08:00–12:00
//   delivery 2 h: 15 working days from the order (Fri 15 May 09:00; Mon 25 May is a bank holiday) = Mon 8 Jun 09:00–11:00
//   lift 4 h: after the walls, Fri 12 Jun 09:00–13:00
describe('earliest times of the stages in the tray', () => {
  const index = createBoardIndex(plannedBoard(WALLS_AFTER_CURE), { now: JUNE_1 });
  const times = (id: string) => {
    const t = unbookedStageTimes(index, id);
    return [when(t?.start), when(t?.finish)];
  };

  it('are worked back through every unbooked stage to now, with durations, lags, cure and notice', () => {
    expect(times('survey')).toEqual(['Mon 1 Jun 08:00', 'Mon 1 Jun 10:00']);
    expect(times('excavation')).toEqual(['Mon 1 Jun 10:00', 'Tue 2 Jun 13:00']);
    expect(times('base_pour')).toEqual(['Wed 3 Jun 08:00', 'Wed 3 Jun 13:00']);
    expect(times('walls')).toEqual(['Wed 10 Jun 11:00', 'Fri 12 Jun 09:00']);
    expect(times('electrical_first_fix')).toEqual(['Thu 4 Jun 08:00', 'Thu 4 Jun 12:00']);
    expect(times('delivery')).toEqual(['Mon 8 Jun 09:00', 'Mon 8 Jun 11:00']);
    expect(times('lift')).toEqual(['Fri 12 Jun 09:00', 'Fri 12 Jun 13:00']);
  });

  it('say what holds each back', () => {
    expect(unbookedStageTimes(index, 'walls')?.heldBy).toEqual({
      kind: 'predecessor',
      stageId: 'base_pour',
      dependencyId: 'base_pour>walls',
      booked: false,
    });
    expect(unbookedStageTimes(index, 'delivery')?.heldBy).toEqual({
      kind: 'lead_time',
      workingDays: 15,
      from: 'order',
      ordered: true,
    });
    expect(unbookedStageTimes(index, 'survey')?.heldBy).toEqual({ kind: 'now' });
    expect(unbookedStageTimes(index, 'electrical_first_fix')?.calendarId).toBe('cal-electricians');
  });
});

describe('a crane lift dropped while everything before it is unbooked', () => {
  const board = plannedBoard(WALLS_AFTER_CURE);
  const index = createBoardIndex(board, { now: JUNE_1 });
  const drop = (start: number): StageMove => ({ stageId: 'lift', start, resourceId: 'crane' });

  it('is refused, naming the unbooked stages that could not be done in time', () => {
    const vs = checkMove(index, drop(at(2026, 6, 9, 8)));
    expect(messages(vs)).toEqual([
      "'Crane lift into pit' can't start before about Fri 12 Jun 09:00: 'Block retaining walls' (not booked yet) needs 16 h first; it can't start itself before about Wed 10 Jun 11:00 (after 'Pour reinforced base', not booked yet)",
      "'Crane lift into pit' can't start before about Wed 10 Jun 11:00: 'Pour reinforced base' (not booked yet) needs 5 h and 6.9 days to cure first; it can't start itself before about Wed 3 Jun 08:00 (after 'Excavate pit', not booked yet)",
    ]);
    expect(unbookedOf(vs).every(isBlocking)).toBe(true);
    const walls = unbookedOf(vs).find((v) => v.details?.predecessorId === 'walls');
    // The lift, the walls and the unbooked stages that decided the walls' times, back to now.
    expect(walls?.stageIds).toEqual(['base_pour', 'excavation', 'lift', 'survey', 'walls']);
    expect(walls?.details).toMatchObject({ earliestStart: at(2026, 6, 12, 9), anchor: 'now', successorId: 'lift' });
  });

  it("gets the same verdict from the server's check and from the full analysis of the board it would make", () => {
    const move = drop(at(2026, 6, 9, 8));
    const theLift = checkMove(index, move)
      .filter((v) => v.kind === 'unbooked_predecessor')
      .map(violationKey);
    const after = applyMove(board, index, move);
    const server = checkStageBookings(
      index,
      'lift',
      after.bookings.filter((b) => b.stageId === 'lift'),
    ).filter((v) => v.kind === 'unbooked_predecessor');
    const full = analyseBoard(after, { now: JUNE_1 }).violations.filter((v) => v.kind === 'unbooked_predecessor');
    expect(server.map(violationKey)).toEqual(theLift);
    expect(full.map(violationKey)).toEqual(theLift);
  });

  it("is accepted from the walls' earliest finish, and refused a quarter of an hour before", () => {
    expect(checkMove(index, drop(at(2026, 6, 12, 9))).filter(isBlocking)).toEqual([]);
    expect(messages(checkMove(index, drop(at(2026, 6, 12, 8, 45))))).toHaveLength(1);
  });

  it('once accepted, leaves the base pour bookable at its own earliest time (it used to be refused as "too early")', () => {
    const withLift = applyMove(board, index, drop(at(2026, 6, 12, 9)));
    const index2 = createBoardIndex(withLift, { now: JUNE_1 });
    expect(
      checkMove(index2, { stageId: 'base_pour', start: at(2026, 6, 3, 8), resourceId: 'gang' }).filter(isBlocking),
    ).toEqual([]);
  });
});

describe('moving a booked stage that unbooked stages after it wait for', () => {
  const board: Board = {
    ...plannedBoard(WALLS_AFTER_CURE),
    bookings: [
      booking('b-base', 'base_pour', 'gang', at(2026, 6, 3, 8), at(2026, 6, 3, 13), { installerFirmId: 'tideway' }),
      booking('b-lift', 'lift', 'crane', at(2026, 6, 12, 9), at(2026, 6, 12, 13), { installerFirmId: 'tideway' }),
    ],
  };
  const index = createBoardIndex(board, { now: JUNE_1 });

  it('where it is, nothing waits too long', () => {
    expect(unbookedOf(analyseBoard(board, { now: JUNE_1 }).violations)).toEqual([]);
  });

  it('two days later is refused: the walls (not booked) could no longer be done before the booked lift', () => {
    // Poured until Fri 5 Jun 13:00; cured Fri 12 Jun 10:56 (11:00); walls Fri 11–17, Mon 15 Jun, Tue 16 Jun 08:00–09:00.
    const vs = checkMove(index, { stageId: 'base_pour', start: at(2026, 6, 5, 8) });
    expect(messages(vs)).toEqual([
      "'Crane lift into pit' can't start before about Tue 16 Jun 09:00: 'Block retaining walls' (not booked yet) needs 16 h first; it can't start itself before about Fri 12 Jun 11:00 (after 'Pour reinforced base')",
    ]);
    expect(unbookedOf(vs)[0]?.stageIds).toEqual(['base_pour', 'lift', 'walls']);
    expect(vs.map((v) => v.kind).sort()).toEqual(['cure', 'unbooked_predecessor']);
  });
});

describe('notice counted from the order, through an unbooked delivery', () => {
  it('from the order date when the unit is ordered', () => {
    // Deck: survey, deck check, first fix and delivery before the lift; the delivery is the last ready (Mon 8 Jun 11:00).
    const index = createBoardIndex(plannedBoard(DECK_TEMPLATE), { now: JUNE_1 });
    expect(messages(checkMove(index, { stageId: 'lift', start: at(2026, 6, 8, 9), resourceId: 'crane' }))).toEqual([
      "'Crane lift onto deck' can't start before about Mon 8 Jun 11:00: 'Delivery' (not booked yet) needs 2 h first; it can't start itself before about Mon 8 Jun 09:00 (15 working days' notice from the order date)",
    ]);
  });

  it('from today when it is not ordered yet', () => {
    // 15 working days from Mon 1 Jun 08:00: Jun 2–5 (4), 8–12 (9), 15–19 (14), Mon 22 Jun (15).
    const index = createBoardIndex(plannedBoard(DECK_TEMPLATE, null), { now: JUNE_1 });
    expect(messages(checkMove(index, { stageId: 'lift', start: at(2026, 6, 8, 9), resourceId: 'crane' }))).toEqual([
      "'Crane lift onto deck' can't start before about Mon 22 Jun 10:00: 'Delivery' (not booked yet) needs 2 h first; it can't start itself before about Mon 22 Jun 08:00 (15 working days' notice from today (not ordered yet))",
    ]);
  });
});

describe('the earliest start shown', () => {
  it("is where the successor's resource could start: after a lift ending at 17:00, the electricians' next morning", () => {
    // Deck job: the delivery booked Mon 8 Jun 11:00–13:00, so the unbooked lift could run 13:00–17:00;
    // the electricians stop at 16:30, so the connection can start Tue 9 Jun 07:30 at the earliest.
    const b = plannedBoard(DECK_TEMPLATE);
    b.bookings = [
      booking('d', 'delivery', 'lorry', at(2026, 6, 8, 11), at(2026, 6, 8, 13), { installerFirmId: 'tideway' }),
      booking('c', 'electrical_connect', 'priya', at(2026, 6, 8, 13), at(2026, 6, 8, 16, 30), {
        installerFirmId: 'tideway',
        state: 'sent',
      }),
    ];
    expect(messages(analyseBoard(b, { now: JUNE_1 }).violations)).toEqual([
      "'Connect and certify' can't start before about Tue 9 Jun 07:30: 'Crane lift onto deck' (not booked yet) needs 4 h first; it can't start itself before about Mon 8 Jun 13:00 (after 'Delivery')",
    ]);
  });
});

describe('other links from an unbooked stage', () => {
  it('finish to finish: the connection cannot finish before the unbooked lift could', () => {
    const b = emptyBoard(); // today Fri 1 May 2026 09:00; the crane wants 5 working days' notice (Mon 11 May 09:00, after the bank holiday)
    b.dependencies = [dep('lift', 'connect', 'FF')];
    b.bookings = [booking('c', 'connect', 'spark-1', at(2026, 5, 11, 9), at(2026, 5, 11, 12))];
    const vs = analyseBoard(b, { now: at(2026, 5, 1, 9) }).violations;
    expect(messages(vs)).toEqual([
      "'Electrical connect' can't finish before about Mon 11 May 13:00: 'Lift' (not booked yet) can't finish before about Mon 11 May 13:00; it can't start itself before about Mon 11 May 09:00 (5 working days' notice from today)",
    ]);
  });
});

describe('when the check stands aside', () => {
  it('work already on site (or done) is not second-guessed; the same booking merely confirmed is', () => {
    const b = plannedBoard(WALLS_AFTER_CURE);
    const lift = (state: Booking['state'], id = 'b-lift', resourceId = 'crane') =>
      booking(id, 'lift', resourceId, at(2026, 6, 1, 9), at(2026, 6, 1, 13), { state, installerFirmId: 'tideway' });
    expect(unbookedOf(analyseBoard({ ...b, bookings: [lift('on_site')] }, { now: JUNE_1 }).violations)).toEqual([]);
    // The crew has arrived though the crane's booking still says confirmed: under way all the same.
    expect(
      unbookedOf(
        analyseBoard({ ...b, bookings: [lift('confirmed'), lift('on_site', 'b-crew', 'crew-heron')] }, { now: JUNE_1 })
          .violations,
      ),
    ).toEqual([]);
    // The walls, the delivery, the first fix and the crane firm's lift plan, and the base through its cure.
    expect(unbookedOf(analyseBoard({ ...b, bookings: [lift('confirmed')] }, { now: JUNE_1 }).violations)).toHaveLength(
      5,
    );
  });

  it('a predecessor whose only resource never works (no hours on its calendar) sets no bound instead of failing the board', () => {
    const b = plannedBoard(DECK_TEMPLATE);
    b.calendars = [...b.calendars, { id: 'cal-never', timeZone: LONDON, weekly: [[], [], [], [], [], [], []] }];
    b.resources = b.resources.map((r) => (r.id === 'lorry' ? { ...r, calendarId: 'cal-never' } : r));
    b.bookings = [booking('l', 'lift', 'crane', at(2026, 6, 8, 9), at(2026, 6, 8, 13), { installerFirmId: 'tideway' })];
    // The checks (what the server runs on a write); the critical path refuses such a calendar on its own.
    const vs = analyseBoard(b, { now: JUNE_1, skipCriticalPath: true }).violations;
    expect(unbookedOf(vs).filter((v) => v.stageIds.includes('delivery'))).toEqual([]);
  });

  it("a board holding only part of the bookings (a crew member's own rows) does not guess", () => {
    const b = {
      ...plannedBoard(WALLS_AFTER_CURE),
      bookings: [
        booking('b-lift', 'lift', 'crane', at(2026, 6, 9, 8), at(2026, 6, 9, 12), { installerFirmId: 'tideway' }),
      ],
    };
    expect(unbookedOf(analyseBoard(b, { now: JUNE_1, seesAllBookings: false }).violations)).toEqual([]);
    expect(unbookedOf(analyseBoard(b, { now: JUNE_1 }).violations)).toHaveLength(2);
  });
});

describe('the slot finder', () => {
  it('offers the lift no earlier than its unbooked predecessors allow', () => {
    const index = createBoardIndex(plannedBoard(WALLS_AFTER_CURE), { now: JUNE_1 });
    const slots = findSlots(index, { stageId: 'lift', resourceKind: 'crane', earliest: JUNE_1 }, { alternatives: 1 });
    expect(slots.map((s) => when(s.start))).toEqual(['Fri 12 Jun 09:00', 'Mon 15 Jun 08:00']);
  });
});

describe('property: the drops the board accepts never add an order, lag, cure or unbooked-predecessor error', () => {
  const KINDS = new Set(['order', 'lag', 'cure', 'unbooked_predecessor']);
  let accepted = 0;

  it('holds over sequences of drops from an empty board, each checked incrementally', () => {
    fc.assert(
      fc.property(
        fc.integer({ min: 1, max: 2 ** 31 - 1 }),
        fc.integer({ min: 1, max: 2 ** 31 - 1 }),
        (seed, dropSeed) => {
          let board = randomBoard(seed, { bookedFraction: 0, stagesPerJob: 5 });
          const rnd = prng(dropSeed);
          for (let n = 0; n < 14; n++) {
            const index = createBoardIndex(board, { now: T0 });
            const stage = board.stages[Math.floor(rnd() * board.stages.length)]!;
            let target = stage.id;
            let own: Booking[] | null = null;
            if (rnd() < 0.6 && stage.requirements[0]) {
              // Mostly where the slot finder offers (these are usually accepted) …
              const slot = findSlots(
                index,
                {
                  stageId: stage.id,
                  resourceKind: stage.requirements[0].kind,
                  earliest: T0 + Math.floor(rnd() * 10) * 86_400_000,
                },
                { alternatives: 0, horizonDays: 40 },
              )[0];
              if (slot) own = slot.bookings;
            } else {
              // … and anywhere at all (most of these are refused).
              const move = randomMove(board, Math.floor(rnd() * 2 ** 31));
              target = move.stageId;
              try {
                own = applyMove(board, index, move).bookings.filter(
                  (b) => b.stageId === move.stageId && b.state !== 'declined',
                );
              } catch {
                own = null;
              }
            }
            if (own === null || own.length === 0) continue;
            if (checkStageBookings(index, target, own).some(isBlocking)) continue;
            const others = board.bookings.filter((b) => b.stageId !== target);
            board = { ...board, bookings: [...others, ...own] };
            accepted++;
            const found = analyseBoard(board, { now: T0, skipCriticalPath: true }).violations.filter(
              (v) => KINDS.has(v.kind) && v.severity === 'error',
            );
            expect(found).toEqual([]);
          }
        },
      ),
      { numRuns: 120 },
    );
    // The property only means something if drops were accepted.
    expect(accepted).toBeGreaterThan(300);
  });
});
