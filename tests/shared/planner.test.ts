import { readFileSync } from 'node:fs';
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import {
  analyseBoard,
  autoPlace,
  weeklyHours,
  type AutoPlaceResult,
  type Board,
  type Booking,
  type Resource,
  type Stage,
} from '../../shared/scheduler/index.js';
import { comparePlanCosts } from '../../shared/scheduler/planner/place.js';
import { checkPsplibPlan, parseSm, psplibBoard, PSPLIB_NOW } from '../../bench/psplib/psplib.js';
import { at, dep, firmCal, LONDON } from './scheduler/scenario.js';
import { JUNE_1, plannedBoard } from './scheduler/in-ground.js';

// Instances and proven optimal makespans from PSPLIB: R. Kolisch and A. Sprecher, "PSPLIB — A
// project scheduling problem library", EJOR 96 (1996) 205–216 (tests/fixtures/psplib/README.md).
const PSPLIB_OPTIMA: [string, number][] = [
  ['j301_1.sm', 43],
  ['j3010_2.sm', 56],
  ['j3013_1.sm', 58],
  ['j3037_4.sm', 83],
  ['j3045_3.sm', 92],
];

function fixture(name: string): string {
  return readFileSync(new URL(`../fixtures/psplib/${name}`, import.meta.url), 'utf8');
}

describe('planner on PSPLIB j30 instances', () => {
  it.each(PSPLIB_OPTIMA)(
    '%s: feasible and within 5 per cent of the optimum, %i, with a 100 ms budget',
    (name, optimum) => {
      const inst = parseSm(fixture(name));
      const board = psplibBoard(inst);
      const result = autoPlace(board, { now: PSPLIB_NOW, budgetMs: 100, seed: 7 });
      const check = checkPsplibPlan(inst, result.bookings);
      expect(check.problems).toEqual([]);
      expect(result.unplaced).toEqual([]);
      expect(check.makespan).toBeGreaterThanOrEqual(optimum);
      // Margin: the benchmark averages well under 1 % at 300 ms; 5 % leaves room for the small budget.
      expect(check.makespan).toBeLessThanOrEqual(Math.floor(optimum * 1.05));
      expect(result.costs.finishMinutes).toBe(check.makespan * 60);
    },
  );

  it('beats the single pass where the single pass is far from the optimum, and says so', () => {
    const inst = parseSm(fixture('j3010_2.sm'));
    const board = psplibBoard(inst);
    const single = autoPlace(board, { now: PSPLIB_NOW, budgetMs: 0 });
    const planned = autoPlace(board, { now: PSPLIB_NOW, budgetMs: 100 });
    expect(single.source).toBe('single-pass');
    expect(planned.source).toBe('search');
    expect(checkPsplibPlan(inst, planned.bookings).makespan).toBeLessThan(
      checkPsplibPlan(inst, single.bookings).makespan,
    );
  });

  it('gives the same plan for the same seed and budget, and reports progress', () => {
    const board = psplibBoard(parseSm(fixture('j3037_4.sm')));
    const seen: string[] = [];
    const a = autoPlace(board, { now: PSPLIB_NOW, budgetMs: 40, seed: 3, onProgress: (p) => seen.push(p.phase) });
    const b = autoPlace(board, { now: PSPLIB_NOW, budgetMs: 40, seed: 3 });
    expect(b.bookings).toEqual(a.bookings);
    expect(seen[0]).toBe('single-pass');
    expect(seen).toContain('search');
    expect(seen).toContain('placing');
  });
});

// Random boards: an invented installer (two install crews sharing a person, a hired crane with a
// hire period and notice, an electrician on a four-day week), closures, other work already booked,
// and one or two jobs of linked stages, some with a promised date.
const crewCal = { ...firmCal, id: 'cal-crew', holidayRegion: null };
const sparkCal = {
  id: 'cal-spark',
  timeZone: LONDON,
  weekly: weeklyHours([1, 2, 3, 4], [[7 * 60, 15 * 60]]),
  holidayRegion: null,
};
const RESOURCES: Resource[] = [
  {
    id: 'crew-a',
    firmId: 'f1',
    category: 'crew',
    kind: 'install_crew',
    calendarId: 'cal-crew',
    personIds: ['ann', 'bo'],
  },
  {
    id: 'crew-b',
    firmId: 'f1',
    category: 'crew',
    kind: 'install_crew',
    calendarId: 'cal-crew',
    personIds: ['bo', 'cy'],
  },
  { id: 'crew-c', firmId: 'f1', category: 'crew', kind: 'install_crew', calendarId: 'cal-crew', personIds: ['di'] },
  { id: 'crane-1', firmId: 'f2', category: 'machine', kind: 'crane', calendarId: 'cal-crew', hired: true },
  { id: 'spark-1', firmId: 'f3', category: 'person', kind: 'electrician', calendarId: 'cal-spark' },
];
const NOW = at(2026, 6, 1, 7);
const KINDS = ['install_crew', 'crane', 'electrician'];

