/**
 * API benchmark (not a test): the HTTP API under load on the generated 300-resource board
 * (bench/board-data.ts), with autocannon at 1 and 20 connections:
 *  - GET /api/board for four weeks, and beside it the same SQL the request sends through knex, run
 *    through `pg` directly at the same concurrency (the baseline; the ratio API/SQL at p95 is the figure
 *    to watch, as it holds up better than raw times on a shared machine);
 *  - the same GET with If-None-Match (the board unchanged: 304);
 *  - POST /api/stages/:id/move (a different stage each request, a week later and back);
 *  - POST /api/bookings/batch (five stages of five different jobs in one request).
 * Run with `npm run bench:api` (it starts PostgreSQL, Redis and the fakes itself). It uses a
 * database of its own (`waterline_bench_api`), so it can run beside the other benchmarks.
 *   npm run bench:api -- [--seconds N]
 */
import autocannon from 'autocannon';
import pg from 'pg';
import os from 'node:os';
import path from 'node:path';
import { fork } from 'node:child_process';
import request from 'supertest';
import { performance } from 'node:perf_hooks';
import type { Knex } from 'knex';
import { createKnex, migrationConfig } from '../server/db.ts';
import { loadConfig } from '../server/config.ts';
import { createApp } from '../server/app.ts';
import { ensureDatabase } from '../scripts/services/postgres.ts';
import { BOOKINGS, DAY, RESOURCES, START, generate, quantile, signInCookie } from './board-data.ts';

const secondsArg = process.argv.indexOf('--seconds');
const SECONDS = secondsArg > 0 ? Number(process.argv[secondsArg + 1]) : 10;
const CONNECTIONS = [1, 20];

// A database of its own: another benchmark run at the same time empties waterline_bench.
const dbUrl = new URL(process.env.DATABASE_URL ?? '');
dbUrl.pathname = '/waterline_bench_api';
await ensureDatabase(Number(dbUrl.port), 'waterline_bench_api');
const config = loadConfig({
  ...process.env,
  DATABASE_URL: dbUrl.toString(),
  LOG_LEVEL: 'silent',
  SIGN_IN_RATE_LIMIT: '100000',
});
const knex = createKnex(config.DATABASE_URL, { min: 0, max: 20 });
await knex.migrate.latest(migrationConfig);
const t0 = performance.now();
const { email } = await generate(knex);
await knex.raw('ANALYZE');
console.log(`Generated ${RESOURCES} resources and ${BOOKINGS} bookings in ${Math.round(performance.now() - t0)} ms`);

const now = () => START - 7 * DAY;
// The app under load runs in a child process (bench/api-server.ts); this process generates the load.
const child = fork(path.join(import.meta.dirname, 'api-server.ts'), [], {
  execArgv: ['--import', 'tsx'],
  env: { ...process.env, DATABASE_URL: config.DATABASE_URL, BENCH_NOW: String(now()), SIGN_IN_RATE_LIMIT: '100000' },
});
const base = await new Promise<string>((resolve, reject) => {
  child.once('message', (m) => resolve((m as { base: string }).base));
  child.once('exit', (code) => reject(new Error(`the benchmark's server stopped (${code})`)));
});
// An app in this process only signs in (the session lives in PostgreSQL, so the child accepts it) and
// records which SQL one board GET sends.
const local = createApp({ config: { ...config, PUBLIC_URL: base }, knex, now });
const { cookie, csrf } = await signInCookie(local.app, email);

interface Figures {
  p50: number;
  p95: number;
  p99: number;
  rps: number;
  requests: number;
  non2xx: number;
  codes?: Record<string, number>;
}
const fmt = (f: Figures) =>
  f.requests === 0
    ? 'no request finished within the run'
    : `p50 ${f.p50.toFixed(1)} ms, p95 ${f.p95.toFixed(1)} ms, p99 ${f.p99.toFixed(1)} ms, ${f.rps.toFixed(1)} req/s (${f.requests} requests${f.non2xx ? `, ${f.non2xx} not 2xx/304: ${JSON.stringify(f.codes)}` : ''})`;

