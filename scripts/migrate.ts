/** Migrations (and, with --seed, the demo scenario) against DATABASE_URL: `tsx scripts/migrate.ts latest|rollback|down-all [--seed]`. */
import { createKnex, migrationConfig } from '../server/db.ts';
import { seedDemo } from '../seeds/demo.ts';

const command = process.argv[2] ?? 'latest';
const url = process.env.DATABASE_URL;
if (!url) {
  console.error('DATABASE_URL is not set');
  process.exit(1);
}
const knex = createKnex(url, { min: 0, max: 2 });
try {
  if (command === 'latest') {
    const [, applied] = (await knex.migrate.latest(migrationConfig)) as [number, string[]];
    if (applied.length) console.log(`Applied ${applied.length} migration(s).`);
  } else if (command === 'rollback') {
    await knex.migrate.rollback(migrationConfig);
  } else if (command === 'down-all') {
    await knex.migrate.rollback(migrationConfig, true);
  } else {
    throw new Error(`unknown command ${command}`);
  }
  if (process.argv.includes('--seed')) {
    const result = await seedDemo(knex);
    console.log(
      result.skipped
        ? 'Demo data already present.'
        : `Seeded the demo scenario: ${result.jobs} jobs, ${result.bookings} bookings.`,
    );
  }
} finally {
  await knex.destroy();
}
