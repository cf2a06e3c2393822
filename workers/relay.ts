import type { Knex } from 'knex';
import type { Logger } from 'pino';
import type { EventEmitter } from 'node:events';
import type { Queue } from 'bullmq';
import { scanOverdueRequests } from '../server/services/reminders.ts';

export interface MailJobData {
  outboxId: string;
}

export interface RelayOptions {
  knex: Knex;
  queue: Queue<MailJobData>;
  logger: Logger;
  reminderHours: number;
  batchSize?: number;
  /** Pause between polls when there was nothing to move. */
  idleMs?: number;
  /** Longest pause while Redis (or the database) is unreachable. */
  maxBackoffMs?: number;
  /** How long one hand-over to Redis may take before it counts as a failure. */
  addTimeoutMs?: number;
  scanEveryMs?: number;
  /** A row queued this long without being sent is handed over again (its job may have died with Redis). */
  staleAfterMs?: number;
}

/** How long a queued row's job must stay missing from Redis before the row is handed over again. */
export const LOST_CONFIRM_MS = 3000;

function withTimeout<T>(promise: Promise<T>, ms: number, what: string): Promise<T> {
  let timer: NodeJS.Timeout | undefined;
  return Promise.race([
    promise.finally(() => clearTimeout(timer)),
    new Promise<never>((_, reject) => {
      timer = setTimeout(() => reject(new Error(`${what} took longer than ${ms} ms`)), ms);
    }),
  ]);
}

/**
 * Moves pending outbox rows into the BullMQ queue. The job id is the row's idempotency key, so a
 * row handed over twice (a crash between the add and the commit) is still one job. While Redis is
 * away the rows simply stay pending and the relay backs off (0.5 s doubling to maxBackoffMs).
 * It also runs the reminder scan for overdue requests once a minute.
 */
export class OutboxRelay {
  private stopped = false;
  private failures = 0;
  private nextScan = 0;
  private wake: (() => void) | null = null;
  private running: Promise<void> | null = null;
  private readonly batchSize: number;
  /** Queued rows whose job Redis did not know at the last look, with when that was first seen. */
  private missing = new Map<string, number>();

  constructor(private readonly options: RelayOptions) {
    this.batchSize = options.batchSize ?? 200;
  }

  start(): void {
    this.running ??= this.loop();
    // Redis back after an outage: move the waiting mail at once (not after the back-off), and look
    // for jobs a restarted Redis lost. The queue's backend says 'ready' on every (re)connection.
    const backend =
      typeof this.options.queue.getBackend === 'function'
        ? (this.options.queue.getBackend() as unknown as EventEmitter)
        : null;
    backend?.on('ready', () => {
      this.failures = 0;
      this.nextScan = 0;
      this.wake?.();
    });
  }

  /** Moves one batch; returns how many rows were handed over. */
  async relayOnce(): Promise<number> {
    const { knex, queue } = this.options;
    return knex.transaction(async (trx) => {
      const rows = (await trx('outbox')
        .where('status', 'pending')
        .where('next_attempt_at', '<=', new Date())
        .orderBy('id')
        .limit(this.batchSize)
        .forUpdate()
        .skipLocked()
        .select('id', 'idempotency_key', 'kind', 'last_error')) as {
        id: string;
        idempotencyKey: string;
        kind: string;
        lastError: string | null;
      }[];
      if (rows.length === 0) return 0;
      // A row handed back (sent again from the office, or found stale or lost) may still have an old
      // job under its id, which would swallow the add: remove it unless it is running (a running
      // job is locked, stays, and the add is absorbed by it; the worker never sends a sent row twice).
      for (const row of rows.filter((r) => r.lastError !== null)) {
        await withTimeout(
          this.options.queue.remove(row.idempotencyKey),
          this.options.addTimeoutMs ?? 5000,
          'removing an old mail job',
        );
      }
      await withTimeout(
        queue.addBulk(
          rows.map((r) => ({ name: r.kind, data: { outboxId: String(r.id) }, opts: { jobId: r.idempotencyKey } })),
        ),
        this.options.addTimeoutMs ?? 5000,
        'adding mail jobs to Redis',
      );
      // For a queued row, next_attempt_at is when it was last handed over (or last failed).
      await trx('outbox')
        .whereIn(
          'id',
          rows.map((r) => r.id),
        )
        .update({ status: 'queued', next_attempt_at: new Date() });
      return rows.length;
    });
  }

