/**
 * `npm start` and `npm test` in one place: start what the product needs on 127.0.0.1 (PostgreSQL,
 * Redis, the fake sign-in provider), prepare the database, run the product or the checks, and
 * stop everything this run started when it ends (Ctrl-C included).
 */
import { existsSync, readdirSync, statSync } from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { spawn, type ChildProcess } from 'node:child_process';
import { ensureDebianPackages } from './services/debian.ts';
import { ensureDatabase, startPostgres } from './services/postgres.ts';
import { startRedis } from './services/redis.ts';
import { runInherit } from './services/shell.ts';
import { startFakeOAuthProvider } from './fakes/oauth-provider.ts';
import { startFakeObjectStore } from './fakes/object-store.ts';
import { startFakeSmtpInbox } from './fakes/smtp-inbox.ts';
import { startFakeWeather } from './fakes/weather.ts';
import { startFakePayments } from './fakes/payments.ts';
import { DEMO_ACCOUNTS } from '../seeds/demo-accounts.ts';

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..');
/** Where PostgreSQL, Redis and the fakes keep their files (WATERLINE_DATA_DIR moves it, e.g. for the stack's own tests). */
const dataDir = path.resolve(process.env.WATERLINE_DATA_DIR ?? path.join(root, '.data'));
const mode = process.argv[2] === 'test' || process.argv[2] === 'bench' ? process.argv[2] : 'start';
/** Tests and benchmarks run beside a running `npm start`: fakes on free ports, their own database. */
const isolated = mode !== 'start';
/** WATERLINE_FAKE_PORTS=free puts the fakes on free ports in `npm start` too (a second stack beside the first). */
const freeFakePorts = isolated || process.env.WATERLINE_FAKE_PORTS === 'free';
const PORTS = {
  postgres: Number(process.env.WATERLINE_PG_PORT ?? 54329),
  redis: Number(process.env.WATERLINE_REDIS_PORT ?? 63799),
  // Tests take any free port for the fakes (their URLs are passed on), so runs never collide.
  oauth: freeFakePorts ? 0 : 4011,
  objectStore: freeFakePorts ? 0 : 4569,
  smtp: freeFakePorts ? 0 : 2525,
  inbox: freeFakePorts ? 0 : 1080,
  weather: freeFakePorts ? 0 : 4015,
  payments: freeFakePorts ? 0 : 4017,
  app: Number(process.env.PORT ?? 3000),
};

const cleanups: (() => void | Promise<void>)[] = [];
let children: ChildProcess[] = [];
let stopping = false;
let stopped: Promise<void> | null = null;

/**
 * Stops the children, then runs the clean-ups (services this run started) once, and exits. Called
 * again while stopping (a second signal, a child's exit) it waits for the same clean-up rather
 * than exiting early and leaving PostgreSQL or Redis behind.
 */
async function stopAll(code: number): Promise<never> {
  stopping = true;
  stopped ??= (async () => {
    for (const child of children) child.kill('SIGTERM');
    await Promise.all(
      children.map(
        (c) => new Promise((r) => (c.exitCode !== null || c.signalCode !== null ? r(null) : c.once('exit', r))),
      ),
    );
    for (const cleanup of cleanups.reverse()) {
      try {
        await cleanup();
      } catch (error) {
        console.error(String(error));
      }
    }
  })();
  await stopped;
  process.exit(code);
}

/**
 * One Ctrl-C reaches this process several times (the terminal signals the whole process group, and
 * npm and the bootstrap script pass it on), and service managers send TERM after INT. Signals
 * inside a short burst count as one; a later one says what is happening; only a third separate
 * request forces an exit without the clean-up.
 */
let signalRequests = 0;
let lastSignalAt = 0;
function onSignal(code: number): void {
  const now = Date.now();
  if (now - lastSignalAt > 250) signalRequests += 1;
  lastSignalAt = now;
  if (signalRequests === 2)
    console.error('\nStill stopping PostgreSQL and Redis… press Ctrl-C once more to quit without waiting.');
  if (signalRequests >= 3) {
    console.error('\nQuit without waiting: PostgreSQL or Redis may still be running; the next start reuses them.');
    process.exit(code);
  }
  void stopAll(code);
}
process.on('SIGINT', () => onSignal(130));
process.on('SIGTERM', () => onSignal(143));

function newestMtime(paths: string[]): number {
  let newest = 0;
  const visit = (p: string) => {
    if (!existsSync(p)) return;
    const s = statSync(p);
    if (s.isDirectory()) for (const f of readdirSync(p)) visit(path.join(p, f));
    else newest = Math.max(newest, s.mtimeMs);
  };
  paths.forEach((p) => visit(path.join(root, p)));
  return newest;
}

