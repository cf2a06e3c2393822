import { spawn, spawnSync, type SpawnOptions } from 'node:child_process';

export const isRoot = typeof process.getuid === 'function' && process.getuid() === 0;

/** Runs a command to completion and returns its output; throws with the output when it fails. */
export function run(cmd: string, args: string[], options: { asUser?: string; quiet?: boolean; env?: NodeJS.ProcessEnv } = {}): string {
  const [file, argv] = options.asUser && isRoot ? ['runuser', ['-u', options.asUser, '--', cmd, ...args]] : [cmd, args];
  const result = spawnSync(file, argv, { encoding: 'utf8', env: options.env ?? process.env });
  if (result.status !== 0) {
    throw new Error(`${cmd} ${args.join(' ')} failed (${result.status ?? result.signal}):\n${result.stdout ?? ''}${result.stderr ?? ''}`);
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

export async function waitFor(what: string, check: () => boolean | Promise<boolean>, timeoutMs = 30_000): Promise<void> {
  const deadline = Date.now() + timeoutMs;
  while (Date.now() < deadline) {
    if (await check()) return;
    await new Promise((r) => setTimeout(r, 200));
  }
  throw new Error(`${what} did not become ready within ${timeoutMs / 1000} s`);
}