  /**
   * Redis without persistence loses its jobs when it restarts; their rows would stay 'queued' for
   * ever. Rows queued longer than the longest retry delay go back to pending and are handed over
   * again: a job still in Redis under the same id absorbs the re-add, a lost one is made anew, and
   * the worker never sends a row already marked sent.
   */
  async requeueStale(now = new Date()): Promise<number> {
    const before = new Date(now.getTime() - (this.options.staleAfterMs ?? 15 * 60_000));
    const stale = (await this.options
      .knex('outbox')
      .where('status', 'queued')
      .where('next_attempt_at', '<', before)
      .limit(this.batchSize)
      .select('id', 'idempotency_key')) as { id: string; idempotencyKey: string }[];
    let requeued = 0;
    for (const row of stale) {
      // A finished job under the same id would swallow the re-add; an active one (locked) is left alone.
      if (
        (await this.options.queue.remove(row.idempotencyKey)) === 0 &&
        (await this.options.queue.getJobState(row.idempotencyKey)) === 'active'
      )
        continue;
      requeued += await this.options
        .knex('outbox')
        .where({ id: row.id, status: 'queued' })
        .update({ status: 'pending', next_attempt_at: now });
    }
    return requeued;
  }

  /**
   * Rows queued whose job Redis no longer knows (a Redis restarted without persistence lost it)
   * go back to pending at once, so their mail goes out when Redis returns rather than after
   * staleAfterMs. A job that ran keeps its record for a day (completed) and its row says sent or
   * failed, so an unknown job of a queued row was never sent by it.
   */
  async requeueLost(now = new Date()): Promise<number> {
    const queued = (await this.options
      .knex('outbox')
      .where('status', 'queued')
      .orderBy('id')
      .limit(this.batchSize)
      .select('id', 'idempotency_key')) as { id: string; idempotencyKey: string }[];
    let requeued = 0;
    const seen = new Map<string, number>();
    for (const row of queued) {
      if ((await this.options.queue.getJobState(row.idempotencyKey)) !== 'unknown') continue;
      // Seen missing twice, a few seconds apart: a job that just failed for good is removed a moment
      // before its row says failed, and must not be taken for a lost one.
      const since = this.missing.get(row.id) ?? now.getTime();
      seen.set(row.id, since);
      if (now.getTime() - since < LOST_CONFIRM_MS) continue;
      seen.delete(row.id);
      requeued += await this.options
        .knex('outbox')
        .where({ id: row.id, status: 'queued' })
        .update({ status: 'pending', next_attempt_at: now });
    }
    this.missing = seen;
    return requeued;
  }

  private async loop(): Promise<void> {
    const { logger } = this.options;
    while (!this.stopped) {
      let moved = 0;
      try {
        if (Date.now() >= this.nextScan) {
          const flagged = await scanOverdueRequests(this.options.knex, {
            now: new Date(),
            reminderHours: this.options.reminderHours,
          });
          if (flagged) logger.info({ flagged }, 'overdue requests flagged; reminders queued');
          const requeued = await this.requeueStale();
          if (requeued) logger.warn({ requeued }, 'mail queued long ago but never sent was handed over again');
          const lost = await this.requeueLost();
          if (lost) logger.warn({ lost }, 'mail whose queue job was lost (Redis restarted) was handed over again');
          this.nextScan = Date.now() + (this.options.scanEveryMs ?? 60_000);
          // Rows whose job was missing get their second look soon, not at the next regular scan.
          if (this.missing.size) this.nextScan = Math.min(this.nextScan, Date.now() + LOST_CONFIRM_MS);
        }
        moved = await this.relayOnce();
        if (this.failures) logger.info({ after: this.failures }, 'outbox relay is moving mail again');
        this.failures = 0;
      } catch (err) {
        this.failures += 1;
        if (this.failures === 1 || this.failures % 20 === 0)
          logger.warn(
            { err, failures: this.failures },
            'outbox relay could not hand mail to the queue; rows stay pending',
          );
      }
      const wait = this.failures
        ? Math.min(this.options.maxBackoffMs ?? 30_000, 500 * 2 ** (this.failures - 1))
        : moved === this.batchSize
          ? 0
          : (this.options.idleMs ?? 250);
      if (wait > 0)
        await new Promise<void>((resolve) => {
          const t = setTimeout(resolve, wait);
          this.wake = () => {
            clearTimeout(t);
            resolve();
          };
        });
      this.wake = null;
    }
  }

  /** Stops after the batch in hand. */
  async close(): Promise<void> {
    this.stopped = true;
    this.wake?.();
    await this.running;
  }
}
