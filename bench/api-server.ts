/**
 * The app for bench/api.ts in a process of its own, so the load generator never shares its thread:
 * listens on a free port on loopback and tells the parent which (IPC), then serves until killed.
 * The clock is fixed at BENCH_NOW (epoch ms), as in the benchmark's generated board.
 */
import { createKnex } from '../server/db.ts';
import { loadConfig } from '../server/config.ts';
import { createApp } from '../server/app.ts';

const config = loadConfig({ ...process.env, LOG_LEVEL: 'silent' });
const knex = createKnex(config.DATABASE_URL);
const server = (await import('node:http')).createServer();
await new Promise<void>((resolve) => server.listen(0, '127.0.0.1', resolve));
const base = `http://127.0.0.1:${(server.address() as { port: number }).port}`;
const waterline = createApp({
  config: { ...config, PUBLIC_URL: base },
  knex,
  now: () => Number(process.env.BENCH_NOW),
});
server.on('request', waterline.app);
process.send?.({ base });
/**
 * The last load leaves requests in flight (autocannon stops without waiting for them): they finish
 * before the pool closes, or each would fail with knex's "Acquire connection error: aborted".
 */
async function drained(): Promise<void> {
  const pool = (knex.client as { pool: { numUsed(): number; numPendingAcquires(): number } }).pool;
  while (pool.numUsed() + pool.numPendingAcquires() > 0) await new Promise((resolve) => setTimeout(resolve, 50));
}
process.on('SIGTERM', () => {
  server.close();
  void drained()
    .then(() => waterline.close())
    .then(() => knex.destroy())
    .then(() => process.exit(0));
});