/**
 * Requests still in hand when a run ends keep the server busy: wait until one unchanged board (304)
 * answers within a second again (at most 30 s), so one run's backlog does not count in the next.
 */
async function settle(etag: string | null): Promise<void> {
  const until = performance.now() + 30_000;
  while (performance.now() < until) {
    const t = performance.now();
    await fetch(base + boardPath, { headers: { cookie, ...(etag ? { 'if-none-match': etag } : {}) } }).then((r) =>
      r.arrayBuffer(),
    );
    if (performance.now() - t < 1000) return;
  }
}

/** Runs autocannon and takes p50/p95/p99 from every response's own time (autocannon reports no p95). */
async function load(
  connections: number,
  opts: Omit<autocannon.Options, 'url' | 'connections' | 'duration'> & { path: string },
): Promise<Figures> {
  const times: number[] = [];
  let bad = 0;
  const codes: Record<string, number> = {};
  await settle(etagForSettle);
  const { path: target, ...rest } = opts;
  const expect304 = Boolean(rest.headers?.['if-none-match']);
  const instance = autocannon({
    url: base + target,
    connections,
    duration: SECONDS,
    ...rest,
    headers: { cookie, ...rest.headers },
  });
  (instance as unknown as import('node:events').EventEmitter).on(
    'response',
    (_client: unknown, status: number, _bytes: number, ms: number) => {
      times.push(ms);
      // An unchanged board asked with its tag must answer 304; anything else is counted against it.
      if (status >= 400 || (status >= 300 && status !== 304) || (expect304 && status !== 304)) {
        bad += 1;
        codes[status] = (codes[status] ?? 0) + 1;
      }
    },
  );
  const result = await instance;
  return {
    p50: quantile(times, 0.5),
    p95: quantile(times, 0.95),
    p99: quantile(times, 0.99),
    rps: times.length / (result.duration || SECONDS),
    requests: times.length,
    non2xx: bad,
    codes,
  };
}

/** The same work without HTTP: `run` once per request, `connections` at a time, for the same duration. */
async function bare(connections: number, run: () => Promise<unknown>): Promise<Figures> {
  const times: number[] = [];
  const until = performance.now() + SECONDS * 1000;
  const t = performance.now();
  await Promise.all(
    Array.from({ length: connections }, async () => {
      while (performance.now() < until) {
        const s = performance.now();
        await run();
        times.push(performance.now() - s);
      }
    }),
  );
  return {
    p50: quantile(times, 0.5),
    p95: quantile(times, 0.95),
    p99: quantile(times, 0.99),
    rps: times.length / ((performance.now() - t) / 1000),
    requests: times.length,
    non2xx: 0,
  };
}

// 1. The board window.
let etagForSettle: string | null = null;
const range = { from: new Date(START - 8 * 3_600_000).toISOString(), to: new Date(START + 28 * DAY).toISOString() };
const boardPath = `/api/board?from=${range.from}&to=${range.to}`;
// The SQL one board GET sends through knex (the membership look-up, the window's version, the board's
// queries), captured from knex's own query events, to run again through pg.
const captured: { sql: string; bindings: unknown[] }[] = [];
const capture = (q: { sql: string; bindings?: unknown[] }) => {
  captured.push({ sql: q.sql, bindings: q.bindings ?? [] });
};
knex.on('query', capture);
const tFirst = performance.now();
const first = await request(local.app).get(boardPath).set('cookie', cookie).expect(200);
const firstBody = first.text;
knex.off('query', capture);
// The tag of the server under load (a tag names the release that made it, so this process's own differs).
const etag = (await fetch(base + boardPath, { headers: { cookie } }).then((r) => r.headers.get('etag'))) ?? undefined;
etagForSettle = etag ?? null;
const data = JSON.parse(firstBody);
console.log(
  `Board answer: ${data.resources.length} resources, ${data.bookings.length} bookings, ${(firstBody.length / 1024).toFixed(0)} KiB; ${captured.length} queries through knex; the first took ${Math.round(performance.now() - tFirst)} ms`,
);
const positional = (sql: string) => {
  let n = 0;
  return sql.replace(/\?/g, () => `$${++n}`);
};
const queries = captured.map((q) => ({
  text: /\$\d/.test(q.sql) ? q.sql : positional(q.sql),
  values: q.bindings.map((b) => (b instanceof Date ? b.toISOString() : b)),
}));
const pool = new pg.Pool({ connectionString: config.DATABASE_URL, max: 20 });
const sqlOnce = async () => {
  const client = await pool.connect();
  try {
    for (const q of queries) await client.query(q);
  } finally {
    client.release();
  }
};
await sqlOnce();

