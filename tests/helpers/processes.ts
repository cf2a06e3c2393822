import { spawn, type ChildProcess } from 'node:child_process';
import { existsSync, readdirSync, statSync } from 'node:fs';
import { createServer } from 'node:net';
import path from 'node:path';
import { fileURLToPath } from 'node:url';

/**
 * The production build run as production runs it: `node dist-server/server/index.js` (web) and
 * `node dist-server/workers/index.js` (worker), as child processes over the test stack's database,
 * Redis and fakes. `npm test` builds dist-server/ before the tests in tests/ops (scripts/stack.ts).
 */

export const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..', '..');
/** The build under test; WATERLINE_DIST_SERVER points at another copy (e.g. one broken on purpose). */
export const DIST_SERVER = path.resolve(root, process.env.WATERLINE_DIST_SERVER ?? 'dist-server');
export const WEB_ENTRY = path.join(DIST_SERVER, 'server', 'index.js');
export const WORKER_ENTRY = path.join(DIST_SERVER, 'workers', 'index.js');
/** Loaded with --import: refuses any TypeScript module or tsx itself (tests/ops/no-typescript/hooks.mjs). */
export const NO_TYPESCRIPT = path.join(root, 'tests', 'ops', 'no-typescript', 'register.mjs');

/** The sources the build compiles; a build older than any of them is not what these tests should run. */
const SOURCES = ['server', 'shared', 'workers', 'migrations', 'seeds', 'scripts/migrate.ts'];

function newestSource(p: string): number {
  const s = statSync(p);
  if (!s.isDirectory()) return p.endsWith('.ts') ? s.mtimeMs : 0;
  return Math.max(0, ...readdirSync(p).map((f) => newestSource(path.join(p, f))));
}

/**
 * Throws unless dist-server/ exists and is newer than every source it is built from. Under `npm test`
 * the stack has just made sure of that (WATERLINE_SERVER_BUILD=fresh), and a source saved since
 * then is not this run's concern.
 */
export function assertFreshBuild(): void {
  if (!existsSync(WEB_ENTRY) || !existsSync(WORKER_ENTRY)) {
    throw new Error(
      'No production build in dist-server/: run these tests through `npm test -- tests/ops/…`, which builds it.',
    );
  }
  if (process.env.WATERLINE_SERVER_BUILD === 'fresh') return;
  const built = statSync(WEB_ENTRY).mtimeMs;
  const stale = SOURCES.filter((s) => newestSource(path.join(root, s)) > built);
  if (stale.length)
    throw new Error(
      `dist-server/ is older than ${stale.join(', ')}: rebuild it (npm run build:server or npm test -- tests/ops/…).`,
    );
}

export async function freePort(): Promise<number> {
  const server = createServer();
  await new Promise<void>((resolve) => server.listen(0, '127.0.0.1', resolve));
  const { port } = server.address() as { port: number };
  await new Promise((resolve) => server.close(resolve));
  return port;
}

export interface Started {
  name: string;
  child: ChildProcess;
  /** What it printed so far (stdout and stderr). */
  output(): string;
  exited: Promise<number | null>;
  /** Sends `signal` and waits for the process to end. */
  stop(signal?: NodeJS.Signals): Promise<void>;
}

/**
 * Starts `node <entry>` with the test stack's settings and `env` on top. NODE_OPTIONS is cleared and
 * the no-TypeScript guard loaded first, so the process runs plain JavaScript or fails.
 */
export function startNode(name: string, entry: string, env: NodeJS.ProcessEnv): Started {
  let text = '';
  const child = spawn(process.execPath, ['--import', NO_TYPESCRIPT, entry], {
    cwd: root,
    env: { ...process.env, NODE_OPTIONS: '', ...env },
    stdio: ['ignore', 'pipe', 'pipe'],
  });
  child.stdout!.on('data', (c: Buffer) => {
    text += c.toString();
  });
  child.stderr!.on('data', (c: Buffer) => {
    text += c.toString();
  });
  const exited = new Promise<number | null>((resolve) =>
    child.once('exit', (code, signal) => {
      if (signal) text += `\n[${name} ended by ${signal}]`;
      resolve(code);
    }),
  );
  return {
    name,
    child,
    exited,
    output: () => text,
    async stop(signal = 'SIGTERM') {
      if (child.exitCode === null && child.signalCode === null) child.kill(signal);
      await exited;
    },
  };
}

/** Polls `check` every 100 ms until it holds, for at most `timeoutMs`; the error names `what` and the process output. */
export async function until(
  what: string,
  check: () => boolean | Promise<boolean>,
  timeoutMs = 30_000,
  output: () => string = () => '',
): Promise<void> {
  const deadline = Date.now() + timeoutMs;
  while (Date.now() < deadline) {
    if (await check()) return;
    await new Promise((r) => setTimeout(r, 100));
  }
  throw new Error(
    `${what} did not happen within ${timeoutMs / 1000} s${output() ? `; output:\n${output().slice(-3000)}` : ''}`,
  );
}

/** A compiled web process on a free port; resolves once /api/health/ready says ready. */
export async function startWeb(name: string, env: NodeJS.ProcessEnv): Promise<Started & { port: number; url: string }> {
  const port = await freePort();
  const url = `http://127.0.0.1:${port}`;
  const web = startNode(name, WEB_ENTRY, {
    HOST: '127.0.0.1',
    PORT: String(port),
    PUBLIC_URL: url,
    RUN_WORKER: '0',
    ...env,
  });
  await until(
    `${name} to be ready`,
    async () => {
      if (web.child.exitCode !== null) throw new Error(`${name} exited with ${web.child.exitCode}:\n${web.output()}`);
      return fetch(`${url}/api/health/ready`).then(
        (r) => r.status === 200,
        () => false,
      );
    },
    120_000,
    web.output,
  );
  return { ...web, port, url };
}
