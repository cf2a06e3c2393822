import pg from 'pg';
import type { Knex } from 'knex';
import type { Request, Response } from 'express';
import { reachOf, type Actor } from './actor.ts';
import type { Role } from '../../shared/permissions.ts';
import { ownResourceIds } from '../models/base.ts';
import { mayHearOf, streamEvent, type BookingChange, type StreamReader } from './read-policy.ts';

const CHANNEL = 'board_changes';

/**
 * Tells the open boards about a booking change, inside the writing transaction: PostgreSQL
 * delivers the notification only when the transaction commits, to every server process listening.
 * The notification (server side only) names the installer whose job it is and the resource's
 * firm, so each process can hand it only to the streams allowed to hear of it.
 */
export async function notifyBookingChange(
  trx: Knex.Transaction,
  bookingId: string,
  stageId: string,
  resourceId: string,
): Promise<void> {
  await trx.raw(
    `SELECT pg_notify(?, json_build_object('bookingId', ?::text, 'resourceId', ?::text,
      'installerFirmId', (SELECT j.firm_id::text FROM stages s JOIN jobs j ON j.id = s.job_id WHERE s.id = ?),
      'resourceFirmId', (SELECT r.firm_id::text FROM resources r WHERE r.id = ?))::text)`,
    [CHANNEL, bookingId, resourceId, stageId, resourceId],
  );
}

/**
 * Tells the installer's office boards that a job changed without any booking changing (its order
 * date, which starts the maker's lead time): they reload. The event names no booking.
 */
export async function notifyJobChange(trx: Knex.Transaction, jobId: string): Promise<void> {
  await trx.raw(
    `SELECT pg_notify(?, json_build_object('bookingId', '', 'resourceId', '',
      'installerFirmId', (SELECT firm_id::text FROM jobs WHERE id = ?), 'resourceFirmId', (SELECT firm_id::text FROM jobs WHERE id = ?))::text)`,
    [CHANNEL, jobId, jobId],
  );
}

/**
 * Tells the boards that show a resource that its time changed without any booking changing (time
 * away marked or taken off): those of its own firm, and, for a partner firm's resource, of every
 * installer it works with. They reload. The event names no booking.
 */
export async function notifyResourceChange(trx: Knex.Transaction, resourceId: string): Promise<void> {
  await trx.raw(
    `SELECT pg_notify(?, json_build_object('bookingId', '', 'resourceId', r.id::text,
      'installerFirmId', f.firm_id::text, 'resourceFirmId', r.firm_id::text)::text)
     FROM resources r
     CROSS JOIN LATERAL (SELECT r.firm_id UNION SELECT p.installer_firm_id FROM partnerships p WHERE p.partner_firm_id = r.firm_id) f(firm_id)
     WHERE r.id = ?`,
    [CHANNEL, resourceId],
  );
}

/**
 * Tells the boards that show a firm's resources that its working days changed (the whole firm
 * closed, or opened again): its own, and every installer it works with as a partner. They reload.
 */
export async function notifyFirmChange(trx: Knex.Transaction, firmId: string): Promise<void> {
  await trx.raw(
    `SELECT pg_notify(?, json_build_object('bookingId', '', 'resourceId', '',
      'installerFirmId', f.firm_id::text, 'resourceFirmId', ?::text)::text)
     FROM (SELECT ?::bigint UNION SELECT p.installer_firm_id FROM partnerships p WHERE p.partner_firm_id = ?) f(firm_id)`,
    [CHANNEL, firmId, firmId, firmId],
  );
}

/** The LISTEN connection's `application_name` in pg_stat_activity. */
export const LISTENER_APPLICATION_NAME = 'waterline-board-stream';
/** How often open streams get a comment line, so proxies keep them open (common practice, no source). */
export const KEEP_ALIVE_MS = 25_000;
// A lost listener is reconnected after 0.5 s, then 1, 2, 4, 8 and at most 10 s between attempts.
const RECONNECT_MIN_MS = 500;
const RECONNECT_MAX_MS = 10_000;

interface Subscriber {
  reader: StreamReader;
  userId: string;
  /** The role the stream was opened in: a changed role ends it (the board reconnects in the new one). */
  role: Role;
  sessionId: string;
  res: Response;
}

/** The stored session as express-session keeps it (connect-pg-simple's `sess` column). */
interface StoredSession {
  userId?: string;
  firmId?: string;
}