const boardArb = fc.record({
  closureDay: fc.integer({ min: 1, max: 20 }),
  busy: fc.array(
    fc.record({
      r: fc.integer({ min: 0, max: 4 }),
      day: fc.integer({ min: 0, max: 15 }),
      hours: fc.integer({ min: 1, max: 8 }),
    }),
    { maxLength: 8 },
  ),
  jobs: fc.array(
    fc.record({
      stages: fc.array(
        fc.record({
          kind: fc.integer({ min: 0, max: 2 }),
          hours: fc.integer({ min: 1, max: 8 }),
          crew: fc.integer({ min: 1, max: 2 }),
        }),
        { minLength: 2, maxLength: 5 },
      ),
      link: fc.constantFrom('FS', 'SS'),
      lag: fc.integer({ min: 0, max: 4 }),
      promisedDay: fc.option(fc.integer({ min: 3, max: 30 }), { nil: undefined }),
    }),
    { minLength: 1, maxLength: 2 },
  ),
});

type BoardSpec = typeof boardArb extends fc.Arbitrary<infer T> ? T : never;

function buildBoard(spec: BoardSpec): Board {
  const stages: Stage[] = [
    {
      id: 'other-work',
      jobId: 'other',
      kind: 'survey',
      name: 'Other work',
      durationMinutes: 60,
      requirements: [{ kind: 'install_crew', count: 1 }],
    },
  ];
  const deps: Board['dependencies'] = [];
  spec.jobs.forEach((j, ji) =>
    j.stages.forEach((s, si) => {
      const kind = KINDS[s.kind] as string;
      stages.push({
        id: `j${ji}-s${si}`,
        jobId: `job-${ji}`,
        kind: `step-${si}`,
        name: `Step ${si + 1}`,
        durationMinutes: s.hours * 60,
        requirements: [{ kind, count: kind === 'install_crew' ? s.crew : 1 }],
        mayContinueNextDay: s.hours > 4,
      });
      if (si > 0) deps.push(dep(`j${ji}-s${si - 1}`, `j${ji}-s${si}`, j.link, j.lag, 'working_hours'));
    }),
  );
  // Other work already booked: one block per resource and day, never overlapping each other.
  const taken = new Set<string>();
  const bookings: Booking[] = [];
  for (const b of spec.busy) {
    const key = `${b.r}/${b.day}`;
    if (taken.has(key)) continue;
    taken.add(key);
    const r = RESOURCES[b.r] as Resource;
    const start = NOW + b.day * 86_400_000 + 2 * 3_600_000; // 10:00 (BST) on a later day
    bookings.push({
      id: `busy-${key}`,
      stageId: 'other-work',
      resourceId: r.id,
      start,
      end: start + b.hours * 3_600_000,
      state: 'confirmed',
      installerFirmId: 'other-firm',
    });
  }
  return {
    calendars: [
      {
        ...crewCal,
        closures: [
          {
            start: NOW + spec.closureDay * 86_400_000 - 7 * 3_600_000,
            end: NOW + (spec.closureDay + 1) * 86_400_000 - 7 * 3_600_000,
          },
        ],
      },
      sparkCal,
    ],
    resources: RESOURCES,
    jobs: [
      { id: 'other', firmId: 'other-firm' },
      ...spec.jobs.map((j, ji) => ({
        id: `job-${ji}`,
        firmId: 'f1',
        promisedBy: j.promisedDay === undefined ? null : NOW + j.promisedDay * 86_400_000,
      })),
    ],
    stages,
    dependencies: deps,
    bookings,
    hirePeriods: [
      {
        id: 'crane-hire',
        resourceId: 'crane-1',
        onHire: NOW + 2 * 86_400_000,
        offHire: NOW + 40 * 86_400_000,
        dayRatePence: 25_000,
      },
    ],
    leadTimeRules: [{ appliesTo: { resourceKind: 'crane' }, workingDays: 2, from: 'now' }],
  };
}

