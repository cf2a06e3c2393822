import { randomUUID } from 'node:crypto';
import request from 'supertest';
import type { Knex } from 'knex';
import { loadConfig, type Config } from '../../server/config.ts';
import { createKnex, migrationConfig } from '../../server/db.ts';
import { createApp, type WaterlineApp } from '../../server/app.ts';
import { lockResources } from '../../server/services/booking-writes.ts';
import { emptySeededTables, seedDemo } from '../../seeds/demo.ts';
import { DEMO_ACCOUNTS, type DemoAccount } from '../../seeds/demo-accounts.ts';
import type { Role } from '../../shared/permissions.ts';

/** The fixed "today" of the test scenario, so its dates are the same on every run. */
export const TEST_TODAY = new Date('2026-06-01T07:00:00Z');

export interface TestContext {
  config: Config;
  knex: Knex;
  waterline: WaterlineApp;
  close(): Promise<void>;
}

export function testConfig(overrides: Partial<Record<string, string>> = {}): Config {
  if (!process.env.DATABASE_URL || !process.env.FAKE_OAUTH_URL) {
    throw new Error('Server tests need PostgreSQL, Redis and the fake sign-in provider: run them with `npm test`.');
  }
  // Generous rate limits, and Redis keys of their own, so one test's requests never use up another's budget.
  const limits = {
    SIGN_IN_RATE_LIMIT: '10000',
    ANSWER_LINK_RATE_LIMIT: '10000',
    INVITE_LINK_RATE_LIMIT: '10000',
    FEED_RATE_LIMIT: '10000',
    RATE_LIMIT_PREFIX: `waterline-test:${randomUUID()}`,
  };
  return loadConfig({ ...process.env, LOG_LEVEL: process.env.TEST_LOG_LEVEL ?? 'silent', ...limits, ...overrides });
}

/** A migrated database holding exactly the demo scenario, and an app over it. */
export async function startTestApp(overrides: Partial<Record<string, string>> = {}): Promise<TestContext> {
  const config = testConfig(overrides);
  const knex = createKnex(config.DATABASE_URL);
  await knex.migrate.latest(migrationConfig);
  await emptySeededTables(knex);
  await seedDemo(knex, { today: TEST_TODAY });
  const waterline = createApp({ config, knex, now: () => TEST_TODAY.getTime() });
  return {
    config,
    knex,
    waterline,
    async close() {
      await waterline.close();
      await knex.destroy();
    },
  };
}

export type Agent = ReturnType<typeof request.agent> & { csrf: string };

/**
 * Signs in through the real redirect flow: the app sends the browser to the provider, the provider
 * sends it back with a code, the app exchanges the code and fetches the profile. `ctx.waterline.app`
 * may also be the address of a running server (http://127.0.0.1:<port>).
 */
export async function signIn(ctx: { waterline: { app: WaterlineApp['app'] | string } }, email: string): Promise<Agent> {
  const agent = request.agent(ctx.waterline.app) as Agent;
  const start = await agent.get('/auth/google?next=/jobs').expect(302);
  const pick = new URL(start.headers.location as string);
  const authorize = new URL('/authorize', pick.origin);
  pick.searchParams.forEach((v, k) => authorize.searchParams.set(k, v));
  authorize.searchParams.set('login_hint', email);
  // Bounded, so a provider that never answers fails here by name rather than as the test's timeout.
  const provider = await fetch(authorize, { redirect: 'manual', signal: AbortSignal.timeout(10_000) });
  const callback = new URL(provider.headers.get('location') ?? '');
  const done = await agent.get(callback.pathname + callback.search);
  if (done.status !== 302 || done.headers.location !== '/jobs') {
    throw Object.assign(new Error(`sign-in as ${email} ended at ${done.status} ${done.headers.location}`), {
      location: done.headers.location,
    });
  }
  const session = await agent.get('/api/session').expect(200);
  agent.csrf = session.body.csrfToken;
  return agent;
}