/**
 * Server-sent events for the board. Each server process LISTENs on one PostgreSQL connection and
 * hands each change to its own open streams that may read the booking (read-policy.ts
 * `mayHearOf`), so boards served by different processes stay in step without sharing memory.
 * A stream lives only as long as its session: before each delivery, and at each keep-alive, the
 * session is looked up, and a stream whose session signed out, expired or switched firm is ended
 * (the browser's reconnection then meets 401 and stops); signing out here ends its streams at once.
 * A lost LISTEN connection is reconnected with a growing pause, and the streams open meanwhile get
 * `event: resync` (reload the board), since changes made while nobody listened were never heard.
 */
export class BoardStream {
  private readonly subscribers = new Set<Subscriber>();
  private client: pg.Client | null = null;
  private connecting: Promise<void> | null = null;
  private retry: ReturnType<typeof setTimeout> | null = null;
  private backoff = RECONNECT_MIN_MS;
  private closed = false;
  private heartbeat: ReturnType<typeof setInterval> | null = null;
  // Deliveries run one after another, so events keep the order PostgreSQL sent them in.
  private queue: Promise<void> = Promise.resolve();

  constructor(
    private readonly databaseUrl: string,
    private readonly knex: Knex,
  ) {}

  /**
   * Makes sure this process LISTENs: the first stream waits for the first connection; while a
   * lost listener is being reconnected, new streams open at once and catch up with the others.
   * The one keep-alive interval is made here, once, and only `close()` clears it.
   */
  private async listen(): Promise<void> {
    if (this.closed) return;
    this.heartbeat ??= setInterval(() => this.enqueue(() => this.keepAlive()), KEEP_ALIVE_MS);
    this.heartbeat.unref();
    if (this.client || this.retry) return;
    this.connecting ??= this.connect().finally(() => {
      this.connecting = null;
    });
    await this.connecting;
  }

  /** One attempt to connect and LISTEN; a failure schedules the next attempt. */
  private async connect(): Promise<void> {
    // Named, so operators (and the tests) can tell the listener from the pool's connections.
    const client = new pg.Client({ connectionString: this.databaseUrl, application_name: LISTENER_APPLICATION_NAME });
    let lost = false;
    const drop = (): void => {
      if (lost) return;
      lost = true;
      void client.end().catch(() => undefined);
      if (this.client === client) {
        this.client = null;
        this.reconnectLater();
      }
    };
    // A terminated backend, a network cut or a server restart: error and/or end, handled once.
    client.on('error', drop);
    client.on('end', drop);
    client.on('notification', (msg) => this.enqueue(() => this.deliver(msg.payload ?? '')));
    try {
      await client.connect();
      await client.query(`LISTEN ${CHANNEL}`);
    } catch {
      drop();
      this.reconnectLater();
      return;
    }
    if (lost || this.closed) {
      drop();
      this.reconnectLater();
      return;
    }
    this.client = client;
    this.backoff = RECONNECT_MIN_MS;
    // Changes made while nobody listened were never heard: the streams open by now reload their boards.
    const behind = [...this.subscribers];
    if (behind.length > 0) this.enqueue(() => this.resync(behind));
  }

  /** The next attempt after a growing pause (doubling, capped), unless one is already waiting. */
  private reconnectLater(): void {
    if (this.closed || this.retry || this.client) return;
    const wait = this.backoff;
    this.backoff = Math.min(this.backoff * 2, RECONNECT_MAX_MS);
    this.retry = setTimeout(() => {
      this.retry = null;
      if (this.closed || this.client) return;
      this.connecting ??= this.connect().finally(() => {
        this.connecting = null;
      });
    }, wait);
    this.retry.unref();
  }

  private enqueue(task: () => Promise<void>): void {
    this.queue = this.queue.then(task).catch(() => undefined);
  }

  /** The subscribers among `list` whose session is still the one their stream was opened for. */
  private async live(list: Subscriber[]): Promise<Set<Subscriber>> {
    if (this.closed || list.length === 0) return new Set();
    const rows = (await this.knex('session')
      .whereIn('sid', [...new Set(list.map((s) => s.sessionId))])
      .where('expire', '>', new Date())
      .select('sid', 'sess')) as { sid: string; sess: StoredSession | string }[];
    const bySid = new Map(
      rows.map((r) => [r.sid, (typeof r.sess === 'string' ? JSON.parse(r.sess) : r.sess) as StoredSession]),
    );
    // The person must still be in the firm, in the role the stream was opened in: someone taken out
    // of the firm (or given another role) hears nothing more on a stream opened before.
    const memberships = (await this.knex('memberships')
      .whereIn('user_id', [...new Set(list.map((s) => s.userId))])
      .select('user_id', 'firm_id', 'role')) as { userId: string | number; firmId: string | number; role: Role }[];
    const held = new Set(memberships.map((m) => `${m.userId}|${m.firmId}|${m.role}`));
    return new Set(
      list.filter((s) => {
        const sess = bySid.get(s.sessionId);
        return (
          sess !== undefined &&
          String(sess.userId) === s.userId &&
          (sess.firmId === undefined || String(sess.firmId) === s.reader.firmId) &&
          held.has(`${s.userId}|${s.reader.firmId}|${s.role}`)
        );
      }),
    );
  }

