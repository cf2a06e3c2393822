import type { Knex } from 'knex';
import type { Logger } from 'pino';
import { Queue } from 'bullmq';
import type { Config } from '../server/config.ts';
import { OutboxRelay, type MailJobData } from './relay.ts';
import { createMailWorker } from './mail.ts';
import { QUEUE_PREFIX, redisConnection } from './connection.ts';

/**
 * Retry and retention of mail jobs: about 17 minutes of retries in all, then the row shows failed
 * (the office sees it and can send it again). A job that failed for good is removed from Redis at
 * once: the outbox row keeps the attempts and the last error, and a "Send again" re-adds a job
 * under the same id.
 */
export const MAIL_JOB_OPTIONS = {
  attempts: 10,
  backoff: { type: 'exponential', delay: 1000 },
  removeOnComplete: { age: 24 * 3600, count: 10_000 },
  removeOnFail: true,
} as const;

/** How many times and how far apart a mail job is tried (tests shorten it). */
export interface MailRetry {
  attempts: number;
  backoff: { type: 'exponential' | 'fixed'; delay: number };
}

export interface MailPipeline {
  queue: Queue<MailJobData>;
  relay: OutboxRelay;
  close(): Promise<void>;
}

export interface PipelineOptions {
  knex: Knex;
  config: Config;
  logger: Logger;
  concurrency?: number;
  relay?: Partial<
    Pick<
      ConstructorParameters<typeof OutboxRelay>[0],
      'idleMs' | 'batchSize' | 'maxBackoffMs' | 'scanEveryMs' | 'staleAfterMs'
    >
  >;
  /** Overrides MAIL_JOB_OPTIONS' attempts and back-off. */
  retry?: MailRetry;
}

function closeWithin(closing: Promise<void>, ms: number): Promise<void> {
  return Promise.race([
    closing.catch(() => undefined),
    new Promise<void>((resolve) => setTimeout(resolve, ms).unref()),
  ]);
}

/** Starts the outbox relay and the mail worker in this process (`npm run worker`, or RUN_WORKER=1). */
export function startMailPipeline(options: PipelineOptions): MailPipeline {
  const { knex, config, logger } = options;
  const queue = new Queue<MailJobData>(config.MAIL_QUEUE, {
    connection: redisConnection(config.REDIS_URL, { failFast: true }),
    prefix: QUEUE_PREFIX,
    defaultJobOptions: { ...MAIL_JOB_OPTIONS, ...options.retry },
  });
  queue.on('error', (err) => logger.warn({ err }, 'mail queue lost Redis; the outbox keeps the mail'));
  const relay = new OutboxRelay({ knex, queue, logger, reminderHours: config.REMINDER_HOURS, ...options.relay });
  const mail = createMailWorker({
    knex,
    config,
    logger,
    connection: redisConnection(config.REDIS_URL),
    concurrency: options.concurrency,
  });
  relay.start();
  return {
    queue,
    relay,
    // Bounded, so a shutdown while Redis is unreachable still ends (the outbox keeps unsent mail).
    async close() {
      await relay.close();
      await closeWithin(mail.close(), 5000);
      await closeWithin(queue.close(), 2000);
    },
  };
}
