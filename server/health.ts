import type { Knex } from 'knex';
import { Redis } from 'ioredis';

/** How one dependency answered, with how long it took. */
export interface DependencyCheck {
  status: 'ok' | 'down';
  /** Milliseconds the check took (the timeout when it did not answer). */
  ms: number;
  /** Why it is down, in a few words. */
  reason?: string;
}

/**
 * What GET /api/health/ready reports. `ready` is false only when this web process cannot serve
 * (the database is away); a Redis outage degrades it — bookings still save and e-mails wait in the
 * outbox — so a load balancer must keep sending traffic.
 */
export interface HealthReport {
  status: 'ok' | 'degraded' | 'down';
  ready: boolean;
  database: DependencyCheck;
  queue: DependencyCheck;
}

/** Longest a dependency may take to answer a health check before it counts as down. */
export const HEALTH_TIMEOUT_MS = 1500;

function withTimeout<T>(work: Promise<T>, ms: number): Promise<T> {
  let timer: NodeJS.Timeout | undefined;
  const late = new Promise<never>((_resolve, reject) => {
    timer = setTimeout(() => reject(new Error(`no answer within ${ms} ms`)), ms);
  });
  return Promise.race([work, late]).finally(() => clearTimeout(timer));
}

async function timed(work: () => Promise<unknown>, timeoutMs: number): Promise<DependencyCheck> {
  const started = performance.now();
  try {
    await withTimeout(work(), timeoutMs);
    return { status: 'ok', ms: Math.round(performance.now() - started) };
  } catch (err) {
    return {
      status: 'down',
      ms: Math.round(performance.now() - started),
      reason: err instanceof Error ? err.message : String(err),
    };
  }
}

/** Database and queue reachability for the health routes, each bounded by a short timeout. */
export class Health {
  private readonly redis: Redis;

  constructor(
    private readonly knex: Knex,
    redisUrl: string,
    private readonly timeoutMs = HEALTH_TIMEOUT_MS,
  ) {
    // Fail fast instead of queueing commands while Redis is away: health must answer promptly.
    this.redis = new Redis(redisUrl, {
      lazyConnect: true,
      enableOfflineQueue: false,
      maxRetriesPerRequest: 0,
      retryStrategy: () => 2000,
      connectTimeout: timeoutMs,
      commandTimeout: timeoutMs,
    });
    this.redis.on('error', () => {
      /* reported through check() */
    });
  }

  /** Checks both dependencies at once; never takes much longer than the timeout. */
  async check(): Promise<HealthReport> {
    const [database, queue] = await Promise.all([
      timed(() => this.knex.raw('select 1'), this.timeoutMs),
      timed(async () => {
        if (this.redis.status === 'wait') await this.redis.connect();
        const pong = await this.redis.ping();
        if (pong !== 'PONG') throw new Error(`unexpected answer ${pong}`);
      }, this.timeoutMs),
    ]);
    const ready = database.status === 'ok';
    const status = !ready ? 'down' : queue.status === 'ok' ? 'ok' : 'degraded';
    return { status, ready, database, queue };
  }

  async close(): Promise<void> {
    this.redis.disconnect();
  }
}