  private end(s: Subscriber): void {
    this.subscribers.delete(s);
    s.res.end();
  }

  private async deliver(payload: string): Promise<void> {
    let change: BookingChange;
    try {
      change = JSON.parse(payload) as BookingChange;
    } catch {
      return;
    }
    const listeners = [...this.subscribers].filter((s) => mayHearOf(s.reader, change));
    const live = await this.live(listeners);
    const data = JSON.stringify(streamEvent(change));
    for (const s of listeners) {
      if (live.has(s)) s.res.write(`event: bookings\ndata: ${data}\n\n`);
      else this.end(s);
    }
  }

  /** Tells `list` to reload their boards: changes may have been missed while nobody listened. */
  private async resync(list: Subscriber[]): Promise<void> {
    const open = list.filter((s) => this.subscribers.has(s));
    const live = await this.live(open);
    for (const s of open) {
      if (live.has(s)) s.res.write('event: resync\ndata: {}\n\n');
      else this.end(s);
    }
  }

  private async keepAlive(): Promise<void> {
    const all = [...this.subscribers];
    const live = await this.live(all);
    for (const s of all) {
      if (live.has(s)) s.res.write(': keep-alive\n\n');
      else this.end(s);
    }
  }

  /** Opens a stream for one signed-in person; it ends when they leave or their session ends. */
  async open(req: Request, res: Response, actor: Actor): Promise<void> {
    if (this.closed) {
      res.status(503).end();
      return;
    }
    await this.listen();
    const reach = reachOf(actor);
    const own = reach === 'crew' ? ((await ownResourceIds(this.knex, actor)) as { id: string }[]) : [];
    const reader: StreamReader = { reach, firmId: actor.firmId, ownResourceIds: new Set(own.map((r) => String(r.id))) };
    // Closed while this stream was being set up: nobody would end it.
    if (this.closed) {
      res.status(503).end();
      return;
    }
    res.status(200).set({
      'Content-Type': 'text/event-stream',
      'Cache-Control': 'no-cache, no-transform',
      Connection: 'keep-alive',
      'X-Accel-Buffering': 'no',
    });
    res.flushHeaders();
    res.write('retry: 3000\n\n');
    const subscriber: Subscriber = { reader, userId: actor.userId, role: actor.role, sessionId: req.sessionID, res };
    this.subscribers.add(subscriber);
    req.on('close', () => this.subscribers.delete(subscriber));
  }

  /**
   * Tells the open streams of one session how a long request of that session is getting on
   * (auto-place's progress). Written at once, not queued: the request is still running, and the
   * session is live (it was checked for the request itself). Carries no booking, only the figures.
   */
  tellSession(sessionId: string, event: string, data: Record<string, unknown>): void {
    const text = `event: ${event}\ndata: ${JSON.stringify(data)}\n\n`;
    for (const s of this.subscribers) if (s.sessionId === sessionId) s.res.write(text);
  }

  /** Ends the open streams of one session at once (its person signed out). */
  endSession(sessionId: string): void {
    for (const s of [...this.subscribers]) if (s.sessionId === sessionId) this.end(s);
  }

  /** Ends at once the open streams of one person in one firm (their role changed, or they were taken out). */
  endMember(userId: string, firmId: string): void {
    for (const s of [...this.subscribers]) if (s.userId === userId && s.reader.firmId === firmId) this.end(s);
  }

  /** Ends every open stream and the LISTEN connection; no reconnection follows. */
  async close(): Promise<void> {
    this.closed = true;
    if (this.heartbeat) clearInterval(this.heartbeat);
    this.heartbeat = null;
    if (this.retry) clearTimeout(this.retry);
    this.retry = null;
    for (const s of [...this.subscribers]) this.end(s);
    await this.connecting;
    const client = this.client;
    this.client = null;
    await client?.end().catch(() => undefined);
  }
}
