import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import {
  computeCriticalPath,
  createBoardIndex,
  jobCriticalPath,
  SchedulerError,
  topologicalOrder,
  weeklyHours,
  type Board,
  type NetworkLink,
} from '../../../shared/scheduler/index.js';
import { at, dep, LONDON, stage } from './scenario.js';

describe('Reliable Construction Co. project, Hillier & Lieberman, Introduction to Operations Research (PERT/CPM chapter)', () => {
  // Source: F. S. Hillier and G. J. Lieberman, Introduction to Operations Research, the Reliable
  // Construction Co. example (activity list and the table of earliest/latest times and slack).
  // Durations (weeks) checked against a stored copy of the activity list; H = 9 weeks and the
  // immediate predecessors are from memory. Project duration 44 weeks.
  const acts = [
    ['A', 2, []],
    ['B', 4, ['A']],
    ['C', 10, ['B']],
    ['D', 6, ['C']],
    ['E', 4, ['C']],
    ['F', 5, ['E']],
    ['G', 7, ['D']],
    ['H', 9, ['E', 'G']],
    ['I', 7, ['C']],
    ['J', 8, ['F', 'I']],
    ['K', 4, ['J']],
    ['L', 5, ['J']],
    ['M', 2, ['H']],
    ['N', 6, ['K', 'L']],
  ] as const;
  const activities = acts.map(([id, duration]) => ({ id, duration }));
  const links: NetworkLink[] = acts.flatMap(([id, , preds]) => preds.map((p) => ({ from: p, to: id })));
  const result = computeCriticalPath(activities, links);
  // [ES, EF, LS, LF] per activity (from memory of the book's table; consistent by hand).
  const expected: Record<string, [number, number, number, number]> = {
    A: [0, 2, 0, 2],
    B: [2, 6, 2, 6],
    C: [6, 16, 6, 16],
    D: [16, 22, 20, 26],
    E: [16, 20, 16, 20],
    F: [20, 25, 20, 25],
    G: [22, 29, 26, 33],
    H: [29, 38, 33, 42],
    I: [16, 23, 18, 25],
    J: [25, 33, 25, 33],
    K: [33, 37, 34, 38],
    L: [33, 38, 33, 38],
    M: [38, 40, 42, 44],
    N: [38, 44, 38, 44],
  };

  it('finishes in 44 weeks', () => expect(result.finish).toBe(44));

  for (const [id, [es, ef, ls, lf]] of Object.entries(expected)) {
    it(`activity ${id}: ES ${es}, EF ${ef}, LS ${ls}, LF ${lf}, slack ${ls - es}`, () => {
      const t = result.activities.find((a) => a.id === id);
      expect([t?.es, t?.ef, t?.ls, t?.lf]).toEqual([es, ef, ls, lf]);
      expect(t?.totalFloat).toBe(ls - es);
    });
  }

  it('the critical path is A → B → C → E → F → J → L → N', () => {
    expect(result.criticalPath).toEqual(['A', 'B', 'C', 'E', 'F', 'J', 'L', 'N']);
  });

  it('free float: I can slip 2 weeks without delaying J; D can slip 0 weeks without delaying G', () => {
    expect(result.activities.find((a) => a.id === 'I')?.freeFloat).toBe(2);
    expect(result.activities.find((a) => a.id === 'D')?.freeFloat).toBe(0);
    expect(result.activities.find((a) => a.id === 'M')?.freeFloat).toBe(4);
  });

  it("the board's own critical path gives the same table (one week = one hour on a round-the-clock calendar)", () => {
    const always = { id: 'always', timeZone: 'UTC', weekly: weeklyHours([0, 1, 2, 3, 4, 5, 6], [[0, 1440]]) };
    const board: Board = {
      calendars: [always],
      resources: [],
      jobs: [{ id: 'job-1', firmId: 'f' }],
      stages: acts.map(([id, weeks]) => stage(id, 'survey', weeks * 60, [])),
      dependencies: acts.flatMap(([id, , preds]) => preds.map((p) => dep(p, id))),
      bookings: [],
      hirePeriods: [],
      leadTimeRules: [],
    };
    const now = Date.UTC(2026, 0, 5);
    const cp = jobCriticalPath(createBoardIndex(board, { now }), 'job-1');
    const hours = (t: number) => (t - now) / 3_600_000;
    expect(hours(cp.finish)).toBe(44);
    for (const [id, [es, ef, ls, lf]] of Object.entries(expected)) {
      const t = cp.stages.find((x) => x.stageId === id);
      expect([hours(t!.es), hours(t!.ef), hours(t!.ls), hours(t!.lf)], id).toEqual([es, ef, ls, lf]);
    }
    expect(cp.criticalStageIds).toEqual(['A', 'B', 'C', 'E', 'F', 'J', 'L', 'N']);
  });

  it('a 40-week deadline gives the critical path −4 weeks of float', () => {
    const late = computeCriticalPath(activities, links, { deadline: 40 });
    expect(late.activities.find((a) => a.id === 'A')?.totalFloat).toBe(-4);
  });
});

