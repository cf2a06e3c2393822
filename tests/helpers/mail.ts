import pino from 'pino';
import ICAL from 'ical.js';
import type { Knex } from 'knex';
import { startTestApp, idOf, type TestContext } from './server.ts';
import { startMailPipeline, type MailPipeline } from '../../workers/pipeline.ts';
import type { InboxMessage } from '../../scripts/fakes/smtp-inbox.ts';

/** The fake inbox the test stack starts (scripts/fakes/smtp-inbox.ts), through its JSON API. */
export class Inbox {
  constructor(readonly url = process.env.FAKE_INBOX_URL ?? '') {
    if (!url) throw new Error('Mail tests need the fake inbox: run them with `node scripts/bootstrap.mjs test`.');
  }
  async list(): Promise<InboxMessage[]> {
    return ((await (await fetch(`${this.url}/api/messages`)).json()) as { items: InboxMessage[] }).items;
  }
  async clear(): Promise<void> {
    await fetch(`${this.url}/api/messages`, { method: 'DELETE' });
  }
  async failNext(count: number): Promise<void> {
    await fetch(`${this.url}/api/fail-next`, {
      method: 'POST',
      headers: { 'content-type': 'application/json' },
      body: JSON.stringify({ count }),
    });
  }
  /** Waits until `count` messages match, then returns them. */
  async waitFor(match: (m: InboxMessage) => boolean, count = 1, timeoutMs = 15_000): Promise<InboxMessage[]> {
    let found: InboxMessage[] = [];
    await waitUntil(
      async () => (found = (await this.list()).filter(match)).length >= count,
      timeoutMs,
      `${count} matching e-mail(s)`,
    );
    return found;
  }
}

export async function waitUntil(
  check: () => boolean | Promise<boolean>,
  timeoutMs = 15_000,
  what = 'condition',
): Promise<void> {
  const deadline = Date.now() + timeoutMs;
  while (Date.now() < deadline) {
    if (await check()) return;
    await new Promise((r) => setTimeout(r, 100));
  }
  throw new Error(`timed out waiting for ${what}`);
}

/** A pipeline under test, with what its relay and worker logged (pino records, newest last). */
export interface TestPipeline extends MailPipeline {
  logs: { level: number; msg: string; [key: string]: unknown }[];
}

export interface MailTestContext extends TestContext {
  inbox: Inbox;
  /** Starts the relay and mail worker against this test's queue (and optionally another Redis). */
  startPipeline(redisUrl?: string): TestPipeline;
}

/**
 * Waits until the mail pipeline has nothing left to do: no outbox row is pending or queued and the
 * BullMQ queue holds no waiting, active, delayed or prioritized job. After this no further e-mail
 * can arrive from what was queued before (the relay's stale-row scan runs hourly in tests), so an
 * inbox count taken then is final.
 */
export async function waitForMailSettled(
  ctx: Pick<TestContext, 'knex'>,
  pipeline: MailPipeline,
  timeoutMs = 15_000,
): Promise<void> {
  await waitUntil(
    async () => {
      const open = await ctx
        .knex('outbox')
        .whereIn('status', ['pending', 'queued'])
        .count<{ count: string }[]>('* as count');
      if (Number(open[0]!.count) > 0) return false;
      const counts = await pipeline.queue.getJobCounts(
        'waiting',
        'active',
        'delayed',
        'prioritized',
        'waiting-children',
      );
      return Object.values(counts).every((n) => n === 0);
    },
    timeoutMs,
    'the outbox and the mail queue to be idle',
  );
}

/**
 * A seeded app whose mail goes through the real relay, BullMQ and the fake SMTP inbox. Each file
 * gets its own queue name, so job ids (the outbox keys, which restart with the database) never
 * meet jobs another run left in Redis.
 */
export async function startMailTestApp(overrides: Record<string, string> = {}): Promise<MailTestContext> {
  const ctx = await startTestApp({ MAIL_QUEUE: `mail-test-${process.pid}-${Date.now()}`, ...overrides });
  // Tables without a foreign key to the demo rows are not emptied by the helper's cascade.
  await ctx.knex.raw('TRUNCATE outbox, link_uses, link_attempts RESTART IDENTITY');
  // The demo's open requests were sent the day before the test's today, which is months before the
  // real clock the relay's reminder scan reads: dated now, only the one the demo flagged is overdue.
  await ctx.knex('booking_requests').whereNull('overdue_at').update({ requested_at: ctx.knex.fn.now() });
  const inbox = new Inbox();
  await inbox.clear();
  const pipelines: TestPipeline[] = [];
  return {
    ...ctx,
    inbox,
    startPipeline(redisUrl?: string) {
      const config = redisUrl ? { ...ctx.config, REDIS_URL: redisUrl } : ctx.config;
      const logs: TestPipeline['logs'] = [];
      const logger = pino(
        { level: 'info' },
        {
          write: (line: string) => {
            logs.push(JSON.parse(line) as TestPipeline['logs'][number]);
          },
        },
      );
      const pipeline = {
        ...startMailPipeline({
          knex: ctx.knex,
          config,
          logger,
          relay: { idleMs: 50, maxBackoffMs: 1000, scanEveryMs: 3_600_000 },
        }),
        logs,
      };
      pipelines.push(pipeline);
      return pipeline;
    },
    async close() {
      for (const p of pipelines) {
        await p.close();
      }
      await ctx.close();
    },
  };
}

/** A pencilled booking of an unbooked tray job's stage on a named resource (demo scenario). */
export async function pencilIn(
  knex: Knex,
  input: { job: string; stage: string; resource: string; startsAt: string; endsAt: string; state?: string },
): Promise<{ id: string; version: number }> {
  const stageId = await idOf(knex, 'stages', {
    job_id: await idOf(knex, 'jobs', { reference: input.job }),
    kind: input.stage,
  });
  const [row] = await knex('bookings')
    .insert({
      stage_id: stageId,
      resource_id: await idOf(knex, 'resources', { name: input.resource }),
      starts_at: input.startsAt,
      ends_at: input.endsAt,
      state: input.state ?? 'pencilled',
    })
    .returning(['id', 'version']);
  return { id: String(row.id), version: row.version };
}

/** The three answer links in a request e-mail's plain text, by action. */
export function answerLinks(message: InboxMessage): { confirm: string; decline: string; propose: string } {
  const grab = (label: string) => {
    const m = new RegExp(`^${label}:\\n(\\S+)$`, 'm').exec(message.text);
    if (!m) throw new Error(`no ${label} link in "${message.subject}"`);
    return new URL(m[1]!).pathname;
  };
  return { confirm: grab('Confirm'), decline: grab('Decline'), propose: grab('Propose another time') };
}

/** The iCalendar part of a message, parsed by ical.js (an independent reader of RFC 5545). */
export function calendarOf(message: InboxMessage): {
  method: string;
  uid: string;
  sequence: number;
  start: Date;
  end: Date;
  status: string;
} {
  const part = message.attachments.find((a) => a.contentType.startsWith('text/calendar'));
  if (!part) throw new Error(`no text/calendar part in "${message.subject}"`);
  const cal = new ICAL.Component(ICAL.parse(part.content));
  const vevent = cal.getFirstSubcomponent('vevent');
  if (!vevent) throw new Error('no VEVENT');
  const event = new ICAL.Event(vevent);
  return {
    method: String(cal.getFirstPropertyValue('method')),
    uid: event.uid,
    sequence: event.sequence,
    start: event.startDate.toJSDate(),
    end: event.endDate.toJSDate(),
    status: String(vevent.getFirstPropertyValue('status')),
  };
}
