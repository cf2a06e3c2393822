import type { Knex } from 'knex';
import type { Logger } from 'pino';
import { Queue, Worker } from 'bullmq';
import type { Config } from '../server/config.ts';
import { refreshForecasts } from '../server/services/weather.ts';
import { QUEUE_PREFIX, redisConnection } from './connection.ts';

/** The queue and the one repeating job that refreshes site forecasts. */
export const WEATHER_SCHEDULER_ID = 'refresh-site-forecasts';

export interface WeatherRefresh {
  queue: Queue;
  close(): Promise<void>;
}

function closeWithin(closing: Promise<void>, ms: number): Promise<void> {
  return Promise.race([
    closing.catch(() => undefined),
    new Promise<void>((resolve) => setTimeout(resolve, ms).unref()),
  ]);
}

/**
 * Starts the daily forecast refresh in this process (`npm run worker`, or RUN_WORKER=1): a BullMQ
 * job scheduler repeats the job every WEATHER_REFRESH_HOURS (one schedule however many workers
 * run, as BullMQ keeps it in Redis under one id), starting at once; the worker fetches the
 * forecast of every site with a base poured or about to be and tells the office of a lift the
 * colder forecast made too early (server/services/weather.ts). A failed refresh is only logged:
 * the board falls back to the stored days and the seasonal assumption, and the next run tries again.
 */
export function startWeatherRefresh(options: {
  knex: Knex;
  config: Pick<Config, 'REDIS_URL' | 'WEATHER_API_URL' | 'WEATHER_REFRESH_HOURS' | 'WEATHER_QUEUE'>;
  logger: Logger;
  now?: () => number;
}): WeatherRefresh {
  const { knex, config, logger } = options;
  const now = options.now ?? Date.now;
  const queue = new Queue(config.WEATHER_QUEUE, {
    connection: redisConnection(config.REDIS_URL, { failFast: true }),
    prefix: QUEUE_PREFIX,
  });
  queue.on('error', (err) => logger.warn({ err }, 'weather queue lost Redis; forecasts refresh when it is back'));
  void queue
    .upsertJobScheduler(
      WEATHER_SCHEDULER_ID,
      { every: config.WEATHER_REFRESH_HOURS * 3600_000 },
      {
        name: 'refresh',
        opts: { removeOnComplete: { count: 50 }, removeOnFail: { count: 50 } },
      },
    )
    .catch((err: unknown) => logger.warn({ err }, 'the forecast refresh could not be scheduled'));
  const worker = new Worker(
    config.WEATHER_QUEUE,
    async () => {
      const result = await refreshForecasts(knex, { baseUrl: config.WEATHER_API_URL, now: now() });
      for (const f of result.failed)
        logger.warn(
          { jobId: f.jobId, reason: f.reason },
          'site forecast not refreshed; the seasonal assumption stands in',
        );
      for (const l of result.lateLifts) logger.info({ jobId: l.jobId, stageId: l.stageId }, l.message);
      return { refreshed: result.refreshed.length, failed: result.failed.length, lateLifts: result.lateLifts.length };
    },
    { connection: redisConnection(config.REDIS_URL), prefix: QUEUE_PREFIX, concurrency: 1 },
  );
  worker.on('error', (err) => logger.warn({ err }, 'weather worker lost Redis'));
  return {
    queue,
    async close() {
      await closeWithin(worker.close(), 5000);
      await closeWithin(queue.close(), 2000);
    },
  };
}
