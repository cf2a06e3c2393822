import { randomUUID } from 'node:crypto';
import { Queue } from 'bullmq';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import {
  account,
  idOf,
  openBoardStream,
  sessionCookieOf,
  signIn,
  type Agent,
  type StreamReader,
} from '../helpers/server.ts';
import { startMailTestApp, type MailTestContext } from '../helpers/mail.ts';
import { makeJob } from '../helpers/flows.ts';
import { assertFreshBuild, startNode, startWeb, until, WORKER_ENTRY, type Started } from '../helpers/processes.ts';
import { QUEUE_PREFIX, redisConnection } from '../../workers/connection.ts';
import type { MailJobData } from '../../workers/relay.ts';
import type { InboxMessage } from '../../scripts/fakes/smtp-inbox.ts';

/**
 * Scaled out as README's production section describes it: two web processes (as behind a load
 * balancer, no sticky sessions) and two workers, all the compiled build under plain node, over one
 * PostgreSQL and one Redis. Bookings, the live stream, rate limits and e-mail must behave as with
 * one process of each: no lost stream event, no e-mail twice, one shared rate-limit count, one
 * winner of two conflicting writes; and a worker that dies leaves its mail to the other.
 */

/** Every process's public address, as behind one load balancer; e-mail links and UIDs are built on it. */
const PUBLIC_URL = 'http://plan.scale-out.example';
const FEED_LIMIT = 3;

let ctx: MailTestContext;
let queue: Queue<MailJobData>;
let webA: Started & { url: string; port: number };
let webB: Started & { url: string; port: number };
const workers: Started[] = [];
let onA: Agent;
let onB: Agent;
let stream: StreamReader;
let crane = '';
let jobs = 0;

beforeAll(async () => {
  assertFreshBuild();
  ctx = await startMailTestApp({ PUBLIC_URL });
  queue = new Queue<MailJobData>(ctx.config.MAIL_QUEUE, {
    connection: redisConnection(ctx.config.REDIS_URL),
    prefix: QUEUE_PREFIX,
  });
  crane = await idOf(ctx.knex, 'resources', { name: '60 t mobile crane' });
  const env = {
    PUBLIC_URL,
    MAIL_QUEUE: ctx.config.MAIL_QUEUE,
    LOG_LEVEL: 'info',
    // One rate-limit key space for the four processes, as one deployment has; sign-ins unlimited here.
    RATE_LIMIT_PREFIX: `waterline-test:scale-out:${randomUUID()}`,
    FEED_RATE_LIMIT: String(FEED_LIMIT),
    SIGN_IN_RATE_LIMIT: '10000',
  };
  [webA, webB] = await Promise.all([startWeb('web A', env), startWeb('web B', env)]);
  for (const name of ['worker 1', 'worker 2']) workers.push(startNode(name, WORKER_ENTRY, env));
  await Promise.all(
    workers.map((w) =>
      until(`${w.name} to start`, () => w.output().includes('mail worker started'), 120_000, w.output),
    ),
  );
  onA = await signIn({ waterline: { app: webA.url } }, account('scheduler').email);
  onB = await signIn({ waterline: { app: webB.url } }, account('scheduler').email);
  stream = await openBoardStream(onA, webA.port);
}, 300_000);

afterAll(async () => {
  stream?.close();
  await Promise.all([webA, webB, ...workers].filter(Boolean).map((p) => p.stop('SIGTERM')));
  await queue?.close();
  await ctx?.close();
});

/** A new job of Tideway's with one two-hour crane lift, booked through `agent` on `day` and sent to the crane firm. */
async function bookAndSend(agent: Agent, day: string): Promise<string> {
  jobs += 1;
  const job = await makeJob(ctx.knex, {
    reference: `SO-${jobs}`,
    stages: [{ kind: 'lift', name: 'Crane lift', minutes: 120, needs: { crane: 1 } }],
    links: [],
  });
  const booked = await agent
    .post('/api/bookings')
    .set('X-CSRF-Token', agent.csrf)
    .send({ stageId: job.stage.lift, resourceId: crane, startsAt: `${day}T09:00:00Z`, endsAt: `${day}T11:00:00Z` });
  expect(booked.status, JSON.stringify(booked.body)).toBe(201);
  const { id, version } = booked.body.bookings[0] as { id: string; version: number };
  await agent.post(`/api/bookings/${id}/publish`).set('X-CSRF-Token', agent.csrf).send({ version }).expect(200);
  return String(id);
}