const load1 = os.loadavg()[0]!.toFixed(2);
console.log(`\nLoad average at the start: ${load1} (${os.cpus().length} cores); ${SECONDS} s per run`);
console.log('\nGET /api/board (4 weeks), and the same SQL through pg:');
for (const c of CONNECTIONS) {
  const api = await load(c, { path: boardPath });
  const sql = await bare(c, sqlOnce);
  const gzip = await load(c, { path: boardPath, headers: { 'accept-encoding': 'gzip' } });
  const unchanged = etag ? await load(c, { path: boardPath, headers: { 'if-none-match': etag } }) : null;
  console.log(`  ${String(c).padStart(2)} connection${c > 1 ? 's' : ' '} API      ${fmt(api)}`);
  console.log(`                SQL      ${fmt(sql)}`);
  console.log(
    `                API/SQL at p95: ${(api.p95 / sql.p95).toFixed(2)}×  (p50 ${(api.p50 / sql.p50).toFixed(2)}×)`,
  );
  console.log(`                gzip     ${fmt(gzip)}`);
  if (unchanged) console.log(`                304      ${fmt(unchanged)}`);
}

// 2. Moves: each request moves the next stage a week later, or back, with the versions it last saw.
const stageRows = (await knex('stages as s')
  .join('jobs as j', 'j.id', 's.job_id')
  .join('bookings as b', 'b.stage_id', 's.id')
  .where('s.sequence', 5)
  .select('s.id', 'b.id as bookingId', 'b.version', 'b.starts_at')) as {
  id: string;
  bookingId: string;
  version: number;
  startsAt: Date;
}[];
const moves = stageRows.map((s) => ({
  stageId: String(s.id),
  bookingId: String(s.bookingId),
  version: s.version,
  start: s.startsAt.getTime(),
  later: false,
}));
let nextMove = 0;
/** The first refusal of each status under load, to say why (a refused move is not an error of the bench). */
const refusals = new Map<number, string>();
async function moveLoad(c: number): Promise<Figures> {
  return load(c, {
    path: '/api/stages/0/move',
    requests: [
      {
        method: 'POST',
        setupRequest: (req, ctx) => {
          const context = ctx as Record<string, unknown>;
          const m = moves[nextMove++ % moves.length]!;
          context.move = m;
          m.later = !m.later;
          const startsAt = new Date(m.start + (m.later ? 7 * DAY : 0)).toISOString();
          return {
            ...req,
            path: `/api/stages/${m.stageId}/move`,
            headers: { ...req.headers, 'content-type': 'application/json', 'x-csrf-token': csrf },
            body: JSON.stringify({
              startsAt,
              versions: { [m.bookingId]: m.version },
              dependents: 'none',
              askAgain: [],
            }),
          };
        },
        onResponse: (status, body, ctx) => {
          const context = ctx as Record<string, unknown>;
          const m = context.move as (typeof moves)[number];
          if (status >= 400 && !refusals.has(status)) refusals.set(status, body.slice(0, 300));
          if (status === 200)
            m.version =
              (JSON.parse(body) as { bookings: { id: string; version: number }[] }).bookings.find(
                (b) => b.id === m.bookingId,
              )?.version ?? m.version;
          else m.later = !m.later;
        },
      },
    ],
  });
}
/** One request as the load sends it, to say why a refusal was refused. */
async function tryOnce(pathname: string, body: unknown): Promise<void> {
  const res = await fetch(base + pathname, {
    method: 'POST',
    headers: { cookie, 'content-type': 'application/json', 'x-csrf-token': csrf },
    body: JSON.stringify(body),
  });
  if (!res.ok)
    console.log(
      `  (a single ${pathname.split('/').slice(0, 3).join('/')}… answered ${res.status}: ${(await res.text()).slice(0, 300)})`,
    );
}
{
  const m = moves[moves.length - 1]!;
  await tryOnce(`/api/stages/${m.stageId}/move`, {
    startsAt: new Date(m.start + 7 * DAY).toISOString(),
    versions: { [m.bookingId]: m.version },
    dependents: 'none',
    askAgain: [],
  });
}
console.log('\nPOST /api/stages/:id/move (one stage, its own booking):');
for (const c of CONNECTIONS)
  console.log(`  ${String(c).padStart(2)} connection${c > 1 ? 's' : ' '} ${fmt(await moveLoad(c))}`);
