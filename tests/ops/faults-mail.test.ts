import pino from 'pino';
import { afterAll, afterEach, beforeAll, describe, expect, it } from 'vitest';
import { account, type Agent } from '../helpers/server.ts';
import { unbookJobs } from '../helpers/demo.ts';
import { pencilIn } from '../helpers/mail.ts';
import { startMailPipeline } from '../../workers/pipeline.ts';
import { LOST_CONFIRM_MS } from '../../workers/relay.ts';
import { call, freePort, startFaultStack, until, type FaultStack } from './fault-stack.ts';

/**
 * Mail through faults, on a stack of its own (tests/ops/fault-stack.ts):
 * - Redis stopped under `npm start`'s server with its in-process worker (RUN_WORKER=1): bookings
 *   still save, their e-mails wait in the outbox, and once Redis is back each goes out exactly once,
 *   including one whose queue job a restarted Redis (no persistence) had lost;
 * - SMTP refusing: the job is retried with growing pauses, then its row shows failed, and the
 *   office sees it in plain words.
 */

let stack: FaultStack;
let scheduler: Agent;

beforeAll(async () => {
  stack = await startFaultStack(
    `waterline_test_${process.env.WATERLINE_TEST_DB?.replace(/^waterline_test_/, '') ?? 'faults'}_mail`,
  );
  await stack.knex.raw('TRUNCATE outbox RESTART IDENTITY');
  // The demo's open requests are dated now, so the relay's reminder scan adds no mail of its own.
  await stack.knex('booking_requests').whereNull('overdue_at').update({ requested_at: stack.knex.fn.now() });
  await unbookJobs(stack.knex, 'TW-2417', 'TW-2419', 'TW-2420');
  scheduler = await stack.signIn(account('scheduler').email);
}, 300_000);
afterAll(async () => {
  await stack?.close();
}, 60_000);

const inboxControl = (path: string, body: object) =>
  fetch(`${stack.inbox.url}${path}`, {
    method: 'POST',
    headers: { 'content-type': 'application/json' },
    body: JSON.stringify(body),
  });
/** How many times each outbox row's message reached the inbox (its X-Waterline-Message header). */
const deliveries = () => {
  const counts: Record<string, number> = {};
  for (const m of stack.inbox.messages) {
    const key = m.headers['x-waterline-message'];
    if (key) counts[key] = (counts[key] ?? 0) + 1;
  }
  return counts;
};
const outbox = async () =>
  (await stack.knex('outbox').orderBy('id').select('id', 'idempotency_key', 'status', 'attempts', 'last_error')) as {
    id: string;
    idempotencyKey: string;
    status: string;
    attempts: number;
    lastError: string | null;
  }[];

async function publishLift(job: string, day: string): Promise<{ status: number; key: string }> {
  const b = await pencilIn(stack.knex, {
    job,
    stage: 'lift',
    resource: '60 t mobile crane',
    startsAt: `${day}T08:00:00Z`,
    endsAt: `${day}T12:00:00Z`,
  });
  const res = await call(stack, scheduler, 'POST', `/api/bookings/${b.id}/publish`, { version: b.version });
  const row = await stack.knex('outbox').whereRaw("payload->>'bookingId' = ?", [b.id]).first('idempotency_key');
  return { status: res.status, key: row?.idempotencyKey };
}

describe('Redis stopped under the server and its in-process worker', () => {
  afterEach(async () => {
    await stack.stopServer();
  }, 30_000);

  it('keeps saving bookings; their e-mails wait and go out exactly once when Redis is back, a lost queue job included', async () => {
    await stack.startServer();

    // A: handed to the queue while the mail server says "try later", so its job waits in Redis to be retried.
    await inboxControl('/api/fail-next', { count: 1000 });
    const a = await publishLift('TW-2417', '2027-03-10');
    expect(a.status).toBe(200);
    await until(
      'A to be tried once and wait for its retry',
      async () => (await outbox()).find((r) => r.idempotencyKey === a.key && r.status === 'queued' && r.lastError),
      20_000,
      stack.app!.output,
    );

    // Redis goes (and with it A's job: no persistence). Bookings still save; B and C wait as outbox rows.
    await stack.stopRedis();
    const b = await publishLift('TW-2419', '2027-03-15');
    const c = await publishLift('TW-2420', '2027-03-17');
    expect([b.status, c.status]).toEqual([200, 200]);
    expect((await outbox()).filter((r) => [b.key, c.key].includes(r.idempotencyKey)).map((r) => r.status)).toEqual([
      'pending',
      'pending',
    ]);
    const ready = (await (await fetch(`${stack.app!.url}/api/health/ready`)).json()) as {
      status: string;
      queue: { status: string };
    };
    expect(ready).toMatchObject({ status: 'degraded', queue: { status: 'down' } });
    expect(stack.inbox.messages).toHaveLength(0);

    await inboxControl('/api/fail-next', { count: 0 });
    await stack.startRedis();

    // Each of the three arrives; the relay found A's lost job and handed its row over again.
    let seen = '';
    await until(
      'all three e-mails',
      async () => {
        seen = JSON.stringify({ deliveries: deliveries(), outbox: await outbox() });
        return [a.key, b.key, c.key].every((k) => deliveries()[k]);
      },
      30_000,
      () => `${stack.app!.output().slice(-1500)}\n${seen}`,
    );
    await until('all three rows sent', async () => (await outbox()).every((r) => r.status === 'sent'), 10_000);
    // Exactly once: nothing more arrives after the relay's second look for lost jobs has passed.
    await new Promise((r) => setTimeout(r, LOST_CONFIRM_MS + 1000));
    expect(deliveries()).toEqual({ [a.key]: 1, [b.key]: 1, [c.key]: 1 });
  }, 240_000);
});

