import { afterEach, describe, expect, it } from 'vitest';
import { createServer, type Server, type Socket } from 'node:net';
import { randomUUID } from 'node:crypto';
import express from 'express';
import request from 'supertest';
import RedisMock from 'ioredis-mock';
import pino from 'pino';
import {
  addressKey,
  createRateLimits,
  type RateLimits,
  type RateLimitSettings,
} from '../../../server/middleware/rate-limit.ts';
import { errorHandler } from '../../../server/errors.ts';

const WINDOW = 900;

function settings(overrides: Partial<RateLimitSettings> = {}): RateLimitSettings {
  return {
    REDIS_URL: 'redis://127.0.0.1:6379',
    RATE_LIMIT_PREFIX: `unit:${randomUUID()}`,
    RATE_LIMIT_WINDOW_SECONDS: WINDOW,
    SIGN_IN_RATE_LIMIT: 3,
    ANSWER_LINK_RATE_LIMIT: 2,
    INVITE_LINK_RATE_LIMIT: 2,
    FEED_RATE_LIMIT: 2,
    ...overrides,
  };
}

/** A small app with the budgets where the web app puts them; /answer/good answers 200, any other token 400. */
function appWith(limits: RateLimits) {
  const app = express();
  app.get('/auth/google', limits.signIn.count, (_req, res) => {
    res.redirect('https://provider.example/authorize');
  });
  app.use('/answer', limits.answerLinks.count);
  app.use('/invite', limits.inviteLinks.count);
  app.get('/answer/:token', (req, res) => {
    res.status(req.params.token === 'good' ? 200 : 400).send('page');
  });
  app.get('/invite/:token', (_req, res) => {
    res.status(400).send('refused');
  });
  app.use(errorHandler);
  return app;
}

const open: RateLimits[] = [];
afterEach(async () => {
  await Promise.all(open.splice(0).map((l) => l.close()));
});

describe('addressKey', () => {
  it('keys IPv4 by the address, IPv4-mapped IPv6 by its IPv4, IPv6 by its /56', () => {
    expect(addressKey('203.0.113.7')).toBe('203.0.113.7');
    expect(addressKey('::ffff:203.0.113.7')).toBe('203.0.113.7');
    expect(addressKey('2001:db8:1234:5678::1')).toBe('2001:0db8:1234:5600::/56');
    expect(addressKey('2001:db8:1234:56ff:abcd:ef01:2345:6789')).toBe('2001:0db8:1234:5600::/56');
    expect(addressKey('2001:db8:1234:5778::1')).toBe('2001:0db8:1234:5700::/56');
    expect(addressKey('fe80::1%eth0')).toBe('fe80:0000:0000:0000::/56');
    expect(addressKey(undefined)).toBe('unknown');
  });
});

