import { createServer, type Server, type Socket } from 'node:net';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import request from 'supertest';
import { createKnex } from '../../server/db.ts';
import { Health } from '../../server/health.ts';
import { startTestApp, testConfig, type TestContext } from '../helpers/server.ts';

/** A TCP port that accepts connections and never says a word: a hung Redis or PostgreSQL. */
async function silentPort(): Promise<{ port: number; close(): Promise<void> }> {
  const sockets = new Set<Socket>();
  const server: Server = createServer((socket) => {
    sockets.add(socket);
    socket.on('error', () => {});
  });
  await new Promise<void>((resolve) => server.listen(0, '127.0.0.1', resolve));
  const port = (server.address() as { port: number }).port;
  return {
    port,
    close: () =>
      new Promise<void>((resolve) => {
        for (const s of sockets) s.destroy();
        server.close(() => resolve());
      }),
  };
}

/** A port nothing listens on: a stopped service. */
async function closedPort(): Promise<number> {
  const server = createServer();
  await new Promise<void>((resolve) => server.listen(0, '127.0.0.1', resolve));
  const port = (server.address() as { port: number }).port;
  await new Promise<void>((resolve) => server.close(() => resolve()));
  return port;
}

let ctx: TestContext;
beforeAll(async () => {
  ctx = await startTestApp();
});
afterAll(async () => {
  await ctx.close();
});

describe('liveness and readiness', () => {
  it('answers live without asking any dependency, and ready with each dependency', async () => {
    const live = await request(ctx.waterline.app).get('/api/health/live').expect(200);
    expect(live.body).toEqual({ status: 'ok' });
    const ready = await request(ctx.waterline.app).get('/api/health/ready').expect(200);
    expect(ready.body).toMatchObject({
      status: 'ok',
      ready: true,
      database: { status: 'ok' },
      queue: { status: 'ok' },
    });
  });
});

describe('a dependency that is away', () => {
  it('Redis stopped: degraded but still ready, so a load balancer keeps sending traffic', async () => {
    const health = new Health(ctx.knex, `redis://127.0.0.1:${await closedPort()}`, 500);
    try {
      const report = await health.check();
      expect(report.status).toBe('degraded');
      expect(report.ready).toBe(true);
      expect(report.database.status).toBe('ok');
      expect(report.queue.status).toBe('down');
    } finally {
      await health.close();
    }
  });

  it('Redis hanging: the check gives up after its timeout instead of waiting for ever', async () => {
    const hung = await silentPort();
    const health = new Health(ctx.knex, `redis://127.0.0.1:${hung.port}`, 400);
    try {
      const started = Date.now();
      const report = await health.check();
      const took = Date.now() - started;
      expect(report.queue.status).toBe('down');
      expect(report.ready).toBe(true);
      // Bounded by the 400 ms timeout (plus scheduling slack on a loaded machine), not by Redis.
      expect(took).toBeLessThan(3000);
    } finally {
      await health.close();
      await hung.close();
    }
  });

  it('database away: not ready', async () => {
    const port = await closedPort();
    const url = new URL(testConfig().DATABASE_URL);
    url.port = String(port);
    const deadKnex = createKnex(url.toString());
    const health = new Health(deadKnex, testConfig().REDIS_URL, 500);
    try {
      const report = await health.check();
      expect(report).toMatchObject({
        status: 'down',
        ready: false,
        database: { status: 'down' },
        queue: { status: 'ok' },
      });
      expect(report.database.reason).toBeTruthy();
    } finally {
      await health.close();
      await deadKnex.destroy();
    }
  });
});
