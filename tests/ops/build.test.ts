import { spawn } from 'node:child_process';
import { randomBytes } from 'node:crypto';
import { readdirSync, readFileSync } from 'node:fs';
import path from 'node:path';
import knexFactory, { type Knex } from 'knex';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { migrationConfig } from '../../server/db.ts';
import { account, signIn } from '../helpers/server.ts';
import {
  assertFreshBuild,
  DIST_SERVER,
  NO_TYPESCRIPT,
  root,
  startNode,
  startWeb,
  until,
  WEB_ENTRY,
  WORKER_ENTRY,
} from '../helpers/processes.ts';

/**
 * The production build (`npm run build`: the client by Vite into dist/, the server side by tsc into
 * dist-server/) run the way README's production section says: migrations and the web process with
 * plain node, no tsx, against a database of its own that only the compiled migrations have touched.
 */

const testUrl = new URL(process.env.DATABASE_URL ?? 'postgres://unset/unset');
const buildDb = `${testUrl.pathname.slice(1)}_build`;
const buildUrl = Object.assign(new URL(testUrl), { pathname: `/${buildDb}` }).toString();
let admin: Knex;
const stops: (() => Promise<void>)[] = [];

/** Runs `node <args>` to its end with the no-TypeScript guard loaded; its exit code and output. */
function runNode(args: string[], env: NodeJS.ProcessEnv): Promise<{ code: number | null; output: string }> {
  return new Promise((resolve) => {
    let output = '';
    const child = spawn(process.execPath, ['--import', NO_TYPESCRIPT, ...args], {
      cwd: root,
      env: { ...process.env, NODE_OPTIONS: '', ...env },
      stdio: ['ignore', 'pipe', 'pipe'],
    });
    child.stdout.on('data', (c: Buffer) => {
      output += c.toString();
    });
    child.stderr.on('data', (c: Buffer) => {
      output += c.toString();
    });
    child.once('exit', (code) => resolve({ code, output }));
  });
}

beforeAll(async () => {
  assertFreshBuild();
  admin = knexFactory({ client: 'pg', connection: process.env.DATABASE_URL, pool: { min: 0, max: 1 } });
  await admin.raw('DROP DATABASE IF EXISTS ??', [buildDb]);
  await admin.raw('CREATE DATABASE ??', [buildDb]);
});

afterAll(async () => {
  for (const stop of stops.reverse()) await stop();
  await admin.raw('DROP DATABASE IF EXISTS ?? WITH (FORCE)', [buildDb]);
  await admin.destroy();
});

describe('the production build', () => {
  it('the guard it runs under refuses TypeScript: the source entry point fails at once', async () => {
    const { code, output } = await runNode(['server/index.ts'], { DATABASE_URL: buildUrl });
    expect(code).not.toBe(0);
    expect(output).toContain('no TypeScript at run time, yet');
  });

  it('migrates an empty database with the compiled migrations, which the source migrator then finds complete', async () => {
    const { code, output } = await runNode([path.join(DIST_SERVER, 'scripts', 'migrate.js'), 'latest', '--seed'], {
      DATABASE_URL: buildUrl,
    });
    expect(code, output).toBe(0);
    const sources = readdirSync(path.join(root, 'migrations'))
      .filter((f) => /^\d+_.+\.ts$/.test(f))
      .sort();
    expect(output).toContain(`Applied ${sources.length} migration(s).`);
    expect(output).toMatch(/Seeded the demo scenario: \d+ jobs/);

    // Recorded under their source names, so development and production agree on what has run.
    const knex = knexFactory({ client: 'pg', connection: buildUrl, pool: { min: 0, max: 1 } });
    try {
      const [done, pending] = (await knex.migrate.list(migrationConfig)) as [{ name: string }[], unknown[]];
      expect(pending).toEqual([]);
      expect(done.map((m) => m.name)).toEqual(sources);
    } finally {
      await knex.destroy();
    }
  }, 240_000);

  it('serves with plain node in production mode: ready, signed-in API calls, the built client, a clean stop', async () => {
    const web = await startWeb('web', {
      NODE_ENV: 'production',
      DATABASE_URL: buildUrl,
      LOG_LEVEL: 'warn',
      MAIL_QUEUE: `build-test-${process.pid}`,
      SESSION_SECRET: randomBytes(24).toString('base64url'),
      LINK_SECRET: randomBytes(32).toString('base64url'),
    });
    stops.push(() => web.stop());
    expect(web.child.spawnargs).toEqual([process.execPath, '--import', NO_TYPESCRIPT, WEB_ENTRY]);

    const ready = await fetch(`${web.url}/api/health/ready`);
    expect(ready.status).toBe(200);
    expect(await ready.json()).toMatchObject({ ready: true, database: { status: 'ok' }, queue: { status: 'ok' } });

    const scheduler = await signIn({ waterline: { app: web.url } }, account('scheduler').email);
    const session = await scheduler.get('/api/session').expect(200);
    expect(session.body).toMatchObject({ user: { email: account('scheduler').email } });
    const jobs = await scheduler.get('/api/jobs').expect(200);
    expect(JSON.stringify(jobs.body)).toContain('TW-2417');
    // A write through the CSRF check and the write path: a new job.
    const created = await scheduler.post('/api/jobs').set('X-CSRF-Token', scheduler.csrf).send({
      reference: 'BUILD-1',
      customerName: 'Ida Penrose',
      siteAddress: '4 Wren Close',
      siteTown: 'Ilkley',
      sitePostcode: 'LS29 9AB',
      installationType: 'slab',
    });
    expect(created.status, JSON.stringify(created.body)).toBe(201);

    // The client Vite built, found from dist-server/ (a page route gets the app's index.html).
    const page = await fetch(`${web.url}/board`);
    expect(page.headers.get('content-type')).toMatch(/^text\/html/);
    expect(await page.text()).toBe(readFileSync(path.join(root, 'dist', 'index.html'), 'utf8'));

    await web.stop('SIGTERM');
    expect(await web.exited, web.output()).toBe(0);
    expect(web.output()).toContain('SIGTERM: shutting down');
  }, 240_000);

  it('runs the worker with plain node until SIGTERM', async () => {
    const worker = startNode('worker', WORKER_ENTRY, {
      NODE_ENV: 'production',
      DATABASE_URL: buildUrl,
      LOG_LEVEL: 'info',
      MAIL_QUEUE: `build-test-${process.pid}`,
      SESSION_SECRET: randomBytes(24).toString('base64url'),
      LINK_SECRET: randomBytes(32).toString('base64url'),
      PUBLIC_URL: 'https://plan.build-test.example',
    });
    stops.push(() => worker.stop());
    await until('the worker to start', () => worker.output().includes('mail worker started'), 120_000, worker.output);
    await worker.stop('SIGTERM');
    expect(await worker.exited, worker.output()).toBe(0);
    expect(worker.output()).toContain('finishing the mail in hand');
  }, 180_000);
});
