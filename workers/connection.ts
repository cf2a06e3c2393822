import type { ConnectionOptions } from 'bullmq';

/**
 * BullMQ connection options from a redis:// URL. Workers need `maxRetriesPerRequest: null`;
 * reconnects are retried every 0.2–2 s (BullMQ's own default backs off to 20 s, which would leave
 * mail waiting long after Redis is back).
 */
export function redisConnection(url: string, extra: { failFast?: boolean } = {}): ConnectionOptions {
  return {
    url,
    maxRetriesPerRequest: null,
    retryStrategy: (times: number) => Math.min(200 * times, 2000),
    // A producer should fail fast while Redis is away rather than pile commands up in memory:
    // the outbox row is the durable copy, and the relay tries again.
    ...(extra.failFast ? { enableOfflineQueue: false } : {}),
  } as ConnectionOptions;
}

/** One queue carries every e-mail; job names are the outbox kinds. */
export const QUEUE_PREFIX = 'waterline';
