import type { Knex } from 'knex';
import { Redis } from 'ioredis';

export interface HealthReport {
  status: 'ok' | 'degraded';
  database: 'ok' | 'down';
  queue: 'ok' | 'down';
}

/** Database and queue reachability for GET /api/health. */
export class Health {
  private readonly redis: Redis;

  constructor(private readonly knex: Knex, redisUrl: string) {
    // Fail fast instead of queueing commands while Redis is away: health must answer promptly.
    this.redis = new Redis(redisUrl, { lazyConnect: true, enableOfflineQueue: false, maxRetriesPerRequest: 0, retryStrategy: () => 2000 });
    this.redis.on('error', () => { /* reported through check() */ });
  }

  async check(): Promise<HealthReport> {
    const [database, queue] = await Promise.all([
      this.knex.raw('select 1').then(() => 'ok' as const, () => 'down' as const),
      (async () => {
        try {
          if (this.redis.status === 'wait') await this.redis.connect();
          return (await this.redis.ping()) === 'PONG' ? 'ok' as const : 'down' as const;
        } catch { return 'down' as const; }
      })(),
    ]);
    return { status: database === 'ok' && queue === 'ok' ? 'ok' : 'degraded', database, queue };
  }

  async close(): Promise<void> {
    this.redis.disconnect();
  }
}
