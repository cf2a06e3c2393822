/**
 * `npm run bench:mail`: 1,000 bookings published to partner firms → 1,000 e-mails in a fake inbox,
 * through the real path (publish transaction → outbox → relay → BullMQ → worker → SMTP).
 * Starts its own database (waterline_bench_mail on the project's PostgreSQL), Redis and fake SMTP inbox.
 */
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import pino from 'pino';
import pg from 'pg';
import { startPostgres, ensureDatabase } from '../scripts/services/postgres.ts';
import { startRedis } from '../scripts/services/redis.ts';
import { startFakeSmtpInbox } from '../scripts/fakes/smtp-inbox.ts';
import { loadConfig } from '../server/config.ts';
import { createKnex, migrationConfig } from '../server/db.ts';
import { seedDemo } from '../seeds/demo.ts';
import { actorFor } from '../server/services/session.ts';
import { ConfirmationsService } from '../server/services/confirmations.ts';
import { startMailPipeline } from '../workers/pipeline.ts';

const COUNT = Number(process.env.BENCH_MAIL_COUNT ?? 1000);
const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..');
const PG_PORT = Number(process.env.WATERLINE_PG_PORT ?? 54329);
const REDIS_PORT = 63_812;
const DB = 'waterline_bench_mail';

const pgHandle = await startPostgres(path.join(root, '.data'), PG_PORT);
const admin = new pg.Client({ host: '127.0.0.1', port: PG_PORT, user: 'postgres', database: 'postgres' });
await admin.connect();
await admin.query(`DROP DATABASE IF EXISTS ${DB} WITH (FORCE)`);
await admin.end();
await ensureDatabase(PG_PORT, DB);
const redis = await startRedis(path.join(root, '.data', 'bench'), REDIS_PORT);
const inbox = await startFakeSmtpInbox({ smtp: 2725, web: 1280 });

