import { spawn, type ChildProcess } from 'node:child_process';
import { mkdtempSync, rmSync } from 'node:fs';
import { createServer } from 'node:net';
import { tmpdir } from 'node:os';
import path from 'node:path';
import type { Knex } from 'knex';
import { ensureDatabase, startPostgres, type PostgresHandle } from '../../scripts/services/postgres.ts';
import { startRedis, type RedisHandle } from '../../scripts/services/redis.ts';
import { startFakeSmtpInbox, type FakeSmtpInbox } from '../../scripts/fakes/smtp-inbox.ts';
import { createKnex, migrationConfig } from '../../server/db.ts';
import { seedDemo } from '../../seeds/demo.ts';
import { createApp } from '../../server/app.ts';
import { sessionCookieOf, signIn, testConfig, type Agent, type TestContext } from '../helpers/server.ts';
import type { Config } from '../../server/config.ts';

/**
 * A whole Waterline of its own for fault tests: a private PostgreSQL and Redis in a temp folder on
 * free ports (which these tests stop and start; the shared ones are never touched), a fake SMTP
 * inbox, and the server as `npm start` runs it (`server/index.ts` with RUN_WORKER=1, so the outbox
 * relay and the mail worker run in the web process).
 */

export async function freePort(): Promise<number> {
  const server = createServer();
  await new Promise<void>((resolve) => server.listen(0, '127.0.0.1', resolve));
  const port = (server.address() as { port: number }).port;
  await new Promise<void>((resolve) => server.close(() => resolve()));
  return port;
}

/** Polls `check` every 100 ms until it returns a truthy value, or fails after `timeoutMs`. */
export async function until<T>(
  what: string,
  check: () => T | Promise<T>,
  timeoutMs: number,
  log: () => string = () => '',
): Promise<NonNullable<T>> {
  const deadline = Date.now() + timeoutMs;
  let last: unknown;
  while (Date.now() < deadline) {
    try {
      const value = await check();
      if (value) return value as NonNullable<T>;
    } catch (error) {
      last = error;
    }
    await new Promise((r) => setTimeout(r, 100));
  }
  throw new Error(
    `${what} did not happen within ${timeoutMs / 1000} s${last ? ` (last error: ${String(last)})` : ''}${log() ? `; output:\n${log().slice(-3000)}` : ''}`,
  );
}

export interface FaultStack {
  dataDir: string;
  config: Config;
  /** The test's own pool on the private database (for arranging and checking rows). */
  knex: Knex;
  inbox: FakeSmtpInbox;
  app: { port: number; url: string; output: () => string } | null;
  stopPostgres(): void;
  startPostgres(): Promise<void>;
  stopRedis(): Promise<void>;
  startRedis(): Promise<void>;
  /** Starts `server/index.ts` with RUN_WORKER=1 against this stack. */
  startServer(env?: Record<string, string>): Promise<void>;
  stopServer(): Promise<void>;
  /** Signs in through an in-process app on the same database; the session cookie works on the server too. */
  signIn(email: string): Promise<Agent>;
  close(): Promise<void>;
}

