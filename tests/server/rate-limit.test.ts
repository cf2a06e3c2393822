import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { spawn, type ChildProcess } from 'node:child_process';
import { createServer } from 'node:net';
import { randomUUID } from 'node:crypto';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import request from 'supertest';
import { Redis } from 'ioredis';
import type { Config } from '../../server/config.ts';
import { createApp, type WaterlineApp } from '../../server/app.ts';
import { LinkSigner } from '../../server/services/links.ts';
import { account, signIn, startTestApp, testConfig, TEST_TODAY, type TestContext } from '../helpers/server.ts';

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..', '..');

let ctx: TestContext;
let redis: Redis;
const apps: WaterlineApp[] = [];
beforeAll(async () => {
  ctx = await startTestApp();
  redis = new Redis(ctx.config.REDIS_URL);
});
afterAll(async () => {
  await Promise.all(apps.map((a) => a.close()));
  redis.disconnect();
  await ctx.close();
});

/** Another web app over the seeded test database, with its own settings (and its own Redis keys). */
function appWith(overrides: Record<string, string>): WaterlineApp & { config: Config } {
  const config = testConfig(overrides);
  const waterline = createApp({ config, knex: ctx.knex, now: () => TEST_TODAY.getTime() });
  apps.push(waterline);
  return { ...waterline, config };
}

async function freePort(): Promise<number> {
  const s = createServer();
  await new Promise<void>((r) => s.listen(0, '127.0.0.1', r));
  const { port } = s.address() as { port: number };
  await new Promise((r) => s.close(r));
  return port;
}

describe('the sign-in budget', () => {
  it('charges a whole sign-in (redirect, provider, callback) once', async () => {
    const waterline = appWith({ SIGN_IN_RATE_LIMIT: '2' });
    await signIn({ ...ctx, waterline }, account('scheduler').email);
    // The sign-in above used one of two: one more start is allowed, the next is not.
    await request(waterline.app).get('/auth/google').expect(302);
    const refused = await request(waterline.app).get('/auth/google').expect(429);
    expect(refused.body).toMatchObject({
      type: `${ctx.config.PUBLIC_URL}/problems/rate-limited`,
      status: 429,
      title: 'Too many sign-in attempts',
    });
  });

  it('charges a callback with a forged state, and refuses them past the budget', async () => {
    const waterline = appWith({ SIGN_IN_RATE_LIMIT: '2' });
    const forged = '/auth/google/callback?code=forged&state=forged';
    expect((await request(waterline.app).get(forged).expect(302)).headers.location).toBe(
      '/sign-in?error=sign_in_failed',
    );
    expect((await request(waterline.app).get(forged).expect(302)).headers.location).toBe(
      '/sign-in?error=sign_in_failed',
    );
    const refused = await request(waterline.app).get(forged).expect(429);
    expect(refused.body).toMatchObject({ status: 429, title: 'Too many sign-in attempts' });
    expect(Number(refused.headers['retry-after'])).toBeGreaterThan(0);
    // Same budget as starting a sign-in.
    await request(waterline.app).get('/auth/google').expect(429);
  });
});

describe('the client address', () => {
  it('is the socket address by default: X-Forwarded-For does not pick the bucket', async () => {
    const waterline = appWith({ SIGN_IN_RATE_LIMIT: '2' });
    await request(waterline.app).get('/auth/google').set('X-Forwarded-For', '198.51.100.1').expect(302);
    await request(waterline.app).get('/auth/google').set('X-Forwarded-For', '198.51.100.2').expect(302);
    await request(waterline.app).get('/auth/google').set('X-Forwarded-For', '198.51.100.3').expect(429);
  });

  it('comes from X-Forwarded-For when the proxy it passed through is trusted (TRUST_PROXY)', async () => {
    const waterline = appWith({ SIGN_IN_RATE_LIMIT: '2', TRUST_PROXY: 'loopback' });
    const from = (address: string) => request(waterline.app).get('/auth/google').set('X-Forwarded-For', address);
    await from('198.51.100.1').expect(302);
    await from('198.51.100.1').expect(302);
    await from('198.51.100.1').expect(429);
    await from('198.51.100.2').expect(302);
  });
});

