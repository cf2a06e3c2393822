import { spawn, type ChildProcess } from 'node:child_process';
import { mkdtempSync, readdirSync, rmSync } from 'node:fs';
import { connect, createServer } from 'node:net';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';

/**
 * `npm start` as a person runs it in a terminal, in a data folder of its own and on free ports so it
 * never touches the stack running these tests: Ctrl-C twice must still stop PostgreSQL and Redis, and
 * a start after a crash must find this checkout's leftovers and start cleanly.
 */

const dataDir = mkdtempSync(path.join(tmpdir(), 'waterline-stack-'));

async function freePort(): Promise<number> {
  const server = createServer();
  await new Promise<void>((resolve) => server.listen(0, '127.0.0.1', resolve));
  const port = (server.address() as { port: number }).port;
  await new Promise<void>((resolve) => server.close(() => resolve()));
  return port;
}

function listening(port: number): Promise<boolean> {
  return new Promise((resolve) => {
    const socket = connect(port, '127.0.0.1');
    socket.once('connect', () => {
      socket.destroy();
      resolve(true);
    });
    socket.once('error', () => resolve(false));
  });
}

async function until(
  what: string,
  check: () => boolean | Promise<boolean>,
  timeoutMs: number,
  log: () => string = () => '',
): Promise<void> {
  const deadline = Date.now() + timeoutMs;
  while (Date.now() < deadline) {
    if (await check()) return;
    await new Promise((r) => setTimeout(r, 200));
  }
  throw new Error(
    `${what} did not happen within ${timeoutMs / 1000} s${log() ? `; its output:\n${log().slice(-3000)}` : ''}`,
  );
}

interface Started {
  child: ChildProcess;
  output: () => string;
  exited: Promise<number | null>;
}

/** `node scripts/bootstrap.mjs start` in its own process group, as a terminal runs it. */
function startStack(ports: { pg: number; redis: number; app: number }): Started {
  let text = '';
  const child = spawn(process.execPath, ['scripts/bootstrap.mjs', 'start'], {
    cwd: path.resolve('.'),
    detached: true,
    env: {
      ...process.env,
      WATERLINE_DATA_DIR: dataDir,
      WATERLINE_PG_PORT: String(ports.pg),
      WATERLINE_REDIS_PORT: String(ports.redis),
      PORT: String(ports.app),
      WATERLINE_FAKE_PORTS: 'free',
      LOG_LEVEL: 'warn',
    },
    stdio: ['ignore', 'pipe', 'pipe'],
  });
  child.stdout!.on('data', (c: Buffer) => {
    text += c.toString();
  });
  child.stderr!.on('data', (c: Buffer) => {
    text += c.toString();
  });
  const exited = new Promise<number | null>((resolve) => child.once('exit', (code) => resolve(code)));
  return { child, output: () => text, exited };
}

/** What the terminal does on Ctrl-C: the signal goes to every process of the foreground group. */
function ctrlC(s: Started): void {
  try {
    process.kill(-s.child.pid!, 'SIGINT');
  } catch (error) {
    // The group is gone: the first Ctrl-C already finished stopping everything.
    if ((error as NodeJS.ErrnoException).code !== 'ESRCH') throw error;
  }
}

const ports = { pg: 0, redis: 0, app: 0 };
afterAll(async () => {
  // Whatever a failed run left behind, stopped the hard way.
  const run = (cmd: string, args: string[]) =>
    new Promise((r) => spawn(cmd, args, { stdio: 'ignore' }).once('exit', r).once('error', r));
  if (ports.redis && (await listening(ports.redis)))
    await run('redis-cli', ['-p', String(ports.redis), 'shutdown', 'nosave']);
  if (ports.pg && (await listening(ports.pg))) {
    const versions = readdirSync('/usr/lib/postgresql').sort((a, b) => Number(b) - Number(a));
    const pgCtl = path.join('/usr/lib/postgresql', versions[0] ?? '', 'bin', 'pg_ctl');
    const asPostgres =
      process.getuid?.() === 0 ? (['runuser', ['-u', 'postgres', '--', pgCtl]] as const) : ([pgCtl, []] as const);
    await run(asPostgres[0], [...asPostgres[1], '-D', path.join(dataDir, 'pg'), '-m', 'immediate', 'stop']);
  }
  rmSync(dataDir, { recursive: true, force: true });
});

describe('npm start in a terminal', () => {
  it('after a crash starts again on the leftovers, and two Ctrl-Cs stop PostgreSQL and Redis', async () => {
    Object.assign(ports, { pg: await freePort(), redis: await freePort(), app: await freePort() });

    const first = startStack(ports);
    await until('the first start', () => first.output().includes('is listening'), 180_000, first.output);
    expect(await listening(ports.pg)).toBe(true);
    expect(await listening(ports.redis)).toBe(true);

    // A crash: every process of the terminal's group killed at once, no clean-up.
    process.kill(-first.child.pid!, 'SIGKILL');
    await first.exited;
    await until('the app to go', async () => !(await listening(ports.app)), 10_000);
    // PostgreSQL and Redis run in sessions of their own, so they are left behind.
    expect(await listening(ports.pg)).toBe(true);
    expect(await listening(ports.redis)).toBe(true);

    const second = startStack(ports);
    await until('the start after the crash', () => second.output().includes('is listening'), 180_000, second.output);
    expect(second.output(), second.output()).toContain("Found this checkout's PostgreSQL left running");
    expect(second.output()).toContain("Found this checkout's Redis left running");

    // Ctrl-C, and again a moment later while the first is still stopping things.
    ctrlC(second);
    await new Promise((r) => setTimeout(r, 350)); // two separate key presses, not one burst
    ctrlC(second);
    await second.exited;
    expect(await listening(ports.app)).toBe(false);
    expect(await listening(ports.pg)).toBe(false);
    expect(await listening(ports.redis)).toBe(false);
  }, 420_000);
});
