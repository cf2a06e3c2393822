import pg from 'pg';
import type { Knex } from 'knex';
import type { Request, Response } from 'express';
import type { Actor } from './actor.ts';
import { visibleFirmIds } from '../models/base.ts';

const CHANNEL = 'board_changes';

/**
 * Tells every open board about a booking change, inside the writing transaction: PostgreSQL
 * delivers the notification only when the transaction commits, to every server process listening.
 */
export async function notifyBookingChange(trx: Knex.Transaction, bookingId: string, stageId: string, resourceId: string): Promise<void> {
  await trx.raw(`SELECT pg_notify(?, json_build_object('bookingId', ?::text, 'firmIds', ARRAY(
      SELECT j.firm_id::text FROM stages s JOIN jobs j ON j.id = s.job_id WHERE s.id = ?
      UNION SELECT r.firm_id::text FROM resources r WHERE r.id = ?))::text)`, [CHANNEL, bookingId, stageId, resourceId]);
}

interface Subscriber { firmIds: Set<string>; res: Response }

/**
 * Server-sent events for the board. Each server process LISTENs on one PostgreSQL connection and
 * fans each change out to its own open streams whose firm can see it, so boards served by
 * different processes stay in step without sharing memory.
 */
export class BoardStream {
  private readonly subscribers = new Set<Subscriber>();
  private client: pg.Client | null = null;
  private starting: Promise<void> | null = null;
  private closed = false;
  private heartbeat: ReturnType<typeof setInterval> | null = null;

  constructor(private readonly databaseUrl: string, private readonly knex: Knex) {}

  private start(): Promise<void> {
    this.starting ??= (async () => {
      const client = new pg.Client({ connectionString: this.databaseUrl });
      client.on('notification', (msg) => this.deliver(msg.payload ?? ''));
      client.on('error', () => { this.client = null; this.starting = null; });
      await client.connect();
      await client.query(`LISTEN ${CHANNEL}`);
      this.client = client;
      this.heartbeat = setInterval(() => { for (const s of this.subscribers) s.res.write(': keep-alive\n\n'); }, 25_000);
      this.heartbeat.unref();
    })();
    return this.starting;
  }

  private deliver(payload: string): void {
    let message: { bookingId: string; firmIds: string[] };
    try { message = JSON.parse(payload) as typeof message; } catch { return; }
    for (const s of this.subscribers) {
      if (message.firmIds.some((f) => s.firmIds.has(f))) s.res.write(`event: bookings\ndata: ${JSON.stringify({ bookingId: message.bookingId })}\n\n`);
    }
  }

  /** Opens a stream for one signed-in person; it ends when they leave. */
  async open(req: Request, res: Response, actor: Actor): Promise<void> {
    if (this.closed) { res.status(503).end(); return; }
    await this.start();
    const rows = (await visibleFirmIds(this.knex, actor)) as Record<string, unknown>[];
    const firmIds = new Set<string>(rows.map((r) => String(Object.values(r)[0])));
    res.status(200).set({ 'Content-Type': 'text/event-stream', 'Cache-Control': 'no-cache, no-transform', Connection: 'keep-alive', 'X-Accel-Buffering': 'no' });
    res.flushHeaders();
    res.write('retry: 3000\n\n');
    const subscriber = { firmIds, res };
    this.subscribers.add(subscriber);
    req.on('close', () => this.subscribers.delete(subscriber));
  }

  async close(): Promise<void> {
    this.closed = true;
    if (this.heartbeat) clearInterval(this.heartbeat);
    for (const s of this.subscribers) s.res.end();
    this.subscribers.clear();
    await this.client?.end().catch(() => undefined);
  }
}