describe('start-to-start, finish-to-finish, start-to-finish and negative lags (worked by hand)', () => {
  // X 5; Y SS+2 after X (Y 3): ES 2; Z FF+1 after Y (Z 6): EF ≥ 5+1 = 6 → ES 0;
  // W SF−1 after X (W 2): EF ≥ 0 − 1 → ES 0 (project start bounds it); V FS−2 after X (V 4): ES 3.
  const r = computeCriticalPath(
    [
      { id: 'X', duration: 5 },
      { id: 'Y', duration: 3 },
      { id: 'Z', duration: 6 },
      { id: 'W', duration: 2 },
      { id: 'V', duration: 4 },
    ],
    [
      { from: 'X', to: 'Y', type: 'SS', lag: 2 },
      { from: 'Y', to: 'Z', type: 'FF', lag: 1 },
      { from: 'X', to: 'W', type: 'SF', lag: -1 },
      { from: 'X', to: 'V', lag: -2 },
    ],
  );
  const t = (id: string) => r.activities.find((a) => a.id === id);
  it('forward pass', () => {
    expect([t('Y')?.es, t('Z')?.es, t('W')?.es, t('V')?.es]).toEqual([2, 0, 0, 3]);
    expect(r.finish).toBe(7);
  });
  it('backward pass: V finishes last and is critical with X', () => {
    expect(t('V')?.lf).toBe(7);
    expect(t('X')?.totalFloat).toBe(0);
    expect(t('Z')?.lf).toBe(7);
    expect(t('Y')?.lf).toBe(6);
  });
});

describe('a circle of dependencies', () => {
  it('is refused, naming the stages in the circle', () => {
    const deps = [dep('pour', 'lift'), dep('lift', 'fill'), dep('fill', 'pour'), dep('fill', 'handover')];
    let err: unknown;
    try {
      topologicalOrder(['pour', 'lift', 'fill', 'handover'], deps);
    } catch (e) {
      err = e;
    }
    expect(err).toBeInstanceOf(SchedulerError);
    expect((err as SchedulerError).code).toBe('cycle');
    expect((err as SchedulerError).details?.cycles).toEqual([['fill', 'lift', 'pour']]);
  });
});

describe('critical path of a booked and unbooked job on working calendars', () => {
  const cal = { id: 'cal', timeZone: LONDON, weekly: weeklyHours([1, 2, 3, 4, 5], [[480, 1020]]) };
  const board: Board = {
    calendars: [cal],
    resources: [{ id: 'crew', firmId: 'f', category: 'crew', kind: 'install_crew', calendarId: 'cal' }],
    jobs: [{ id: 'job-1', firmId: 'f', promisedBy: at(2026, 6, 3, 17) }],
    stages: [
      stage('a', 'delivery', 540, [['install_crew', 1]]),
      stage('b', 'fill', 540, [['install_crew', 1]]),
      stage('c', 'commission', 540, [['install_crew', 1]]),
    ],
    dependencies: [dep('a', 'b'), dep('b', 'c')],
    bookings: [
      {
        id: 'ba',
        stageId: 'a',
        resourceId: 'crew',
        start: at(2026, 6, 1, 8),
        end: at(2026, 6, 1, 17),
        state: 'confirmed',
        installerFirmId: 'f',
      },
    ],
    hirePeriods: [],
    leadTimeRules: [],
  };
  it('unbooked stages follow the booked one; on time, float is zero', () => {
    const cp = jobCriticalPath(createBoardIndex(board, { now: at(2026, 5, 1) }), 'job-1');
    expect(cp.stages.map((s) => [s.stageId, s.es, s.ef])).toEqual([
      ['a', at(2026, 6, 1, 8), at(2026, 6, 1, 17)],
      ['b', at(2026, 6, 2, 8), at(2026, 6, 2, 17)],
      ['c', at(2026, 6, 3, 8), at(2026, 6, 3, 17)],
    ]);
    expect(cp.floatMinutes).toBe(0);
    expect(cp.lateByMs).toBe(0);
    expect(cp.criticalStageIds).toEqual(['a', 'b', 'c']);
  });
  it('promised a day earlier: float −540 working minutes, late by 24 hours', () => {
    const early = { ...board, jobs: [{ id: 'job-1', firmId: 'f', promisedBy: at(2026, 6, 2, 17) }] };
    const cp = jobCriticalPath(createBoardIndex(early, { now: at(2026, 5, 1) }), 'job-1');
    expect(cp.floatMinutes).toBe(-540);
    expect(cp.lateByMs).toBe(24 * 3_600_000);
  });
});

