import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { loadBoard } from '../../server/services/board.ts';
import { toEngineBoard } from '../../shared/board-data.ts';
import { analyseBoard, type Board } from '../../shared/scheduler/index.ts';
import { replan } from '../../bench/replan.ts';
import { account, idOf, startTestApp, TEST_TODAY, type TestContext } from '../helpers/server.ts';

/*
 * The demo board (seeds/demo.ts as of the tests' today) re-planned at once, as `npm run bench:plan`
 * does: every stage nobody has been asked about yet is placed again by the planner (its budget is
 * counted in work, so the plan is the same on any machine).
 */
let ctx: TestContext;
let board: Board;
const DAY = 86_400_000;
const now = TEST_TODAY.getTime();

beforeAll(async () => {
  ctx = await startTestApp();
  const actor = {
    userId: await idOf(ctx.knex, 'users', { email: account('scheduler').email }),
    firmId: await idOf(ctx.knex, 'firms', { name: 'Tideway Hot Tubs' }),
    firmKind: 'installer' as const,
    role: 'scheduler' as const,
  };
  board = toEngineBoard(await loadBoard(ctx.knex, actor, { from: now - 60 * DAY, to: now + 240 * DAY, now }));
});
afterAll(async () => {
  await ctx.close();
});

describe('re-planning the whole board', () => {
  it('keeps every job finishing no later than it does now, and finishes some earlier', () => {
    const r = replan(board, now, 2000, { keep: true });
    expect(r.jobIds.length).toBeGreaterThan(10);
    expect(r.result.unplaced).toEqual([]);
    expect(r.later).toEqual([]);
    expect(r.earlier.length).toBeGreaterThan(0);
    // The plan keeps the rules: no more engine errors than today's plan has (its one deliberate hire clash).
    const errors = (b: Board) =>
      analyseBoard(b, { now, skipCriticalPath: true }).violations.filter((v) => v.severity === 'error').length;
    expect(errors(r.after)).toBeLessThanOrEqual(errors(board));
  });

  it('would make a job later without the finishes to keep (what notLaterThan is for)', () => {
    expect(replan(board, now, 2000, { keep: false }).later.length).toBeGreaterThan(0);
  });
});