/** Working days from Monday 6 September 2027 on (no bank holiday among them in England). */
function workingDays(from: number, count: number): string[] {
  const days: string[] = [];
  for (let d = new Date(Date.UTC(2027, 8, 6 + from)); days.length < count; d = new Date(d.getTime() + 86_400_000)) {
    if (d.getUTCDay() !== 0 && d.getUTCDay() !== 6) days.push(d.toISOString().slice(0, 10));
  }
  return days;
}

/** The request e-mails in the inbox about a booking (its invite's UID, RFC 5545 §3.8.4.7, is on PUBLIC_URL's host). */
const about = (id: string) => (m: InboxMessage) =>
  m.attachments.some((a) => a.content.includes(`UID:booking-${id}@plan.scale-out.example`));

/** Until every outbox row of these bookings is sent and the queue holds nothing waiting, running or delayed. */
async function mailSettled(ids: string[], timeoutMs: number): Promise<void> {
  await until(
    'the mail to settle',
    async () => {
      const open = await ctx
        .knex('outbox')
        .whereRaw("payload->>'bookingId' = ANY(?)", [ids])
        .whereNot('status', 'sent')
        .count<{ n: string }[]>('* as n');
      if (Number(open[0]!.n) > 0) return false;
      const counts = await queue.getJobCounts('waiting', 'active', 'delayed', 'prioritized', 'waiting-children');
      return Object.values(counts).every((n) => n === 0);
    },
    timeoutMs,
    () => workers.map((w) => `${w.name}:\n${w.output()}`).join('\n'),
  );
}

