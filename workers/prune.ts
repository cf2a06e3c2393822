import type { Knex } from 'knex';
import type { Logger } from 'pino';
import { Queue, Worker } from 'bullmq';
import type { Config } from '../server/config.ts';
import { pruneOldRows } from '../server/services/prune.ts';
import { QUEUE_PREFIX, redisConnection } from './connection.ts';

/** The queue and the one repeating job that prunes settled outbox rows, link attempts and board change marks. */
export const PRUNE_QUEUE = 'prune';
export const PRUNE_SCHEDULER_ID = 'prune-old-rows';

export interface Pruning {
  queue: Queue;
  close(): Promise<void>;
}

function closeWithin(closing: Promise<void>, ms: number): Promise<void> {
  return Promise.race([
    closing.catch(() => undefined),
    new Promise<void>((resolve) => setTimeout(resolve, ms).unref()),
  ]);
}

type PruneConfig = Pick<
  Config,
  'REDIS_URL' | 'PRUNE_EVERY_HOURS' | 'OUTBOX_KEEP_DAYS' | 'LINK_ATTEMPTS_KEEP_DAYS' | 'BOARD_CHANGES_KEEP_DAYS'
>;

/**
 * Starts the pruning in this process (`npm run worker`, or RUN_WORKER=1): a BullMQ job scheduler
 * repeats the job every PRUNE_EVERY_HOURS (one schedule however many workers run, kept in Redis
 * under one id), starting at once. What goes and what stays: server/services/prune.ts. A failed run
 * is only logged; the next one catches up.
 */
export function startPruning(options: {
  knex: Knex;
  config: PruneConfig;
  logger: Logger;
  now?: () => number;
}): Pruning {
  const { knex, config, logger } = options;
  const now = options.now ?? Date.now;
  const queue = new Queue(PRUNE_QUEUE, {
    connection: redisConnection(config.REDIS_URL, { failFast: true }),
    prefix: QUEUE_PREFIX,
  });
  queue.on('error', (err) => logger.warn({ err }, 'prune queue lost Redis; old rows are pruned when it is back'));
  void queue
    .upsertJobScheduler(
      PRUNE_SCHEDULER_ID,
      { every: config.PRUNE_EVERY_HOURS * 3600_000 },
      {
        name: 'prune',
        opts: { removeOnComplete: { count: 20 }, removeOnFail: { count: 20 } },
      },
    )
    .catch((err: unknown) => logger.warn({ err }, 'pruning could not be scheduled'));
  const worker = new Worker(
    PRUNE_QUEUE,
    async () => {
      const result = await pruneOldRows(knex, {
        now: new Date(now()),
        outboxKeepDays: config.OUTBOX_KEEP_DAYS,
        linkAttemptsKeepDays: config.LINK_ATTEMPTS_KEEP_DAYS,
        boardChangesKeepDays: config.BOARD_CHANGES_KEEP_DAYS,
      });
      if (result.outbox || result.linkAttempts || result.boardChanges) logger.info(result, 'old rows pruned');
      return result;
    },
    { connection: redisConnection(config.REDIS_URL), prefix: QUEUE_PREFIX, concurrency: 1 },
  );
  worker.on('error', (err) => logger.warn({ err }, 'prune worker lost Redis'));
  worker.on('failed', (_job, err) => logger.warn({ err }, 'pruning failed; the next run tries again'));
  return {
    queue,
    async close() {
      await closeWithin(worker.close(), 5000);
      await closeWithin(queue.close(), 2000);
    },
  };
}
