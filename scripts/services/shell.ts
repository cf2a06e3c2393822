import { spawn, spawnSync, type SpawnOptions } from 'node:child_process';
import { existsSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import path from 'node:path';

export const isRoot = typeof process.getuid === 'function' && process.getuid() === 0;

/** Runs a command to completion and returns its output; throws with the output when it fails. */
export function run(
  cmd: string,
  args: string[],
  options: { asUser?: string; quiet?: boolean; env?: NodeJS.ProcessEnv; ownSession?: boolean } = {},
): string {
  const [user, userArgv] =
    options.asUser && isRoot ? ['runuser', ['-u', options.asUser, '--', cmd, ...args]] : [cmd, args];
  // In a session of its own (util-linux setsid, waiting for it) a Ctrl-C pressed again while it
  // runs reaches only us, not it: a stop of PostgreSQL or Redis is never cut short half-way.
  const [file, argv] = options.ownSession === true ? ['setsid', ['--wait', user, ...userArgv]] : [user, userArgv];
  const result = spawnSync(file, argv, { encoding: 'utf8', env: options.env ?? process.env });
  if (result.status !== 0) {
    throw new Error(
      `${cmd} ${args.join(' ')} failed (${result.status ?? result.signal}):\n${result.stdout ?? ''}${result.stderr ?? ''}`,
    );
  }
  return result.stdout;
}

/** True when a program is on PATH. */
export function hasCommand(cmd: string): boolean {
  return spawnSync('sh', ['-c', `command -v ${cmd}`], { stdio: 'ignore' }).status === 0;
}

/** Starts a long-running child with inherited output; resolves with its exit code. */
export function runInherit(cmd: string, args: string[], options: SpawnOptions = {}): Promise<number> {
  return new Promise((resolve) => {
    const child = spawn(cmd, args, { stdio: 'inherit', ...options });
    child.on('exit', (code) => resolve(code ?? 1));
  });
}

export async function waitFor(
  what: string,
  check: () => boolean | Promise<boolean>,
  timeoutMs = 30_000,
): Promise<void> {
  const deadline = Date.now() + timeoutMs;
  while (Date.now() < deadline) {
    if (await check()) return;
    await new Promise((r) => setTimeout(r, 200));
  }
  throw new Error(`${what} did not become ready within ${timeoutMs / 1000} s`);
}

/** True when something accepts TCP connections on 127.0.0.1:`port`. */
export function portInUse(port: number): boolean {
  // A child process keeps this synchronous, like the other service checks.
  const probe = spawnSync(process.execPath, [
    '-e',
    `const s=require('net').connect(${Number(port)},'127.0.0.1');s.on('connect',()=>process.exit(0));s.on('error',()=>process.exit(1));setTimeout(()=>process.exit(1),1000)`,
  ]);
  return probe.status === 0;
}

/** Who listens on a TCP port, in words ("postgres (pid 4242)"), or null when it cannot be told. */
export function portHolder(port: number): string | null {
  const found = spawnSync('ss', ['-ltnpH', `sport = :${Number(port)}`], { encoding: 'utf8' });
  const m = /users:\(\("([^"]+)",pid=(\d+)/.exec(found.stdout ?? '');
  if (m) return `${m[1]} (pid ${m[2]})`;
  return (found.stdout ?? '').trim() ? 'another program (run as another user, so its name is hidden)' : null;
}

/**
 * The error for a port some other program holds: names the holder and the setting that moves ours.
 */
export function portTakenError(service: string, port: number, setting: string): Error {
  const holder = portHolder(port) ?? 'another program';
  return new Error(
    `${service} cannot start: port ${port} on 127.0.0.1 is already used by ${holder}, which is not this checkout's ${service}.\n` +
      `Stop that program, or give ${service} another port: ${setting}=<free port> npm start (or npm test).`,
  );
}

/**
 * Who owns a service of this checkout that is already running: the stack run that started it
 * writes its pid to `<dataDir>/<name>.owner`. A service whose owner is gone was left behind (a
 * crash, a forced quit): the new run adopts it, stopping it when it ends; one whose owner still runs
 * (`npm start` beside `npm test`) is shared and left to its owner.
 */
export function claimRunning(dataDir: string, name: string): 'adopted' | 'shared' {
  const file = path.join(dataDir, `${name}.owner`);
  const owner = existsSync(file) ? Number(readFileSync(file, 'utf8').trim()) : NaN;
  if (Number.isInteger(owner) && owner > 0 && owner !== process.pid && processAlive(owner)) return 'shared';
  writeFileSync(file, String(process.pid));
  return 'adopted';
}

/** Records this run as the owner of a service it has just started. */
export function claimStarted(dataDir: string, name: string): void {
  writeFileSync(path.join(dataDir, `${name}.owner`), String(process.pid));
}

/** Forgets the owner once the service is stopped. */
export function releaseClaim(dataDir: string, name: string): void {
  rmSync(path.join(dataDir, `${name}.owner`), { force: true });
}

function processAlive(pid: number): boolean {
  // A killed run whose parent died too stays a zombie until something reaps it: it answers
  // kill(pid, 0) but is gone. Linux says so in /proc/<pid>/stat (state Z).
  try {
    const stat = readFileSync(`/proc/${pid}/stat`, 'utf8');
    if (stat.slice(stat.lastIndexOf(')') + 2, stat.lastIndexOf(')') + 3) === 'Z') return false;
  } catch {
    /* no /proc, or no such process: ask kill below */
  }
  try {
    process.kill(pid, 0);
    return true;
  } catch (error) {
    return (error as NodeJS.ErrnoException).code === 'EPERM';
  }
}