for (const [status, body] of refusals) console.log(`  (first ${status} under load: ${body})`);

// 3. Batch create: the first stage of five new jobs each request, on the installer's own crews.
async function unbookedStages(knexx: Knex, count: number): Promise<{ stageId: string; resourceId: string }[]> {
  const [installer] = await knexx('firms').where('name', 'Bench Installer').select('id');
  const jobRows = await knexx('jobs')
    .insert(
      Array.from({ length: count }, (_, j) => ({
        firm_id: installer.id,
        reference: `N-${j}`,
        customer_name: `New customer ${j}`,
        site_address: `${j} New Road`,
        site_town: 'Benchley',
        site_postcode: 'LS1 4AP',
        installation_type: 'in_ground',
        status: 'planned',
      })),
    )
    .returning('id');
  const stages = await knexx('stages')
    .insert(
      jobRows.map((job) => ({
        job_id: job.id,
        kind: 'excavation',
        name: 'Stage 1',
        sequence: 1,
        duration_minutes: 240,
        requirements: JSON.stringify([{ kind: 'install_crew', count: 1 }]),
      })),
    )
    .returning('id');
  const crews = await knexx('resources')
    .where({ firm_id: installer.id, kind: 'install_crew' })
    .orderBy('id')
    .pluck('id');
  crewCount = crews.length;
  return stages.map((s, i) => ({ stageId: String(s.id), resourceId: String(crews[i % crews.length]) }));
}
/** How many crews the new stages take turns on (stage n on crew n mod this). */
let crewCount = 1;
const fresh = await unbookedStages(knex, 6000);
let nextStage = 0;
const BATCH = 5;
async function batchLoad(c: number): Promise<Figures> {
  return load(c, {
    path: '/api/bookings/batch',
    requests: [
      {
        method: 'POST',
        setupRequest: (req) => {
          const items = Array.from({ length: BATCH }, () => {
            const n = nextStage++;
            const s = fresh[n % fresh.length]!;
            // Each crew's own next half day from week 6 on, weekdays only: no two bookings of the
            // load share a crew and a time (they did once, and the engine rightly refused the clashes).
            const turn = Math.floor(n / crewCount);
            const workday = Math.floor(turn / 2);
            const day = 35 + Math.floor(workday / 5) * 7 + (workday % 5);
            return {
              stageId: s.stageId,
              resourceId: s.resourceId,
              startsAt: new Date(START + day * DAY + (turn % 2) * 4 * 3_600_000).toISOString(),
            };
          });
          return {
            ...req,
            headers: { ...req.headers, 'content-type': 'application/json', 'x-csrf-token': csrf },
            body: JSON.stringify({ bookings: items }),
          };
        },
      },
    ],
  });
}
{
  const s = fresh[fresh.length - 1]!;
  await tryOnce('/api/bookings/batch', {
    // A Monday in week 44, far from the load's own half days.
    bookings: [{ stageId: s.stageId, resourceId: s.resourceId, startsAt: new Date(START + 301 * DAY).toISOString() }],
  });
}
console.log(`\nPOST /api/bookings/batch (${BATCH} stages of ${BATCH} jobs a request):`);
for (const c of CONNECTIONS)
  console.log(`  ${String(c).padStart(2)} connection${c > 1 ? 's' : ' '} ${fmt(await batchLoad(c))}`);
console.log(`\nLoad average at the end: ${os.loadavg()[0]!.toFixed(2)}`);

child.kill('SIGTERM');
await new Promise((resolve) => child.once('exit', resolve));
await pool.end();
await local.close();
await knex.destroy();