const config = loadConfig({
  ...process.env,
  NODE_ENV: 'development',
  DATABASE_URL: `postgres://postgres@127.0.0.1:${PG_PORT}/${DB}`,
  REDIS_URL: `redis://127.0.0.1:${REDIS_PORT}/0`,
  SMTP_URL: inbox.smtpUrl,
  SESSION_SECRET: 'bench-only-session-secret-xxxxxxxx',
  GOOGLE_CLIENT_ID: 'bench',
  GOOGLE_CLIENT_SECRET: 'bench',
  MAIL_QUEUE: `bench-${Date.now()}`,
  LOG_LEVEL: 'warn',
});
const knex = createKnex(config.DATABASE_URL, { min: 0, max: 20 });
let exitCode = 0;
try {
  await knex.migrate.latest(migrationConfig);
  await seedDemo(knex);

  // 100 jobs of 10 stages each, every stage pencilled on a partner firm's resource of the right kind.
  const tideway = await knex('firms').where('name', 'Tideway Hot Tubs').first('id');
  const byKind = async (kind: string) =>
    (
      await knex('resources as r')
        .join('firms as f', 'f.id', 'r.firm_id')
        .whereNot('f.kind', 'installer')
        .where('r.kind', kind)
        .pluck('r.id')
    ).map(String);
  const kinds: [string, string, string[]][] = [
    ['lift', 'Crane lift', await byKind('crane')],
    ['delivery', 'Delivery', await byKind('lorry')],
    ['electrical_connect', 'Connect and certify', await byKind('electrician')],
    ['excavation', 'Excavate pit', await byKind('groundworks_crew')],
  ];
  const bookings: { id: string; version: number }[] = [];
  const day0 = Date.UTC(2027, 8, 6, 8);
  await knex.transaction(async (trx) => {
    for (let j = 0; bookings.length < COUNT; j += 1) {
      const [job] = await trx('jobs')
        .insert({
          firm_id: tideway.id,
          reference: `BENCH-${String(j + 1).padStart(4, '0')}`,
          customer_name: 'Bench Householder',
          customer_email: `bench${j}@home.example`,
          site_address: `${j + 1} Bench Row`,
          site_town: 'Otley',
          site_postcode: 'LS21 1AA',
          installation_type: 'slab',
        })
        .returning('id');
      for (let s = 0; s < 10 && bookings.length < COUNT; s += 1) {
        const [kind, name, pool] = kinds[s % kinds.length]!;
        const [stage] = await trx('stages')
          .insert({ job_id: job.id, kind, name: `${name} ${s + 1}`, sequence: s + 1, duration_minutes: 240 })
          .returning('id');
        const start = new Date(day0 + (bookings.length % 200) * 86_400_000);
        const [b] = await trx('bookings')
          .insert({
            stage_id: stage.id,
            resource_id: pool[(j + s) % pool.length],
            starts_at: start,
            ends_at: new Date(start.getTime() + 4 * 3_600_000),
          })
          .returning(['id', 'version']);
        bookings.push({ id: String(b.id), version: b.version });
      }
    }
  });
  const scheduler = await knex('users').where('email', 'sam.okafor@tideway.example').first('id');
  const actor = (await actorFor(knex, String(scheduler.id), String(tideway.id)))!;
  const confirmations = new ConfirmationsService(knex);
  // Publishing first (the outbox fills; nothing needs Redis), then the relay and worker drain it:
  // the two figures are the write path and the mail path on their own.
  console.log(`Publishing ${COUNT} bookings of partner firms' resources…`);
  const t0 = performance.now();
  let next = 0;
  await Promise.all(
    Array.from({ length: 8 }, async () => {
      while (next < bookings.length) {
        const b = bookings[next++]!;
        await confirmations.publish(actor, b.id, b.version);
      }
    }),
  );
  const tPublished = performance.now();
  console.log(`Starting the relay and mail worker (concurrency 20)…`);
  const pipeline = startMailPipeline({
    knex,
    config,
    logger: pino({ level: 'warn' }),
    concurrency: 20,
    relay: { idleMs: 20, batchSize: 200 },
  });
  while (inbox.messages.length < COUNT && performance.now() - tPublished < 300_000)
    await new Promise((r) => setTimeout(r, 20));
  const tDelivered = performance.now();
  await new Promise((r) => setTimeout(r, 2000)); // anything doubled would arrive by now

  const keys = inbox.messages.map((m) => m.headers['x-waterline-message']);
  const unique = new Set(keys);
  const wanted = new Set(bookings.map((b) => `booking.${b.id}.v${b.version + 1}.request`));
  const missing = [...wanted].filter((k) => ![...unique].some((u) => u?.startsWith(k)));
  const outbox = await knex('outbox').select('status').count('* as n').groupBy('status');
  const publishS = (tPublished - t0) / 1000;
  const mailS = (tDelivered - tPublished) / 1000;
  console.log(
    [
      `published:            ${COUNT} bookings in ${publishS.toFixed(2)} s (${(COUNT / publishS).toFixed(1)} publishes/s, 8 at a time)`,
      `delivered:            ${inbox.messages.length} e-mails in ${mailS.toFixed(2)} s after the worker started`,
      `mail throughput:      ${(inbox.messages.length / mailS).toFixed(1)} e-mails/s (render + sign links + iCalendar + SMTP + parse at the inbox)`,
      `end to end:           ${((tDelivered - t0) / 1000).toFixed(2)} s from the first publish to the last e-mail`,
      `distinct messages:    ${unique.size} (doubled: ${keys.length - unique.size}, missing: ${missing.length})`,
      `outbox rows:          ${outbox.map((r) => `${r.status} ${r.n}`).join(', ')}`,
    ].join('\n'),
  );
  if (inbox.messages.length !== COUNT || unique.size !== COUNT || missing.length) {
    console.error('✖ lost or doubled e-mail');
    exitCode = 1;
  } else console.log('✔ none lost, none doubled');
  await pipeline.close();
} catch (error) {
  console.error(error);
  exitCode = 1;
} finally {
  await knex.destroy();
  await inbox.stop();
  await redis.stop();
  pgHandle.stop();
}
process.exit(exitCode);