/** The client is rebuilt only when its sources are newer than the last build. */
async function buildClientIfStale(): Promise<void> {
  const built = path.join(root, 'dist', 'index.html');
  const sources = newestMtime(['src', 'shared', 'index.html', 'vite.config.ts', 'public', 'package-lock.json']);
  if (existsSync(built) && statSync(built).mtimeMs >= sources) return;
  console.log('Building the web app…');
  const code = await runInherit(path.join(root, 'node_modules', '.bin', 'vite'), ['build', '--logLevel', 'warn'], {
    cwd: root,
  });
  if (code !== 0) throw new Error('vite build failed');
}

/**
 * The production build of the server side (dist-server/, plain JavaScript: `npm run build:server`),
 * rebuilt only when its sources are newer; the tests in tests/ops run it with plain node.
 */
async function buildServerIfStale(): Promise<void> {
  const built = path.join(root, 'dist-server', 'server', 'index.js');
  const sources = newestMtime([
    'server',
    'shared',
    'workers',
    'migrations',
    'seeds',
    'scripts/migrate.ts',
    'scripts/build-server.mjs',
    'tsconfig.base.json',
    'tsconfig.server.json',
    'tsconfig.server.build.json',
    'package-lock.json',
  ]);
  if (existsSync(built) && statSync(built).mtimeMs >= sources) return;
  console.log('Building the server (dist-server/)…');
  // Type errors are the type check's to report (a step of its own in a full run), not a reason to test nothing.
  const code = await runInherit(
    process.execPath,
    [path.join(root, 'scripts', 'build-server.mjs'), '--allow-type-errors'],
    { cwd: root },
  );
  if (code !== 0) throw new Error('the server build failed');
}

function spawnChild(cmd: string, args: string[], env: NodeJS.ProcessEnv): ChildProcess {
  const child = spawn(cmd, args, { cwd: root, stdio: 'inherit', env });
  children.push(child);
  child.on('exit', () => {
    children = children.filter((c) => c !== child);
  });
  return child;
}