describe('two web processes and two workers over one PostgreSQL and Redis', () => {
  it('share sessions: signed in on A, the same cookie is signed in on B', async () => {
    const res = await fetch(`${webB.url}/api/session`, { headers: { cookie: sessionCookieOf(onA) } });
    expect(res.status).toBe(200);
    expect(await res.json()).toMatchObject({ user: { email: account('scheduler').email } });
  });

  const sent: string[] = [];
  it('bookings written through B reach the stream open on A, every one, and each request e-mail goes out once', async () => {
    for (const day of workingDays(0, 8)) sent.push(await bookAndSend(onB, day));

    // Every committed change to a booking (an audit row each) is heard on A, none lost.
    const audits = await ctx
      .knex('audit_log')
      .where('entity', 'booking')
      .whereIn('entity_id', sent)
      .select('entity_id');
    const expected = new Map(sent.map((id) => [id, audits.filter((a) => String(a.entityId) === id).length]));
    expect([...expected.values()].every((n) => n >= 2)).toBe(true); // booked, then sent
    const heard = (text: string, id: string) =>
      text.split(`event: bookings\ndata: {"bookingId":"${id}"}\n\n`).length - 1;
    const allHeard = stream.until((t) => sent.every((id) => heard(t, id) >= expected.get(id)!));
    const text = await Promise.race([
      allHeard,
      new Promise<string>((r) => setTimeout(() => r(stream.text()), 15_000).unref()),
    ]);
    expect(Object.fromEntries(sent.map((id) => [id, heard(text, id)]))).toEqual(Object.fromEntries(expected));
    expect(stream.text()).not.toContain('event: resync');

    // One request e-mail per booking, whichever worker's relay and mail worker took it.
    await ctx.inbox.waitFor((m) => sent.some((id) => about(id)(m)), sent.length, 30_000);
    await mailSettled(sent, 30_000);
    const inbox = await ctx.inbox.list();
    expect(sent.map((id) => inbox.filter(about(id)).length)).toEqual(sent.map(() => 1));
  }, 90_000);

  it('count one rate limit across both: hit alternately, refused after the same count as one process', async () => {
    const statuses: number[] = [];
    for (let i = 0; i < FEED_LIMIT + 3; i += 1) {
      const res = await fetch(`${i % 2 === 0 ? webA.url : webB.url}/feeds/unknown-${i}.ics`);
      statuses.push(res.status);
    }
    expect(statuses).toEqual([...Array<number>(FEED_LIMIT).fill(404), 429, 429, 429]);
  });

  it('give one of two conflicting writes at once, one on A and one on B, and refuse the other with 409', async () => {
    jobs += 1;
    const job = await makeJob(ctx.knex, {
      reference: `SO-${jobs}`,
      stages: [{ kind: 'handover', name: 'Handover', minutes: 60, needs: { install_crew: 1 } }],
      links: [],
    });
    const otter = await idOf(ctx.knex, 'resources', { name: 'Crew Otter' });
    const booked = await onA
      .post('/api/bookings')
      .set('X-CSRF-Token', onA.csrf)
      .send({ stageId: job.stage.handover, resourceId: otter, startsAt: '2027-10-04T09:00:00Z' });
    expect(booked.status, JSON.stringify(booked.body)).toBe(201);
    const { id, version } = booked.body.bookings[0] as { id: string; version: number };
    const move = (agent: Agent, hour: string) =>
      agent
        .patch(`/api/bookings/${id}`)
        .set('X-CSRF-Token', agent.csrf)
        .send({
          version,
          startsAt: `2027-10-05T${hour}:00:00Z`,
          endsAt: `2027-10-05T${String(Number(hour) + 1).padStart(2, '0')}:00:00Z`,
        });
    const [a, b] = await Promise.all([move(onA, '09'), move(onB, '13')]);
    expect([a.status, b.status].sort(), JSON.stringify([a.body, b.body])).toEqual([200, 409]);
    const winner = a.status === 200 ? '09' : '13';
    const row = await ctx.knex('bookings').where('id', id).first('version', 'starts_at');
    expect(row.version).toBe(version + 1);
    expect((row.startsAt as Date).toISOString()).toBe(`2027-10-05T${winner}:00:00.000Z`);
  });

  it('a worker killed mid-run leaves its mail to the other, which sends all of it', async () => {
    const [dying, survivor] = workers as [Started, Started];
    // Both paused while the bookings are sent, then only the dying worker goes on: all this mail is
    // in its hands at once. The mail server puts off the first three messages (451), which wait a
    // second for their retry.
    survivor.child.kill('SIGSTOP');
    dying.child.kill('SIGSTOP');
    const more: string[] = [];
    let heldAtDeath = new Set<string>();
    try {
      await ctx.inbox.failNext(3);
      for (const day of workingDays(10, 6)) more.push(await bookAndSend(onB, day));
      dying.child.kill('SIGCONT');
      // Mid-run: the first of this mail is out. Frozen there, the worker is looked at, then killed.
      await ctx.inbox.waitFor((m) => more.some((id) => about(id)(m)), 1, 30_000);
      dying.child.kill('SIGSTOP');
      // Jobs it holds stay "active" until the survivor finds them stalled (BullMQ's lock, 30 s by
      // default) and runs them again.
      heldAtDeath = new Set((await queue.getActive()).map((j) => String(j.data.outboxId)));
      await dying.stop('SIGKILL');
    } finally {
      survivor.child.kill('SIGCONT');
    }
    const before = await ctx.inbox.list();
    const outBeforeDeath = more.filter((id) => before.some(about(id))).length;
    // What the survivor has to do: the put-off messages at least.
    expect(outBeforeDeath).toBeLessThanOrEqual(more.length - 3);

    await mailSettled(more, 90_000);
    const inbox = await ctx.inbox.list();
    const rows = await ctx.knex('outbox').whereRaw("payload->>'bookingId' = ANY(?)", [more]).select('id', 'payload');
    for (const id of more) {
      const count = inbox.filter(about(id)).length;
      const outboxId = String(rows.find((r) => String((r.payload as { bookingId: string }).bookingId) === id)!.id);
      // At least once always; a second copy only for a job the dead worker held mid-send (between
      // the mail server's acceptance and marking the row sent), never for any other.
      if (heldAtDeath.has(outboxId)) expect([1, 2], `booking ${id}`).toContain(count);
      else expect(count, `booking ${id}`).toBe(1);
    }
    expect(survivor.child.exitCode).toBeNull();
  }, 150_000);
});