export async function startFaultStack(database: string): Promise<FaultStack> {
  const dataDir = mkdtempSync(path.join(tmpdir(), 'waterline-faults-'));
  const pgPort = await freePort();
  const redisPort = await freePort();
  let pg: PostgresHandle | null = await startPostgres(dataDir, pgPort);
  await ensureDatabase(pgPort, database);
  let redis: RedisHandle | null = await startRedis(dataDir, redisPort);
  const inbox = await startFakeSmtpInbox({ smtp: 0, web: 0 });
  const appPort = await freePort();
  const config = testConfig({
    DATABASE_URL: `postgres://postgres@127.0.0.1:${pgPort}/${database}`,
    REDIS_URL: `redis://127.0.0.1:${redisPort}/0`,
    SMTP_URL: inbox.smtpUrl,
    PUBLIC_URL: `http://127.0.0.1:${appPort}`,
    PORT: String(appPort),
  });
  const knex = createKnex(config.DATABASE_URL, { min: 0, max: 4 });
  await knex.migrate.latest(migrationConfig);
  await seedDemo(knex);

  let child: ChildProcess | null = null;
  let output = '';
  let signer: TestContext | null = null;

  const stack: FaultStack = {
    dataDir,
    config,
    knex,
    inbox,
    app: null,
    stopPostgres() {
      pg?.stop();
      pg = null;
    },
    async startPostgres() {
      pg = await startPostgres(dataDir, pgPort);
    },
    async stopRedis() {
      await redis?.stop();
      redis = null;
    },
    async startRedis() {
      redis = await startRedis(dataDir, redisPort);
    },
    async startServer(env = {}) {
      output = '';
      child = spawn(process.execPath, ['--import', 'tsx', 'server/index.ts'], {
        cwd: path.resolve('.'),
        env: {
          ...process.env,
          NODE_ENV: 'test',
          LOG_LEVEL: 'warn',
          RUN_WORKER: '1',
          DATABASE_URL: config.DATABASE_URL,
          REDIS_URL: config.REDIS_URL,
          SMTP_URL: config.SMTP_URL,
          PUBLIC_URL: config.PUBLIC_URL,
          PORT: String(appPort),
          HOST: '127.0.0.1',
          RATE_LIMIT_PREFIX: config.RATE_LIMIT_PREFIX,
          ...env,
        },
        stdio: ['ignore', 'pipe', 'pipe'],
      });
      child.stdout!.on('data', (c: Buffer) => {
        output += c.toString();
      });
      child.stderr!.on('data', (c: Buffer) => {
        output += c.toString();
      });
      stack.app = { port: appPort, url: config.PUBLIC_URL, output: () => output };
      await until(
        'the server to listen',
        () => output.includes('is listening'),
        150_000,
        () => output,
      );
    },
    async stopServer() {
      const running = child;
      child = null;
      if (!running || running.exitCode !== null) return;
      const exited = new Promise((r) => running.once('exit', r));
      running.kill('SIGTERM');
      await exited;
    },
    async signIn(email) {
      signer ??= (() => {
        const waterline = createApp({ config, knex });
        return { config, knex, waterline, close: () => waterline.close() };
      })();
      return signIn(signer, email);
    },
    async close() {
      await stack.stopServer();
      await signer?.close();
      await knex.destroy();
      await inbox.stop();
      await stack.stopRedis();
      stack.stopPostgres();
      rmSync(dataDir, { recursive: true, force: true });
    },
  };
  return stack;
}

/** A fetch to the spawned server as a signed-in agent (cookie and CSRF token), bounded in time. */
export async function call(
  stack: FaultStack,
  agent: Agent,
  method: string,
  url: string,
  body?: unknown,
  timeoutMs = 15_000,
): Promise<{ status: number; type: string; body: Record<string, unknown>; ms: number }> {
  const started = performance.now();
  const res = await fetch(`${stack.app!.url}${url}`, {
    method,
    headers: {
      cookie: sessionCookieOf(agent),
      'x-csrf-token': agent.csrf,
      ...(body ? { 'content-type': 'application/json' } : {}),
    },
    body: body ? JSON.stringify(body) : undefined,
    signal: AbortSignal.timeout(timeoutMs),
  }).catch((error: unknown) => {
    throw new Error(
      `${method} ${url} got no answer (${String(error)}); the server's output:\n${stack.app!.output().slice(-3000)}`,
    );
  });
  const text = await res.text();
  let parsed: Record<string, unknown> = {};
  try {
    parsed = text ? (JSON.parse(text) as Record<string, unknown>) : {};
  } catch {
    parsed = { text };
  }
  return {
    status: res.status,
    type: res.headers.get('content-type') ?? '',
    body: parsed,
    ms: performance.now() - started,
  };
}
