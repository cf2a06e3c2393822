import { loadConfig } from './config.ts';
import { createKnex } from './db.ts';
import { createApp } from './app.ts';
import pino from 'pino';
import { startMailPipeline, type MailPipeline } from '../workers/pipeline.ts';
import { startWeatherRefresh, type WeatherRefresh } from '../workers/weather.ts';
import { startPruning, type Pruning } from '../workers/prune.ts';

const config = loadConfig();
const knex = createKnex(config.DATABASE_URL);
const { listen, close } = createApp({ config, knex });
// `npm start` runs the outbox relay and mail worker in this process (RUN_WORKER=1); production runs `npm run worker` apart.
let mail: MailPipeline | null = null;
let weather: WeatherRefresh | null = null;
let pruning: Pruning | null = null;
if (process.env.RUN_WORKER === '1') {
  const logger = pino({ level: config.LOG_LEVEL }).child({ process: 'worker' });
  mail = startMailPipeline({ knex, config, logger });
  weather = startWeatherRefresh({ knex, config, logger });
  pruning = startPruning({ knex, config, logger });
}

const server = listen(config.PORT, config.HOST, () => {
  console.log(`Waterline is listening on ${config.PUBLIC_URL}`);
});

// Graceful shutdown: stop taking connections, finish what is under way, then close the pools.
let stopping = false;
async function shutdown(signal: string) {
  if (stopping) return;
  stopping = true;
  console.log(`${signal}: shutting down…`);
  server.close();
  server.closeIdleConnections();
  const force = setTimeout(() => process.exit(1), 10_000);
  force.unref();
  await mail?.close();
  await weather?.close();
  await pruning?.close();
  await close();
  await knex.destroy();
  process.exit(0);
}
process.on('SIGTERM', () => void shutdown('SIGTERM'));
process.on('SIGINT', () => void shutdown('SIGINT'));