function placedBoard(board: Board, r: AutoPlaceResult): Board {
  return { ...board, bookings: [...board.bookings, ...r.bookings] };
}

describe('planner on random boards', () => {
  it('places only where every rule holds, never moves existing bookings, and is never worse than the single pass', () => {
    fc.assert(
      fc.property(boardArb, (spec) => {
        const board = buildBoard(spec);
        const jobIds = spec.jobs.map((_, ji) => `job-${ji}`);
        const single = autoPlace(board, { now: NOW, jobIds, budgetMs: 0 });
        const planned = autoPlace(board, { now: NOW, jobIds, budgetMs: 15, seed: 5 });
        expect(comparePlanCosts(planned.costs, single.costs)).toBeLessThanOrEqual(0);
        const placedIds = new Set(planned.placed.map((p) => p.stageId));
        const errors = analyseBoard(placedBoard(board, planned), { now: NOW }).violations.filter(
          (v) => v.severity === 'error' && v.kind !== 'capacity' && v.stageIds.some((id) => placedIds.has(id)),
        );
        expect(errors).toEqual([]);
        expect(
          planned.bookings.every((b) => b.state === 'pencilled' && !board.bookings.some((x) => x.id === b.id)),
        ).toBe(true);
        expect(planned.placed.length + planned.unplaced.length).toBe(board.stages.length - 1);
      }),
      { numRuns: 25, seed: 20260601 },
    );
  });
});

