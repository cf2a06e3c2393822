import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { account, openBoardStream, type Agent } from '../helpers/server.ts';
import { unbookJobs } from '../helpers/demo.ts';
import { pencilIn } from '../helpers/mail.ts';
import { call, startFaultStack, until, type FaultStack } from './fault-stack.ts';

/**
 * PostgreSQL goes away under a running server (`server/index.ts` as `npm start` runs it) and comes
 * back: requests meanwhile answer 503 problem+json promptly, readiness says the database is down,
 * and afterwards the same process serves again, with the sessions from before and a live stream
 * that reconnects its LISTEN and tells the boards to reload.
 */

let stack: FaultStack;
let scheduler: Agent;

beforeAll(async () => {
  stack = await startFaultStack(
    `waterline_test_${process.env.WATERLINE_TEST_DB?.replace(/^waterline_test_/, '') ?? 'faults'}_db`,
  );
  await stack.startServer();
  scheduler = await stack.signIn(account('scheduler').email);
}, 300_000);
afterAll(async () => {
  await stack?.close();
}, 60_000);

describe('PostgreSQL restarted under a running server', () => {
  it('answers 503 database-unavailable while it is away, and serves the same sessions and streams once it is back', async () => {
    const jobs = await call(stack, scheduler, 'GET', '/api/jobs');
    expect(jobs.status).toBe(200);
    const board = await openBoardStream(scheduler, stack.app!.port);
    await unbookJobs(stack.knex, 'TW-2417', 'TW-2420');
    const lift = await pencilIn(stack.knex, {
      job: 'TW-2417',
      stage: 'lift',
      resource: '60 t mobile crane',
      startsAt: '2027-03-10T08:00:00Z',
      endsAt: '2027-03-10T12:00:00Z',
    });

    stack.stopPostgres();

    // Reads, writes and readiness, each while the database is down.
    for (const [method, url, body] of [
      ['GET', '/api/jobs', undefined],
      ['GET', '/api/board?from=2027-03-08T00:00:00Z&to=2027-03-15T00:00:00Z', undefined],
      ['POST', `/api/bookings/${lift.id}/publish`, { version: lift.version }],
    ] as const) {
      const res = await call(stack, scheduler, method, url, body);
      expect({ url, status: res.status, type: res.type, code: res.body.type }).toEqual({
        url,
        status: 503,
        type: expect.stringContaining('application/problem+json'),
        code: `${stack.config.PUBLIC_URL}/problems/database-unavailable`,
      });
      expect(res.body.detail).toMatch(/try again/i);
      expect(
        JSON.stringify({ title: res.body.title, detail: res.body.detail, keys: Object.keys(res.body) }),
      ).not.toMatch(/ECONNREFUSED|127\.0\.0\.1|postgres|SQL|stack/i);
      // Prompt: a refused connection is no reason to keep the person waiting (the bound is the pool's acquire timeout).
      expect(res.ms).toBeLessThan(6000);
    }
    const ready = await fetch(`${stack.app!.url}/api/health/ready`);
    expect(ready.status).toBe(503);
    expect(await ready.json()).toMatchObject({ status: 'down', ready: false, database: { status: 'down' } });

    await stack.startPostgres();

    // The same process, the same session: the first requests may meet a connection the restart cut.
    await until(
      'the jobs list to answer again',
      async () => (await call(stack, scheduler, 'GET', '/api/jobs')).status === 200,
      20_000,
      stack.app!.output,
    );
    const published = await call(stack, scheduler, 'POST', `/api/bookings/${lift.id}/publish`, {
      version: lift.version,
    });
    expect(published.status).toBe(200);
    expect(published.body).toMatchObject({ id: lift.id, state: 'sent' });
    expect((await fetch(`${stack.app!.url}/api/health/ready`)).status).toBe(200);

    // The stream stayed open; its LISTEN came back and told the board to reload. A board reloaded
    // then shows what changed while nobody listened, and the stream hears the next change.
    await board.until((t) => t.includes('event: resync'));
    const reloaded = await call(
      stack,
      scheduler,
      'GET',
      '/api/board?from=2027-03-08T00:00:00Z&to=2027-03-15T00:00:00Z',
    );
    expect((reloaded.body.bookings as { id: string; state: string }[]).find((b) => b.id === lift.id)?.state).toBe(
      'sent',
    );
    const before = board.text().length;
    const next = await pencilIn(stack.knex, {
      job: 'TW-2420',
      stage: 'lift',
      resource: '60 t mobile crane',
      startsAt: '2027-03-12T08:00:00Z',
      endsAt: '2027-03-12T12:00:00Z',
    });
    expect(
      (await call(stack, scheduler, 'POST', `/api/bookings/${next.id}/publish`, { version: next.version })).status,
    ).toBe(200);
    const heard = await board.until((t) => t.slice(before).includes(`"bookingId":"${next.id}"`));
    expect(heard.slice(before)).toContain(`"bookingId":"${next.id}"`);
    board.close();
  }, 120_000);
});
