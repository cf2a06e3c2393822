import knexFactory, { type Knex } from 'knex';
import { Model, knexSnakeCaseMappers } from 'objection';
import pg from 'pg';
import { readdir } from 'node:fs/promises';
import path from 'node:path';
import { fileURLToPath } from 'node:url';

// bigint ids come back as strings (exact); count(*) too. timestamptz stays a Date.
pg.types.setTypeParser(pg.types.builtins.DATE, (v) => v);
pg.types.setTypeParser(pg.types.builtins.NUMERIC, (v) => Number(v));

/**
 * Longest a request waits for a pooled connection before it answers 503 (knex's default is 60 s).
 * Long enough for a queue of writers on one stage to take their turns (each waits for the one before
 * it under the write path's locks); a database that is down fails faster than this, as each new
 * connection's refusal reaches the waiting request at once.
 */
export const ACQUIRE_TIMEOUT_MS = 20_000;
/** Longest one new connection may take to open (node-postgres waits for ever by default). */
export const CONNECT_TIMEOUT_MS = 3000;

/**
 * The pool: a request meets a stopped or unreachable database within a few seconds (→ 503
 * database-unavailable in errors.ts) instead of hanging, and connections cut by a database restart
 * are dropped by knex and opened anew, so the process serves again once the database is back.
 */
export function createKnex(databaseUrl: string, pool = { min: 0, max: 10 }): Knex {
  const knex = knexFactory({
    client: 'pg',
    connection: { connectionString: databaseUrl, connectionTimeoutMillis: CONNECT_TIMEOUT_MS, keepAlive: true },
    pool,
    acquireConnectionTimeout: ACQUIRE_TIMEOUT_MS,
    ...knexSnakeCaseMappers(),
  });
  Model.knex(knex);
  return knex;
}

const migrationsDir = path.join(path.dirname(fileURLToPath(import.meta.url)), '..', 'migrations');

/**
 * knex's own loader can't import .ts files inside vitest, so migrations are listed and imported here.
 * From source they are the .ts files; in the production build (`dist-server/`) the compiled .js
 * beside this file. Either way a migration is recorded under its source name (`…_jobs_bookings.ts`),
 * so a database migrated by one is up to date for the other.
 */
export const migrationSource: Knex.MigrationSource<string> = {
  async getMigrations() {
    return (await readdir(migrationsDir)).filter((f) => /^\d+_.+\.(ts|js)$/.test(f) && !f.endsWith('.d.ts')).sort();
  },
  getMigrationName: (name) => name.replace(/\.js$/, '.ts'),
  async getMigration(name) {
    return (await import(path.join(migrationsDir, name))) as Knex.Migration;
  },
};

export const migrationConfig: Knex.MigratorConfig = { migrationSource, tableName: 'knex_migrations' };