export function account(role: Role, firm = 'Tideway Hot Tubs'): DemoAccount {
  const found = DEMO_ACCOUNTS.find((a) => a.role === role && a.firm === firm);
  if (!found) throw new Error(`no demo ${role} at ${firm}`);
  return found;
}

/**
 * Waits (polling, 10 s at most) until `count` statements of this database are waiting on a lock:
 * requests a test has sent are under way and held, before it lets them go.
 */
export async function untilWaitingOnLocks(knex: Knex, count: number): Promise<void> {
  const waiting = async () =>
    Number(
      (
        await knex.raw(
          `SELECT count(*) AS n FROM pg_stat_activity WHERE datname = current_database() AND wait_event_type = 'Lock'`,
        )
      ).rows[0].n,
    );
  for (const started = Date.now(); (await waiting()) < count && Date.now() - started < 10_000;)
    await new Promise((r) => setTimeout(r, 20));
}

/**
 * Sends a request while the write path's locks on `resourceIds` are held, as by a booking of them
 * under way, and says whether it waited for them (polled, 10 s at most), with its response once
 * they are let go.
 */
export async function sentWhileResourcesHeld<R>(
  knex: Knex,
  resourceIds: string[],
  send: () => PromiseLike<R>,
): Promise<{ waited: boolean; response: R }> {
  const holder = await knex.transaction();
  let answered = false;
  let sent: Promise<R> | undefined;
  let waited = false;
  try {
    await lockResources(holder, resourceIds);
    sent = Promise.resolve(send()).then((r) => ((answered = true), r));
    await untilWaitingOnLocks(knex, 1);
    waited = !answered;
  } finally {
    await holder.commit();
  }
  return { waited, response: await sent };
}

/** Ids from the demo scenario by name. */
export async function idOf(knex: Knex, table: string, where: Record<string, unknown>): Promise<string> {
  const row = await knex(table).where(where).first('id');
  if (!row) throw new Error(`no ${table} row matching ${JSON.stringify(where)}`);
  return String(row.id);
}

/** The session cookie of a signed-in agent, to send with plain fetch (e.g. for the live stream). */
export function sessionCookieOf(agent: Agent): string {
  return (agent as unknown as { jar: { getCookie: (n: string, o: object) => { toValueString(): string } } }).jar
    .getCookie('waterline.sid', { domain: '127.0.0.1', path: '/', secure: false, script: false })
    .toValueString();
}

/** An open live board stream, read as text as it arrives. */
export interface StreamReader {
  text: () => string;
  /** Reads until the text so far satisfies `pred` (or the stream ends); returns the text. */
  until: (pred: (t: string) => boolean) => Promise<string>;
  /** Resolves once the server has ended the stream. */
  ended: () => Promise<boolean>;
  close: () => void;
}

/** Opens GET /api/board/stream as a signed-in agent on a listening server at 127.0.0.1:`port`. */
export async function openBoardStream(agent: Agent, port: number): Promise<StreamReader> {
  const controller = new AbortController();
  const res = await fetch(`http://127.0.0.1:${port}/api/board/stream`, {
    headers: { cookie: sessionCookieOf(agent) },
    signal: controller.signal,
  });
  if (res.status !== 200) throw new Error(`the stream answered ${res.status}`);
  const reader = res.body!.getReader();
  let text = '';
  let done = false;
  let pending: Promise<void> | null = null;
  const pump = () =>
    (pending ??= reader.read().then((r) => {
      pending = null;
      if (r.done) done = true;
      else text += new TextDecoder().decode(r.value);
    }));
  await pump(); // the retry line: the stream is open
  return {
    text: () => text,
    async until(pred) {
      while (!pred(text) && !done) await pump();
      return text;
    },
    async ended() {
      while (!done) await pump();
      return true;
    },
    close: () => controller.abort(),
  };
}