describe('a budget over Redis (ioredis-mock)', () => {
  it('counts down in the RateLimit header, then refuses with 429 problem+json and Retry-After', async () => {
    const redis = new RedisMock();
    const config = settings();
    const limits = createRateLimits(config, { redis });
    open.push(limits);
    const app = appWith(limits);

    const remaining: string[] = [];
    for (let i = 0; i < 3; i += 1) {
      const ok = await request(app).get('/auth/google').expect(302);
      expect(ok.headers['ratelimit-policy']).toBe(`3;w=${WINDOW}`);
      remaining.push(/remaining=(\d+)/.exec(String(ok.headers.ratelimit))?.[1] ?? '?');
    }
    expect(remaining).toEqual(['2', '1', '0']);

    const refused = await request(app).get('/auth/google').expect(429);
    expect(refused.headers['content-type']).toMatch(/^application\/problem\+json/);
    expect(refused.body).toEqual({
      type: '/problems/rate-limited',
      title: 'Too many sign-in attempts',
      status: 429,
      detail: 'Too many sign-in attempts came from your address. Try again in 15 minutes.',
      instance: '/auth/google',
    });
    const retryAfter = Number(refused.headers['retry-after']);
    expect(retryAfter).toBeGreaterThan(WINDOW - 30);
    expect(retryAfter).toBeLessThanOrEqual(WINDOW);
    // The count lives in Redis under the configured prefix, keyed by the client address.
    expect(await redis.get(`${config.RATE_LIMIT_PREFIX}:sign-in:127.0.0.1`)).toBe('4');
  });

  it('shows a browser a short page instead of JSON', async () => {
    const limits = createRateLimits(settings({ SIGN_IN_RATE_LIMIT: 1 }), { redis: new RedisMock() });
    open.push(limits);
    const app = appWith(limits);
    await request(app).get('/auth/google').set('Accept', 'text/html').expect(302);
    const refused = await request(app)
      .get('/auth/google')
      .set('Accept', 'text/html,application/xhtml+xml,*/*;q=0.8')
      .expect(429);
    expect(refused.headers['content-type']).toMatch(/^text\/html/);
    expect(refused.text).toContain('<h1>Too many sign-in attempts</h1>');
    expect(refused.text).toContain('Try again in 15 minutes.');
    expect(Number(refused.headers['retry-after'])).toBeGreaterThan(WINDOW - 30);
  });

  it('gives a good link its point back, so only refused links use the budget', async () => {
    const redis = new RedisMock();
    const config = settings();
    const limits = createRateLimits(config, { redis });
    open.push(limits);
    const app = appWith(limits);
    // Five good links against a budget of two.
    for (let i = 0; i < 5; i += 1) await request(app).get('/answer/good').expect(200);
    // The point comes back once the response has gone.
    await expect.poll(() => redis.get(`${config.RATE_LIMIT_PREFIX}:answer-link:127.0.0.1`)).toBe('0');
    const statuses = [];
    for (let i = 0; i < 3; i += 1) statuses.push((await request(app).get(`/answer/forged-${i}`)).status);
    expect(statuses).toEqual([400, 400, 429]);
  });

  it('keeps answer links and invitations in separate budgets', async () => {
    const limits = createRateLimits(settings(), { redis: new RedisMock() });
    open.push(limits);
    const app = appWith(limits);
    await request(app).get('/answer/x').expect(400);
    await request(app).get('/answer/y').expect(400);
    await request(app).get('/answer/z').expect(429);
    await request(app).get('/invite/x').expect(400);
    await request(app).get('/invite/y').expect(400);
    const refused = await request(app).get('/invite/z').expect(429);
    expect(refused.body.title).toBe('Too many refused links');
    expect(refused.body.detail).toMatch(/^Too many invitation links/);
  });

  it('two processes over one Redis share one budget', async () => {
    const redis = new RedisMock();
    const config = settings();
    const first = createRateLimits(config, { redis });
    const second = createRateLimits(config, { redis });
    open.push(first, second);
    const [a, b] = [appWith(first), appWith(second)];
    await request(a).get('/auth/google').expect(302);
    await request(b).get('/auth/google').expect(302);
    await request(a).get('/auth/google').expect(302);
    await request(b).get('/auth/google').expect(429);
  });
});