describe('a delivery wanted on the lift day (delivery and lift day: lorry, crane and crew together)', () => {
  // The in-ground install from the default template, ordered Fri 15 May 2026; nothing else booked.
  const placedAt = (board: Board, budgetMs: number) => {
    const result = autoPlace(board, { now: JUNE_1, budgetMs });
    const of = (id: string) => result.placed.find((p) => p.stageId === id);
    return { result, delivery: of('delivery'), lift: of('lift') };
  };

  it.each([0, 300])('comes right before the lift, not as soon as the lead time allows (budget %i ms)', (budgetMs) => {
    const board = plannedBoard();
    expect(board.stages.find((s) => s.id === 'delivery')?.justInTime).toBe(true);
    const { result, delivery, lift } = placedAt(board, budgetMs);
    expect(result.unplaced).toEqual([]);
    // The lift waits for the walls and the base's cure: Wed 10 Jun 11:00 BST. The lorry's two hours
    // end as it starts, the same morning.
    expect(lift?.start).toBe(at(2026, 6, 10, 11));
    expect(delivery).toMatchObject({ start: at(2026, 6, 10, 9), end: at(2026, 6, 10, 11), resourceIds: ['lorry'] });
    expect(analyseBoard(placedBoard(board, result), { now: JUNE_1 }).errorCount).toBe(0);
  });

  it('without the wish, goes as early as the lead time allows, two days before the lift', () => {
    const board = plannedBoard();
    board.stages = board.stages.map((s) => ({ ...s, justInTime: false }));
    const { delivery, lift } = placedAt(board, 0);
    // 15 working days from Fri 15 May 09:00, Mon 25 May a bank holiday: Mon 8 Jun 09:00 (counted by hand).
    expect(delivery?.start).toBe(at(2026, 6, 8, 9));
    expect(lift?.start).toBe(at(2026, 6, 10, 11));
  });

  /** Another firm's work on one of the job's resources ('lorry', 'crane') over [from, to). */
  const withBusy = (resourceId: string, kind: string, from: number, to: number): Board => {
    const board = plannedBoard();
    board.jobs.push({ id: 'elsewhere', firmId: 'other' });
    board.stages.push({
      id: 'elsewhere-work',
      jobId: 'elsewhere',
      kind: 'haul',
      name: 'Work elsewhere',
      durationMinutes: 60,
      requirements: [{ kind, count: 1 }],
      mayContinueNextDay: true,
    });
    board.bookings.push({
      id: 'elsewhere-1',
      stageId: 'elsewhere-work',
      resourceId,
      start: from,
      end: to,
      state: 'confirmed',
      installerFirmId: 'other',
    });
    return board;
  };
  const withLorryBusy = (from: number, to: number) => withBusy('lorry', 'lorry', from, to);
  const withCraneBusy = (from: number, to: number) => withBusy('crane', 'crane', from, to);

  it('comes the afternoon before when the lorry is out on the lift day', () => {
    const board = withLorryBusy(at(2026, 6, 10, 8), at(2026, 6, 10, 17));
    const { result, delivery, lift } = placedAt(board, 0);
    expect(lift?.start).toBe(at(2026, 6, 10, 11));
    expect(delivery).toMatchObject({ start: at(2026, 6, 9, 15), end: at(2026, 6, 9, 17) });
    expect(analyseBoard(placedBoard(board, result), { now: JUNE_1 }).errorCount).toBe(0);
  });

  it.each([0, 300])(
    'comes the same morning when the lift would start the day: the lift waits for the lorry (budget %i ms)',
    (budgetMs) => {
      // The crane is out all Wednesday: the lift's earliest is then Thu 11 Jun 08:00, the start of
      // the day, with no room for the lorry's two hours before it. The lift moves to 10:00 so the
      // unit comes off the lorry that morning, instead of standing on the drive overnight.
      const board = withCraneBusy(at(2026, 6, 10, 8), at(2026, 6, 10, 17));
      const { result, delivery, lift } = placedAt(board, budgetMs);
      expect(result.unplaced).toEqual([]);
      expect(delivery).toMatchObject({ start: at(2026, 6, 11, 8), end: at(2026, 6, 11, 10) });
      expect(lift).toMatchObject({ start: at(2026, 6, 11, 10), end: at(2026, 6, 11, 14) });
      // Every booking of the lift moved with it (crane, crew, pallet trucks, rollers).
      const liftBookings = result.bookings.filter((b) => b.stageId === 'lift');
      expect(liftBookings.map((b) => b.start)).toEqual(liftBookings.map(() => at(2026, 6, 11, 10)));
      expect(liftBookings).toHaveLength(5);
      expect(analyseBoard(placedBoard(board, result), { now: JUNE_1 }).errorCount).toBe(0);
    },
  );

  it('comes on the Monday of a Monday lift, not the Friday before (the unit never stands out over a weekend)', () => {
    // The crane is out Wed 10 to Fri 12 Jun: the lift's earliest is Mon 15 Jun 08:00.
    const board = withCraneBusy(at(2026, 6, 10, 8), at(2026, 6, 12, 17));
    const { result, delivery, lift } = placedAt(board, 0);
    expect(delivery).toMatchObject({ start: at(2026, 6, 15, 8), end: at(2026, 6, 15, 10) });
    expect(lift?.start).toBe(at(2026, 6, 15, 10));
    expect(analyseBoard(placedBoard(board, result), { now: JUNE_1 }).errorCount).toBe(0);
  });

  it('comes the afternoon before when the lift cannot wait that morning (the crane is wanted elsewhere after it)', () => {
    // Crane out all Wednesday and from 12:00 on Thursday: the lift has Thu 08:00–12:00 and no later.
    const board = withCraneBusy(at(2026, 6, 10, 8), at(2026, 6, 10, 17));
    board.bookings.push({
      id: 'elsewhere-2',
      stageId: 'elsewhere-work',
      resourceId: 'crane',
      start: at(2026, 6, 11, 12),
      end: at(2026, 6, 11, 17),
      state: 'confirmed',
      installerFirmId: 'other',
    });
    const { result, delivery, lift } = placedAt(board, 0);
    expect(lift).toMatchObject({ start: at(2026, 6, 11, 8), end: at(2026, 6, 11, 12) });
    expect(delivery).toMatchObject({ start: at(2026, 6, 10, 15), end: at(2026, 6, 10, 17) });
    expect(analyseBoard(placedBoard(board, result), { now: JUNE_1 }).errorCount).toBe(0);
  });

  it('stays where the serial scheme put it when the lorry is busy every later day', () => {
    const board = withLorryBusy(at(2026, 6, 8, 11), at(2026, 6, 10, 17));
    const { result, delivery } = placedAt(board, 0);
    expect(delivery?.start).toBe(at(2026, 6, 8, 9));
    expect(result.bookings.filter((b) => b.stageId === 'delivery')).toHaveLength(1);
    expect(analyseBoard(placedBoard(board, result), { now: JUNE_1 }).errorCount).toBe(0);
  });
});
