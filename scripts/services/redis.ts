import { mkdirSync } from 'node:fs';
import path from 'node:path';
import {
  claimRunning,
  claimStarted,
  hasCommand,
  portInUse,
  portTakenError,
  releaseClaim,
  run,
  waitFor,
} from './shell.ts';

export interface RedisHandle {
  port: number;
  startedHere: boolean;
  stop(): void | Promise<void>;
}

function ping(port: number): boolean {
  try {
    return run('redis-cli', ['-h', '127.0.0.1', '-p', String(port), 'ping']).trim() === 'PONG';
  } catch {
    return false;
  }
}

/** The working folder of the Redis on `port`, or null when it does not say. */
function redisDir(port: number): string | null {
  try {
    const lines = run('redis-cli', ['-h', '127.0.0.1', '-p', String(port), 'config', 'get', 'dir'])
      .trim()
      .split('\n');
    return lines[1]?.trim() ?? null;
  } catch {
    return null;
  }
}

/** Starts a private Redis on 127.0.0.1:`port` (no persistence), or reuses one already there. */
export async function startRedis(dataDir: string, port: number): Promise<RedisHandle> {
  if (!hasCommand('redis-server')) throw new Error('redis-server is missing: sudo apt-get install -y redis-server');
  const dir = path.join(dataDir, 'redis');
  if (ping(port)) {
    // Only this checkout's Redis (its working folder is ours) is reused; another one is named.
    if (redisDir(port) !== dir) throw portTakenError('Redis', port, 'WATERLINE_REDIS_PORT');
    if (claimRunning(dataDir, 'redis') === 'shared') return { port, startedHere: false, stop() {} };
    console.log(`Found this checkout's Redis left running on port ${port}: using it, and stopping it at the end.`);
    return { port, startedHere: true, stop: () => shutdown(dataDir, port) };
  }
  if (portInUse(port)) throw portTakenError('Redis', port, 'WATERLINE_REDIS_PORT');
  mkdirSync(dir, { recursive: true });
  run('redis-server', [
    '--bind',
    '127.0.0.1',
    '--port',
    String(port),
    '--save',
    '',
    '--appendonly',
    'no',
    // BullMQ needs keys never to be evicted.
    '--maxmemory-policy',
    'noeviction',
    '--daemonize',
    'yes',
    '--dir',
    dir,
    '--pidfile',
    path.join(dir, 'redis.pid'),
    '--logfile',
    path.join(dir, 'redis.log'),
  ]);
  await waitFor('Redis', () => ping(port));
  claimStarted(dataDir, 'redis');
  return { port, startedHere: true, stop: () => shutdown(dataDir, port) };
}

/**
 * SHUTDOWN answers as Redis begins to exit, a moment before its port closes: stopped means the port
 * is free, so a start straight after (or a check) never finds the old one half-gone.
 */
async function shutdown(dataDir: string, port: number): Promise<void> {
  try {
    run('redis-cli', ['-h', '127.0.0.1', '-p', String(port), 'shutdown', 'nosave'], { ownSession: true });
  } catch {
    /* already gone */
  }
  const deadline = Date.now() + 15_000;
  while (portInUse(port)) {
    if (Date.now() > deadline)
      throw new Error(`Redis on port ${port} was asked to stop but is still running after 15 s`);
    await new Promise((r) => setTimeout(r, 100));
  }
  releaseClaim(dataDir, 'redis');
}