describe('when Redis does not answer', () => {
  let server: Server | undefined;
  const sockets = new Set<Socket>();
  afterEach(async () => {
    for (const s of sockets) s.destroy();
    await new Promise((r) => (server ? server.close(r) : r(null)));
    server = undefined;
  });

  /**
   * A hung Redis: a TCP server that takes connections and never answers, or (`handshake`) one that
   * answers the connection's set-up and the ready check, then never answers a script (the counting).
   */
  async function hungRedis({ handshake }: { handshake: boolean }): Promise<{ url: string; scripts: () => number }> {
    let scripts = 0;
    server = createServer((s) => {
      sockets.add(s);
      s.on('close', () => sockets.delete(s));
      let buffered = '';
      s.on('data', (chunk: Buffer) => {
        if (!handshake) return;
        buffered += chunk.toString('latin1');
        // RESP: *<n>\r\n then n bulk strings $<len>\r\n<bytes>\r\n; only the command name matters here.
        for (let m = /^\*(\d+)\r\n/.exec(buffered); m; m = /^\*(\d+)\r\n/.exec(buffered)) {
          let at = m[0].length;
          const parts: string[] = [];
          for (let i = 0; i < Number(m[1]); i += 1) {
            const head = /^\$(\d+)\r\n/.exec(buffered.slice(at));
            if (!head || buffered.length < at + head[0].length + Number(head[1]) + 2) return;
            parts.push(buffered.slice(at + head[0].length, at + head[0].length + Number(head[1])));
            at += head[0].length + Number(head[1]) + 2;
          }
          buffered = buffered.slice(at);
          const name = parts[0]?.toLowerCase();
          if (name === 'evalsha' || name === 'eval') scripts += 1;
          else if (name === 'info') {
            const info = 'redis_version:7.0.0\r\nloading:0\r\n';
            s.write(`$${info.length}\r\n${info}\r\n`);
          } else s.write('+OK\r\n');
        }
      });
    });
    await new Promise<void>((r) => server!.listen(0, '127.0.0.1', r));
    const { port } = server.address() as { port: number };
    return { url: `redis://127.0.0.1:${port}`, scripts: () => scripts };
  }

  async function closedPort(): Promise<number> {
    const s = createServer();
    await new Promise<void>((r) => s.listen(0, '127.0.0.1', r));
    const { port } = s.address() as { port: number };
    await new Promise((r) => s.close(r));
    return port;
  }

  function capturingLogger() {
    const lines: { level: number; msg: string; limit?: string }[] = [];
    return {
      lines,
      logger: pino(
        { level: 'warn' },
        {
          write: (line: string) => {
            lines.push(JSON.parse(line));
          },
        },
      ),
    };
  }

  it('still serves at once when nothing listens, counting in this process and warning once', async () => {
    const { lines, logger } = capturingLogger();
    const limits = createRateLimits(settings({ REDIS_URL: `redis://127.0.0.1:${await closedPort()}` }), { logger });
    open.push(limits);
    const app = appWith(limits);
    const started = Date.now();
    const statuses = [];
    for (let i = 0; i < 4; i += 1) statuses.push((await request(app).get('/auth/google')).status);
    expect(Date.now() - started).toBeLessThan(1_000);
    // The budget still holds, per process, while Redis is away.
    expect(statuses).toEqual([302, 302, 302, 429]);
    expect(lines.filter((l) => l.level === 40).map((l) => [l.limit, l.msg])).toEqual([
      ['sign-in', 'rate limits are counted in this process only: Redis is not answering'],
    ]);
  });

  it('does not wait on a Redis that accepts the connection but never answers', async () => {
    const { url } = await hungRedis({ handshake: false });
    const limits = createRateLimits(settings({ REDIS_URL: url }));
    open.push(limits);
    const app = appWith(limits);
    await expect.poll(() => sockets.size).toBe(1);
    const started = Date.now();
    await request(app).get('/auth/google').expect(302);
    await request(app).get('/answer/good').expect(200);
    // At most the one-second wait for a starting process's first connection, not a hang.
    expect(Date.now() - started).toBeLessThan(1_500);
  });

  it('gives up on a count Redis does not answer within half a second, and counts in memory', async () => {
    const { url, scripts } = await hungRedis({ handshake: true });
    const { lines, logger } = capturingLogger();
    const limits = createRateLimits(settings({ REDIS_URL: url, SIGN_IN_RATE_LIMIT: 1 }), { logger });
    open.push(limits);
    const app = appWith(limits);
    const started = Date.now();
    await request(app).get('/auth/google').expect(302);
    expect(scripts()).toBe(1);
    await request(app).get('/auth/google').expect(429);
    expect(Date.now() - started).toBeLessThan(2_000);
    expect(lines.map((l) => l.msg)).toEqual(['rate limits are counted in this process only: Redis is not answering']);
  });
});
