import knexFactory, { type Knex } from 'knex';
import { Model, knexSnakeCaseMappers } from 'objection';
import pg from 'pg';
import { readdir } from 'node:fs/promises';
import path from 'node:path';
import { fileURLToPath } from 'node:url';

// bigint ids come back as strings (exact); count(*) too. timestamptz stays a Date.
pg.types.setTypeParser(pg.types.builtins.DATE, (v) => v);
pg.types.setTypeParser(pg.types.builtins.NUMERIC, (v) => Number(v));

export function createKnex(databaseUrl: string, pool = { min: 0, max: 10 }): Knex {
  const knex = knexFactory({ client: 'pg', connection: databaseUrl, pool, ...knexSnakeCaseMappers() });
  Model.knex(knex);
  return knex;
}

const migrationsDir = path.join(path.dirname(fileURLToPath(import.meta.url)), '..', 'migrations');

/**
 * knex's own loader can't import .ts files inside vitest, so migrations are listed and imported here.
 */
export const migrationSource: Knex.MigrationSource<string> = {
  async getMigrations() {
    return (await readdir(migrationsDir)).filter((f) => /^\d+_.+\.ts$/.test(f)).sort();
  },
  getMigrationName: (name) => name,
  async getMigration(name) {
    return (await import(path.join(migrationsDir, name))) as Knex.Migration;
  },
};

export const migrationConfig: Knex.MigratorConfig = { migrationSource, tableName: 'knex_migrations' };
