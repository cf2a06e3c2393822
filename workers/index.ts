/** The worker process (`npm run worker`): the outbox relay, the mail worker and the daily site forecast refresh and the pruning of old rows, until SIGTERM. */
import pino from 'pino';
import { loadConfig } from '../server/config.ts';
import { createKnex } from '../server/db.ts';
import { startMailPipeline } from './pipeline.ts';
import { startWeatherRefresh } from './weather.ts';
import { startPruning } from './prune.ts';

const config = loadConfig();
const logger = pino({ level: config.LOG_LEVEL }).child({ process: 'worker' });
const knex = createKnex(config.DATABASE_URL, { min: 0, max: 5 });
const pipeline = startMailPipeline({ knex, config, logger });
const weather = startWeatherRefresh({ knex, config, logger });
const pruning = startPruning({ knex, config, logger });

let stopping = false;
async function shutdown(signal: string): Promise<void> {
  if (stopping) return;
  stopping = true;
  logger.info(`${signal}: finishing the mail in hand…`);
  const force = setTimeout(() => process.exit(1), 15_000);
  force.unref();
  await pipeline.close();
  await weather.close();
  await pruning.close();
  await knex.destroy();
  process.exit(0);
}
process.on('SIGTERM', () => void shutdown('SIGTERM'));
process.on('SIGINT', () => void shutdown('SIGINT'));
// Said once the signals are handled: a stop sent on reading it (a deploy, a test) finishes the mail in
// hand instead of killing the process half set up.
logger.info({ queue: config.MAIL_QUEUE }, 'mail worker started');
