import { afterAll, afterEach, beforeAll, describe, expect, it, vi } from 'vitest';
import type { AddressInfo } from 'node:net';
import type { Server } from 'node:http';
import {
  openBoardStream,
  account,
  idOf,
  signIn,
  startTestApp,
  TEST_TODAY,
  type Agent,
  type TestContext,
} from '../helpers/server.ts';
import { makeJob } from '../helpers/flows.ts';
import { createApp } from '../../server/app.ts';
import { KEEP_ALIVE_MS, LISTENER_APPLICATION_NAME } from '../../server/services/board-stream.ts';

/**
 * The board stream's own life (server/services/board-stream.ts): a lost LISTEN connection comes
 * back and the open boards catch up, one keep-alive interval per stream service however often it
 * reconnects, close() ends everything, and signing out ends the session's streams at once.
 */

let ctx: TestContext;
let scheduler: Agent;
let server: Server;
let port = 0;

async function listen(app: ReturnType<typeof createApp>['app']): Promise<{ server: Server; port: number }> {
  const s = app.listen(0, '127.0.0.1');
  await new Promise((r) => s.once('listening', r));
  return { server: s, port: (s.address() as AddressInfo).port };
}

beforeAll(async () => {
  ctx = await startTestApp();
  scheduler = await signIn(ctx, account('scheduler').email);
  ({ server, port } = await listen(ctx.waterline.app));
});

afterAll(async () => {
  await ctx.close();
  await new Promise((r) => server.close(r));
});

afterEach(() => {
  vi.restoreAllMocks();
});

/** The live stream of one signed-in agent on the server at `at` (this file's by default). */
const openStream = (agent: Agent, at = port) => openBoardStream(agent, at);

/** Polls `check` until it holds (each try a few milliseconds apart), up to `ms`. */
async function eventually<T>(check: () => Promise<T | undefined | false>, ms = 15_000): Promise<T> {
  const until = Date.now() + ms;
  for (;;) {
    const found = await check();
    if (found) return found;
    if (Date.now() > until) throw new Error('condition not met in time');
    await new Promise((r) => setTimeout(r, 25));
  }
}

/** The backends of this database's board-stream listeners that have run their LISTEN. */
async function listenerPids(): Promise<number[]> {
  const { rows } = (await ctx.knex.raw(
    `SELECT pid FROM pg_stat_activity WHERE datname = current_database()
    AND application_name = ? AND query LIKE 'LISTEN%'`,
    [LISTENER_APPLICATION_NAME],
  )) as { rows: { pid: number }[] };
  return rows.map((r) => r.pid).sort();
}

/** Terminates every listener backend from another connection, then waits until as many new ones LISTEN. */
async function killListeners(): Promise<void> {
  const before = await listenerPids();
  expect(before.length).toBeGreaterThan(0);
  await ctx.knex.raw('SELECT pg_terminate_backend(pid) FROM unnest(?::int[]) AS pid', [before]);
  await eventually(async () => {
    const now = await listenerPids();
    return now.length === before.length && now.every((p) => !before.includes(p));
  });
}

let jobs = 0;
/** Books a one-hour stage of a fresh job of the test's own on Crew Otter; the booking's id. */
async function bookSomething(day: string): Promise<string> {
  jobs += 1;
  const job = await makeJob(ctx.knex, {
    reference: `FX-BS-${jobs}`,
    stages: [{ kind: 'handover', name: 'Handover', minutes: 60, needs: { install_crew: 1 } }],
    links: [],
  });
  const res = await scheduler
    .post('/api/bookings')
    .set('X-CSRF-Token', scheduler.csrf)
    .send({
      stageId: job.stage.handover,
      resourceId: await idOf(ctx.knex, 'resources', { name: 'Crew Otter' }),
      startsAt: `${day}T09:00:00Z`,
    });
  expect(res.status, JSON.stringify(res.body)).toBe(201);
  return String(res.body.bookings[0].id);
}

