import { mkdtempSync, rmSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { account, signIn, type Agent } from '../helpers/server.ts';
import {
  pencilIn,
  startMailTestApp,
  waitForMailSettled,
  waitUntil,
  type MailTestContext,
  type TestPipeline,
} from '../helpers/mail.ts';
import { unbookJobs } from '../helpers/demo.ts';
import { startRedis, type RedisHandle } from '../../scripts/services/redis.ts';
import { run } from '../../scripts/services/shell.ts';
import { queueBookingMessage } from '../../server/services/outbox.ts';

// A private Redis for this file only, so stopping it leaves the shared test Redis alone.
const PORT = 63_905;
const dir = mkdtempSync(path.join(os.tmpdir(), 'waterline-redis-'));
let redis: RedisHandle;
let ctx: MailTestContext;
let scheduler: Agent;
let pipeline: TestPipeline;

const up = () => {
  try {
    return run('redis-cli', ['-p', String(PORT), 'ping']).trim() === 'PONG';
  } catch {
    return false;
  }
};
// The UID's domain is the host of this app's PUBLIC_URL (RFC 5545 §3.8.4.7).
const about = (bookingId: string) => (m: { attachments: { content: string }[] }) =>
  m.attachments.some((a) => a.content.includes(`booking-${bookingId}@plan.tideway.example`));

beforeAll(async () => {
  redis = await startRedis(dir, PORT);
  ctx = await startMailTestApp({ PUBLIC_URL: 'http://plan.tideway.example' });
  await unbookJobs(ctx.knex, 'TW-2417');
  pipeline = ctx.startPipeline(`redis://127.0.0.1:${PORT}/0`);
  scheduler = await signIn(ctx, account('scheduler').email);
});
afterAll(async () => {
  await ctx.close();
  await redis.stop();
  rmSync(dir, { recursive: true, force: true });
});

async function publish(job: string, startsAt: string, endsAt: string): Promise<string> {
  const b = await pencilIn(ctx.knex, { job, stage: 'lift', resource: '60 t mobile crane', startsAt, endsAt });
  await scheduler
    .post(`/api/bookings/${b.id}/publish`)
    .set('X-CSRF-Token', scheduler.csrf)
    .send({ version: 1 })
    .expect(200);
  return b.id;
}

describe('the outbox while Redis is down', () => {
  it('keeps the message, and sends exactly one once Redis is back', async () => {
    // Working normally first.
    const before = await publish('TW-2417', '2027-07-05T08:00:00Z', '2027-07-05T12:00:00Z');
    await ctx.inbox.waitFor(about(before));

    await redis.stop();
    expect(up()).toBe(false);
    const refusals = () =>
      pipeline.logs.filter((l) => l.msg.startsWith('outbox relay could not hand mail to the queue')).length;
    const refusedBefore = refusals();
    // Publishing needs only PostgreSQL: the request is written to the outbox in the same transaction.
    const during = await publish('TW-2422', '2027-07-06T08:00:00Z', '2027-07-06T12:00:00Z');
    // The relay has tried to hand this row to Redis and failed (it logs its first failure)…
    await waitUntil(() => refusals() > refusedBefore, 15_000, 'the relay to try and fail');
    // …and afterwards the row is still pending, to be handed over again.
    const row = await ctx.knex('outbox').whereRaw("payload->>'bookingId' = ?", [during]).first();
    expect(row.status).toBe('pending');
    expect((await ctx.inbox.list()).filter(about(during))).toHaveLength(0);

    redis = await startRedis(dir, PORT);
    const mails = await ctx.inbox.waitFor(about(during), 1, 30_000);
    expect(mails).toHaveLength(1);
    await waitUntil(
      async () => (await ctx.knex('outbox').where('id', row.id).first()).status === 'sent',
      10_000,
      'row sent',
    );
    await waitForMailSettled(ctx, pipeline);
    expect((await ctx.inbox.list()).filter(about(during))).toHaveLength(1);
    expect((await ctx.inbox.list()).filter(about(before))).toHaveLength(1);
  }, 90_000);

  it('hands a row over again when its job died with Redis (a restart without persistence), and sends it once', async () => {
    const b = await pencilIn(ctx.knex, {
      job: 'TW-2423',
      stage: 'lift',
      resource: '60 t mobile crane',
      startsAt: '2027-07-07T08:00:00Z',
      endsAt: '2027-07-07T12:00:00Z',
      state: 'sent',
    });
    // As a restarted Redis leaves it: the row says queued a while ago, and no job exists for it.
    // Written queued in the one transaction, so the running relay never sees it pending and hands
    // it over itself first.
    const row = await ctx.knex.transaction(async (trx) => {
      await queueBookingMessage(trx, { bookingId: b.id, kind: 'request', version: 1 });
      const written = await trx('outbox').whereRaw("payload->>'bookingId' = ?", [b.id]).first();
      await trx('outbox')
        .where('id', written.id)
        .update({ status: 'queued', next_attempt_at: new Date(Date.now() - 3_600_000) });
      return written;
    });
    expect(await pipeline.relay.requeueStale()).toBe(1);
    await waitUntil(
      async () => (await ctx.knex('outbox').where('id', row.id).first()).status === 'sent',
      10_000,
      'row sent',
    );
    await waitForMailSettled(ctx, pipeline);
    expect((await ctx.inbox.list()).filter(about(b.id))).toHaveLength(1);
    // Nothing is stale any more.
    expect(await pipeline.relay.requeueStale()).toBe(0);
  });
});