describe('public links', () => {
  it('refuse forged answer tokens past the budget before they write a link_attempts row; good links are free', async () => {
    const waterline = appWith({ ANSWER_LINK_RATE_LIMIT: '5' });
    const booking = await ctx.knex('bookings').first('id', 'version');
    const good = await new LinkSigner(ctx.config.LINK_SECRET).signAnswer({
      bookingId: String(booking.id),
      version: booking.version,
      action: 'decline',
      expiresAt: new Date(Date.now() + 3_600_000),
    });
    // More good links than the budget: each gives its point back (in Redis, once its response has gone).
    for (let i = 0; i < 7; i += 1) await request(waterline.app).get(`/answer/${good}`).expect(200);
    await expect.poll(() => redis.get(`${waterline.config.RATE_LIMIT_PREFIX}:answer-link:127.0.0.1`)).toBe('0');

    const before = Number((await ctx.knex('link_attempts').count({ n: '*' }).first())?.n);
    // A burst of forged tokens at once: only the budget's worth gets through to the token check.
    const burst = await Promise.all(
      Array.from({ length: 12 }, (_, i) =>
        request(waterline.app).get(`/answer/forged-${i}`).set('Accept', 'application/json'),
      ),
    );
    const statuses = burst.map((r) => r.status).sort();
    expect(statuses).toEqual([...Array<number>(5).fill(400), ...Array<number>(7).fill(429)]);
    const after = Number((await ctx.knex('link_attempts').count({ n: '*' }).first())?.n);
    expect(after - before).toBe(5);

    const refused = burst.find((r) => r.status === 429)!;
    expect(refused.headers['content-type']).toMatch(/^application\/problem\+json/);
    expect(refused.body).toMatchObject({
      type: `${ctx.config.PUBLIC_URL}/problems/rate-limited`,
      title: 'Too many refused links',
      status: 429,
    });
    expect(refused.body.detail).toMatch(
      /^Too many answer links from your address were not valid\. Try again in \d+ minutes\.$/,
    );
    expect(Number(refused.headers['retry-after'])).toBeGreaterThan(0);

    // A person in a browser gets a short page; invitations and feeds have budgets of their own.
    const page = await request(waterline.app).get('/answer/forged-x').set('Accept', 'text/html').expect(429);
    expect(page.headers['content-type']).toMatch(/^text\/html/);
    expect(page.text).toContain('<h1>Too many refused links</h1>');
    await request(waterline.app).post('/answer/forged-x').type('form').send('date=2026-06-02').expect(429);
    await request(waterline.app).get('/invite/forged-x').expect(400);
    await request(waterline.app).get('/feeds/unknown-feed-token.ics').expect(404);
    expect(Number((await ctx.knex('link_attempts').count({ n: '*' }).first())?.n) - after).toBe(1);
  });

  it('keep the feed budget apart and refuse unknown feeds past it', async () => {
    const waterline = appWith({ FEED_RATE_LIMIT: '2' });
    await request(waterline.app).get('/feeds/unknown-1.ics').expect(404);
    await request(waterline.app).get('/feeds/unknown-2.ics').expect(404);
    const refused = await request(waterline.app).get('/feeds/unknown-3.ics').expect(429);
    expect(refused.body).toMatchObject({ status: 429, title: 'Too many unknown feeds' });
    await request(waterline.app).get('/answer/forged').expect(400);
  });
});

describe('without Redis', () => {
  it('the web app still serves, promptly, counting in its own memory', async () => {
    const waterline = appWith({ REDIS_URL: `redis://127.0.0.1:${await freePort()}/0`, SIGN_IN_RATE_LIMIT: '2' });
    const started = Date.now();
    await request(waterline.app).get('/auth/google').expect(302);
    await request(waterline.app).get('/auth/google').expect(302);
    await request(waterline.app).get('/auth/google').expect(429);
    await request(waterline.app).get('/answer/forged').expect(400);
    expect(Date.now() - started).toBeLessThan(2_000);
  });
});

describe('closing the app', () => {
  it('ends its rate-limit connection to Redis', async () => {
    const config = testConfig();
    const waterline = createApp({ config, knex: ctx.knex, now: () => TEST_TODAY.getTime() });
    const name = `name=${config.RATE_LIMIT_PREFIX}:limits `;
    await request(waterline.app).get('/answer/forged').expect(400);
    expect(await redis.client('LIST')).toContain(name);
    await waterline.close();
    await expect.poll(async () => String(await redis.client('LIST')).includes(name)).toBe(false);
  });
});

describe('two web processes over the real Redis', () => {
  const children: ChildProcess[] = [];
  afterAll(async () => {
    await Promise.all(
      children.map(
        (child) =>
          new Promise((resolve) => {
            if (child.exitCode !== null || child.signalCode !== null) return resolve(null);
            child.once('exit', resolve);
            child.kill('SIGTERM');
          }),
      ),
    );
  });

  async function startServer(env: NodeJS.ProcessEnv): Promise<string> {
    const port = await freePort();
    const url = `http://127.0.0.1:${port}`;
    const child = spawn(path.join(root, 'node_modules', '.bin', 'tsx'), ['server/index.ts'], {
      cwd: root,
      env: {
        ...process.env,
        ...env,
        PORT: String(port),
        HOST: '127.0.0.1',
        PUBLIC_URL: url,
        LOG_LEVEL: 'silent',
        RUN_WORKER: '0',
      },
      stdio: ['ignore', 'ignore', 'pipe'],
    });
    let stderr = '';
    child.stderr?.on('data', (d: Buffer) => {
      stderr += String(d);
    });
    children.push(child);
    await expect
      .poll(
        async () => {
          if (child.exitCode !== null) throw new Error(`the server on ${port} exited: ${stderr}`);
          return fetch(`${url}/api/health`).then(
            (r) => r.status,
            () => 0,
          );
        },
        { timeout: 45_000, interval: 100 },
      )
      .toBe(200);
    return url;
  }

  it('share one budget: with a limit of 5 the sixth sign-in is refused whichever process gets it', async () => {
    const env = { SIGN_IN_RATE_LIMIT: '5', RATE_LIMIT_PREFIX: `waterline-test:two-processes:${randomUUID()}` };
    const [a, b] = await Promise.all([startServer(env), startServer(env)]);
    const statuses: number[] = [];
    for (let i = 0; i < 8; i += 1) {
      const res = await fetch(`${i % 2 === 0 ? a : b}/auth/google`, { redirect: 'manual' });
      statuses.push(res.status);
      if (res.status === 429) {
        expect(res.headers.get('content-type')).toMatch(/^application\/problem\+json/);
        expect(Number(res.headers.get('retry-after'))).toBeGreaterThan(0);
      }
    }
    expect(statuses).toEqual([302, 302, 302, 302, 302, 429, 429, 429]);
    // One count in the shared Redis, not one per process.
    expect(await redis.get(`${env.RATE_LIMIT_PREFIX}:sign-in:127.0.0.1`)).toBe('8');
  }, 90_000);
});
