import { mkdirSync } from 'node:fs';
import path from 'node:path';
import { hasCommand, run, waitFor } from './shell.ts';

export interface RedisHandle { port: number; startedHere: boolean; stop(): void }

function ping(port: number): boolean {
  try { return run('redis-cli', ['-h', '127.0.0.1', '-p', String(port), 'ping']).trim() === 'PONG'; } catch { return false; }
}

/** Starts a private Redis on 127.0.0.1:`port` (no persistence), or reuses one already there. */
export async function startRedis(dataDir: string, port: number): Promise<RedisHandle> {
  if (!hasCommand('redis-server')) throw new Error('redis-server is missing: sudo apt-get install -y redis-server');
  if (ping(port)) return { port, startedHere: false, stop() {} };
  const dir = path.join(dataDir, 'redis');
  mkdirSync(dir, { recursive: true });
  run('redis-server', [
    '--bind', '127.0.0.1', '--port', String(port), '--save', '', '--appendonly', 'no',
    // BullMQ needs keys never to be evicted.
    '--maxmemory-policy', 'noeviction', '--daemonize', 'yes', '--dir', dir,
    '--pidfile', path.join(dir, 'redis.pid'), '--logfile', path.join(dir, 'redis.log'),
  ]);
  await waitFor('Redis', () => ping(port));
  return {
    port,
    startedHere: true,
    stop() {
      try { run('redis-cli', ['-h', '127.0.0.1', '-p', String(port), 'shutdown', 'nosave']); } catch { /* already gone */ }
    },
  };
}