describe('property: the critical path length equals the job span', () => {
  const network = fc.integer({ min: 1, max: 25 }).chain((n) =>
    fc.record({
      durations: fc.array(fc.integer({ min: 0, max: 50 }), { minLength: n, maxLength: n }),
      edges: fc.array(fc.tuple(fc.integer({ min: 0, max: n - 1 }), fc.integer({ min: 0, max: n - 1 })), {
        maxLength: 3 * n,
      }),
    }),
  );
  it('summing durations along the critical chain gives finish − start (FS links)', () => {
    fc.assert(
      fc.property(network, ({ durations, edges }) => {
        const activities = durations.map((duration, i) => ({ id: `s${String(i).padStart(2, '0')}`, duration }));
        const links = edges
          .filter(([a, b]) => a < b)
          .map(([a, b]) => ({ from: `s${String(a).padStart(2, '0')}`, to: `s${String(b).padStart(2, '0')}` }));
        const r = computeCriticalPath(activities, links);
        const byId = new Map(r.activities.map((a) => [a.id, a]));
        let cur = r.activities.find((a) => a.critical && a.ef === r.finish);
        let length = 0;
        while (cur !== undefined) {
          length += cur.ef - cur.es;
          const c: typeof cur = cur;
          cur = links
            .filter((l) => l.to === c.id)
            .map((l) => byId.get(l.from))
            .find((p) => p !== undefined && p.critical && p.ef === c.es);
        }
        expect(length).toBe(r.finish - r.start);
        for (const a of r.activities) expect(a.totalFloat).toBeGreaterThanOrEqual(0);
      }),
      { numRuns: 200 },
    );
  });

  it('on a round-the-clock calendar the board critical path matches the abstract one (hours → ms)', () => {
    fc.assert(
      fc.property(network, ({ durations, edges }) => {
        const always = { id: 'always', timeZone: 'UTC', weekly: weeklyHours([0, 1, 2, 3, 4, 5, 6], [[0, 1440]]) };
        const ids = durations.map((_, i) => `s${String(i).padStart(2, '0')}`);
        const pairs = edges.filter(([a, b]) => a < b);
        const board: Board = {
          calendars: [always],
          resources: [],
          jobs: [{ id: 'job-1', firmId: 'f' }],
          stages: ids.map((id, i) => stage(id, 'survey', (durations[i] as number) * 60, [])),
          dependencies: pairs.map(([a, b]) => dep(ids[a] as string, ids[b] as string)),
          bookings: [],
          hirePeriods: [],
          leadTimeRules: [],
        };
        const now = Date.UTC(2026, 0, 5);
        const cp = jobCriticalPath(createBoardIndex(board, { now }), 'job-1');
        const abstract = computeCriticalPath(
          ids.map((id, i) => ({ id, duration: durations[i] as number })),
          pairs.map(([a, b]) => ({ from: ids[a] as string, to: ids[b] as string })),
        );
        expect((cp.finish - cp.start) / 3_600_000).toBe(abstract.finish);
        expect([...cp.criticalStageIds].sort()).toEqual(
          abstract.activities
            .filter((a) => a.critical)
            .map((a) => a.id)
            .sort(),
        );
      }),
      { numRuns: 100 },
    );
  });
});