async function main(): Promise<void> {
  ensureDebianPackages(isolated ? ['redis-server', 'chromium'] : ['redis-server']);

  const pg = await startPostgres(dataDir, PORTS.postgres);
  cleanups.push(() => pg.stop());
  const database =
    mode === 'test'
      ? (process.env.WATERLINE_TEST_DB ?? 'waterline_test')
      : mode === 'bench'
        ? 'waterline_bench'
        : 'waterline';
  await ensureDatabase(PORTS.postgres, database);
  const redis = await startRedis(dataDir, PORTS.redis);
  cleanups.push(() => redis.stop());
  const oauth = await startFakeOAuthProvider(
    PORTS.oauth,
    DEMO_ACCOUNTS.map((a) => ({ email: a.email, name: a.name, hint: `${a.role} · ${a.firm}` })),
  );
  cleanups.push(() => oauth.stop());
  // Job photos and documents: a fake S3 on loopback (emptied for each test run).
  const s3 = await startFakeObjectStore(dataDir, PORTS.objectStore, 'waterline', isolated);
  cleanups.push(() => s3.stop());
  // E-mail goes to a local inbox page instead of anyone's mailbox.
  const inbox = await startFakeSmtpInbox({ smtp: PORTS.smtp, web: PORTS.inbox });
  cleanups.push(() => inbox.stop());
  // Site weather forecasts (the cure) from a local stand-in for the forecast API.
  const weather = await startFakeWeather(PORTS.weather);
  cleanups.push(() => weather.stop());
  // Deposits and balances: a local stand-in for the payment provider (unless real keys are set).
  const payments = await startFakePayments(PORTS.payments);
  cleanups.push(() => payments.stop());

  const publicUrl = `http://127.0.0.1:${PORTS.app}`;
  const env: NodeJS.ProcessEnv = {
    ...process.env,
    NODE_ENV: isolated ? 'test' : 'development',
    PORT: String(PORTS.app),
    PUBLIC_URL: publicUrl,
    DATABASE_URL: `postgres://postgres@127.0.0.1:${PORTS.postgres}/${database}`,
    // WATERLINE_TEST_REDIS_DB keeps two people's test runs on one machine apart (as WATERLINE_TEST_DB does).
    REDIS_URL: `redis://127.0.0.1:${PORTS.redis}/${mode === 'test' ? (process.env.WATERLINE_TEST_REDIS_DB ?? 1) : mode === 'bench' ? 2 : 0}`,
    SESSION_SECRET: process.env.SESSION_SECRET ?? 'local-only-session-secret-not-for-production',
    GOOGLE_CLIENT_ID: 'waterline-local',
    GOOGLE_CLIENT_SECRET: 'waterline-local-secret',
    OAUTH_AUTHORIZATION_URL: oauth.authorizationURL,
    OAUTH_TOKEN_URL: oauth.tokenURL,
    OAUTH_USERINFO_URL: oauth.userProfileURL,
    FAKE_OAUTH_URL: oauth.url,
    S3_ENDPOINT: s3.endpoint,
    S3_BUCKET: s3.bucket,
    S3_ACCESS_KEY_ID: s3.accessKeyId,
    S3_SECRET_ACCESS_KEY: s3.secretAccessKey,
    SMTP_URL: inbox.smtpUrl,
    FAKE_INBOX_URL: inbox.url,
    WEATHER_API_URL: weather.url,
    FAKE_PAYMENTS_URL: payments.url,
    FAKE_PAYMENTS_SECRET_KEY: payments.secretKey,
    FAKE_PAYMENTS_WEBHOOK_SECRET: payments.webhookSecret,
    LOG_LEVEL: process.env.LOG_LEVEL ?? (isolated ? 'silent' : 'info'),
  };
  // TypeScript children run as node with tsx's loader (not the tsx command, whose signal relay may
  // kill a child before it has shut down cleanly).
  const runTs = (script: string, args: string[] = []): [string, string[]] => [
    process.execPath,
    ['--import', 'tsx', script, ...args],
  ];

  if (mode === 'bench') {
    // `npm run bench:… ` → the named benchmark script, with the services it needs.
    // A failed client build is only a warning here: the API benchmarks never open the page (the board one will say so).
    await buildClientIfStale().catch((error: unknown) => {
      console.warn(
        `The web app did not build (${error instanceof Error ? error.message : String(error)}); the benchmark runs without it.`,
      );
    });
    const [script, ...rest] = process.argv.slice(3);
    if (!script) throw new Error('bench mode needs a script, e.g. bench/board.ts');
    const code = await new Promise<number>((resolve) =>
      spawnChild(...runTs(path.join(root, script), rest), env).on('exit', (c) => resolve(c ?? 1)),
    );
    return stopAll(code);
  }

  if (mode === 'test') {
    // `npm test -- <filter>` runs just those test files (for work in progress); plain `npm test` runs everything.
    const filters = process.argv.slice(3);
    const steps: [string, string[]][] = [
      ...(filters.length
        ? []
        : ([
            ['npm', ['run', '--silent', 'lint']],
            ['npm', ['run', '--silent', 'typecheck']],
          ] as [string, string[]][])),
      [path.join(root, 'node_modules', '.bin', 'vitest'), ['run', ...filters]],
    ];
    // The end-to-end tests drive the built app in a real browser, and tests/ops/build.test.ts serves it
    // (a run of other files alone needs no build).
    if (!filters.length || filters.some((f) => f.includes('e2e') || f.includes('ops/build')))
      await buildClientIfStale();
    // The production-build and scale-out tests run the compiled server and workers.
    if (!filters.length || filters.some((f) => f.includes('ops'))) {
      await buildServerIfStale();
      env.WATERLINE_SERVER_BUILD = 'fresh';
    }
    for (const [cmd, args] of steps) {
      console.log(`\n▶ ${path.basename(cmd)} ${args.join(' ')}`);
      const code = await new Promise<number>((resolve) =>
        spawnChild(cmd, args, env).on('exit', (c) => resolve(c ?? 1)),
      );
      if (code !== 0) {
        console.error(`✖ ${path.basename(cmd)} ${args.join(' ')} failed`);
        return stopAll(code);
      }
    }
    return stopAll(0);
  }

  const migrate = await runInherit(...runTs(path.join(root, 'scripts', 'migrate.ts'), ['latest', '--seed']), {
    cwd: root,
    env,
  });
  if (migrate !== 0) return stopAll(migrate);
  await buildClientIfStale();
  const server = spawnChild(...runTs(path.join(root, 'server', 'index.ts')), { ...env, RUN_WORKER: '1' });
  server.on('exit', (code) => {
    if (!stopping) void stopAll(code ?? 1);
  });
  console.log(
    [
      '',
      `Waterline is starting at ${publicUrl}`,
      'Sign in with the local provider as any of the demo accounts:',
      ...DEMO_ACCOUNTS.map((a) => `  ${a.role.padEnd(9)} ${a.name.padEnd(16)} ${a.email}  (${a.firm})`),
      `E-mail it sends (requests to partners, invitations) lands in the local inbox: ${inbox.url}`,
      'Press Ctrl-C to stop; PostgreSQL and Redis stop with it.',
      '',
    ].join('\n'),
  );
}

main().catch((error: unknown) => {
  console.error(error instanceof Error ? error.message : error);
  void stopAll(1);
});