describe('the board stream', () => {
  it('reconnects a lost listener, tells the open boards to reload, and delivers changes made afterwards', async () => {
    const board = await openStream(scheduler);
    try {
      await killListeners();
      await killListeners(); // twice: the second reconnect works as well as the first
      await board.until((t) => t.includes('event: resync'));
      const id = await bookSomething('2026-11-09');
      const text = await board.until((t) => t.includes(`"bookingId":"${id}"`));
      expect(text).toMatch(/event: resync\ndata: \{\}\n\n/);
      expect(text).toContain(`event: bookings\ndata: {"bookingId":"${id}"}\n\n`);
    } finally {
      board.close();
    }
  });

  it('keeps one keep-alive interval through reconnects; close() clears it and ends the open streams and the listener', async () => {
    const setSpy = vi.spyOn(globalThis, 'setInterval');
    const clearSpy = vi.spyOn(globalThis, 'clearInterval');
    const keepAlives = () => setSpy.mock.calls.filter((c) => c[1] === KEEP_ALIVE_MS).length;
    const other = createApp({ config: ctx.config, knex: ctx.knex, now: () => TEST_TODAY.getTime() });
    const b = await listen(other.app);
    let closed = false;
    try {
      const first = await openStream(scheduler, b.port);
      expect(keepAlives()).toBe(1);
      const handle = setSpy.mock.results[setSpy.mock.calls.findIndex((c) => c[1] === KEEP_ALIVE_MS)]!.value as unknown;
      for (let i = 0; i < 3; i++) await killListeners();
      const second = await openStream(scheduler, b.port);
      expect(keepAlives()).toBe(1);
      const listenersBefore = (await listenerPids()).length;

      await other.close();
      closed = true;
      expect(await first.ended()).toBe(true);
      expect(await second.ended()).toBe(true);
      expect(clearSpy).toHaveBeenCalledWith(handle);
      // Its LISTEN connection is gone, and no reconnection brings it back.
      await eventually(async () => (await listenerPids()).length === listenersBefore - 1);
    } finally {
      if (!closed) await other.close();
      await new Promise((r) => b.server.close(r));
    }
  });

  it('ends a stream as soon as its session signs out, without waiting for a change', async () => {
    const viewer = await signIn(ctx, account('viewer').email);
    const stays = await openStream(scheduler);
    const leaves = await openStream(viewer);
    try {
      await viewer.post('/auth/sign-out').set('X-CSRF-Token', viewer.csrf).expect(204);
      expect(await leaves.ended()).toBe(true);
      expect(leaves.text()).not.toContain('event: bookings');
      // The other session's stream goes on hearing changes.
      const id = await bookSomething('2026-11-10');
      await stays.until((t) => t.includes(`"bookingId":"${id}"`));
    } finally {
      stays.close();
      leaves.close();
    }
  });

  it('ends a person’s streams as soon as the owner takes them out of the firm', async () => {
    const owner = await signIn(ctx, account('owner').email);
    const viewer = await signIn(ctx, account('viewer').email);
    const stays = await openStream(owner);
    const leaves = await openStream(viewer);
    try {
      const vic = await idOf(ctx.knex, 'users', { email: account('viewer').email });
      await owner
        .delete(`/api/firm/members/${vic}`)
        .query({ role: 'viewer' })
        .set('X-CSRF-Token', owner.csrf)
        .expect(204);
      expect(await leaves.ended()).toBe(true);
      const id = await bookSomething('2026-11-11');
      await stays.until((t) => t.includes(`"bookingId":"${id}"`));
      expect(leaves.text()).not.toContain(id);
    } finally {
      stays.close();
      leaves.close();
    }
  });

  it('a stream opened before its person left the firm hears nothing more, however the membership went', async () => {
    const manager = await signIn(ctx, account('manager').email);
    const stream = await openStream(manager);
    try {
      const maya = await idOf(ctx.knex, 'users', { email: account('manager').email });
      await ctx.knex('memberships').where('user_id', maya).delete();
      const id = await bookSomething('2026-11-12');
      expect(await stream.ended()).toBe(true);
      expect(stream.text()).not.toContain(id);
    } finally {
      stream.close();
    }
  });
});