describe('a mail server that refuses', () => {
  it('retries with growing pauses, then shows the row failed to the office in plain words', async () => {
    stack.inbox.clear();
    const logs: { msg: string; time: number; attempt?: number; outboxId?: string }[] = [];
    const logger = pino(
      { level: 'info' },
      {
        write: (line: string) => {
          logs.push(JSON.parse(line) as (typeof logs)[number]);
        },
      },
    );
    // Nothing listens on this port: every connection is refused.
    const refusing = `smtp://127.0.0.1:${await freePort()}`;
    const pipeline = startMailPipeline({
      knex: stack.knex,
      config: { ...stack.config, SMTP_URL: refusing },
      logger,
      relay: { idleMs: 50, maxBackoffMs: 500, scanEveryMs: 3_600_000 },
      retry: { attempts: 4, backoff: { type: 'exponential', delay: 300 } },
    });
    try {
      await unbookJobs(stack.knex, 'TW-2417');
      const b = await pencilIn(stack.knex, {
        job: 'TW-2417',
        stage: 'lift',
        resource: '60 t mobile crane',
        startsAt: '2027-04-07T08:00:00Z',
        endsAt: '2027-04-07T12:00:00Z',
      });
      // Published through the in-process app of this stack (the same write path as the server's).
      const res = await scheduler
        .post(`/api/bookings/${b.id}/publish`)
        .set('X-CSRF-Token', scheduler.csrf)
        .send({ version: b.version });
      expect(res.status).toBe(200);
      const row = await stack.knex('outbox').whereRaw("payload->>'bookingId' = ?", [b.id]).first('id');
      let seen = '';
      const failed = await until(
        'the row to fail for good',
        async () => {
          const r = await stack.knex('outbox').where('id', row.id).first();
          seen = JSON.stringify({ r, counts: await pipeline.queue.getJobCounts(), logs: logs.slice(-8) });
          return r.status === 'failed' ? r : null;
        },
        20_000,
        () => seen,
      );
      expect(failed).toMatchObject({ attempts: 4, lastError: expect.stringMatching(/ECONNREFUSED/) });

      // Four tries, each pause longer than the one before (300 ms, 600 ms, 1200 ms: exponential back-off).
      const tries = logs.filter((l) => l.outboxId === String(row.id) && /e-mail failed/.test(l.msg));
      expect(tries.map((l) => l.attempt)).toEqual([1, 2, 3, 4]);
      expect(tries.at(-1)!.msg).toBe('e-mail failed for good');
      const gaps = tries.slice(1).map((l, i) => l.time - tries[i]!.time);
      expect(gaps[0]).toBeGreaterThanOrEqual(300);
      expect(gaps[1]).toBeGreaterThanOrEqual(600);
      expect(gaps[2]).toBeGreaterThanOrEqual(1200);
      expect(stack.inbox.messages).toHaveLength(0);

      const list = await scheduler
        .get(`/api/mail/undelivered?jobId=${(await stack.knex('jobs').where('reference', 'TW-2417').first('id')).id}`)
        .expect(200);
      expect(list.body.items).toEqual([
        expect.objectContaining({
          id: String(row.id),
          state: 'failed',
          jobReference: 'TW-2417',
          attempts: 4,
          to: 'Fellside Crane Hire (bookings@fellside.example, fiona.fell@fellside.example)',
          about: 'Booking request: Crane lift into pit, Bingley, Wed 7 Apr 2027',
          reason:
            'Our mail server could not be reached. Nothing is wrong with the address; send it again once mail is working.',
        }),
      ]);

      // Mail works again: "Send again", pressed twice at once, sends it once, with a fresh count of tries.
      await pipeline.close();
      const clicks = await Promise.all(
        [1, 2].map(() =>
          scheduler
            .post('/api/mail/send-again')
            .set('X-CSRF-Token', scheduler.csrf)
            .send({ id: String(row.id) }),
        ),
      );
      expect(clicks.map((c) => [c.status, c.body.requeued]).sort()).toEqual([
        [200, false],
        [200, true],
      ]);
      const working = startMailPipeline({
        knex: stack.knex,
        config: stack.config,
        logger,
        relay: { idleMs: 50, maxBackoffMs: 500, scanEveryMs: 3_600_000 },
      });
      try {
        await until(
          'the row to be sent',
          async () => (await stack.knex('outbox').where('id', row.id).first()).status === 'sent',
          20_000,
        );
        expect(await stack.knex('outbox').where('id', row.id).first('attempts', 'last_error')).toEqual({
          attempts: 1,
          lastError: null,
        });
        const key = (await stack.knex('outbox').where('id', row.id).first('idempotency_key')).idempotencyKey as string;
        expect(deliveries()).toEqual({ [key]: 1 });
      } finally {
        await working.close();
      }
    } finally {
      await pipeline.close();
    }
  }, 90_000);
});
