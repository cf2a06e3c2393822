import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { seedDemo } from '../../seeds/demo.ts';
import { DEMO_ACCOUNTS } from '../../seeds/demo-accounts.ts';
import { ROLES } from '../../shared/permissions.ts';
import { SEEDED_TABLES, startTestApp, TEST_TODAY, type TestContext } from '../helpers/server.ts';

let ctx: TestContext;
beforeAll(async () => { ctx = await startTestApp(); });
afterAll(async () => { await ctx.close(); });

const count = async (table: string) => Number((await ctx.knex(table).count<{ count: string }[]>('* as count'))[0]!.count);

describe('the demo scenario', () => {
  it('is seeded once: a second run adds nothing', async () => {
    const before = { jobs: await count('jobs'), bookings: await count('bookings'), users: await count('users') };
    expect(await seedDemo(ctx.knex, { today: TEST_TODAY })).toEqual({ skipped: true, jobs: 0, bookings: 0 });
    expect({ jobs: await count('jobs'), bookings: await count('bookings'), users: await count('users') }).toEqual(before);
  });

  it('has the firms, machines and jobs the product is shown with', async () => {
    const firms = await ctx.knex('firms').orderBy('name').select('name', 'kind');
    expect(firms.filter((f) => f.kind === 'installer')).toHaveLength(2);
    expect(new Set(firms.map((f) => f.kind))).toEqual(new Set(['installer', 'groundworks', 'plant_hire', 'crane_hire', 'haulage', 'electrical']));
    const tideway = await ctx.knex('firms').where('name', 'Tideway Hot Tubs').first();
    const kinds = await ctx.knex('resources').where('firm_id', tideway.id).select('kind', 'ownership');
    const countOf = (kind: string) => kinds.filter((k) => k.kind === kind).length;
    expect(countOf('install_crew')).toBe(3);
    expect(countOf('excavator')).toBe(2);
    expect(countOf('dumper')).toBe(1);
    expect(countOf('pallet_truck')).toBe(4);
    expect(countOf('rollers')).toBe(1);
    expect(kinds.some((k) => k.ownership === 'hired')).toBe(true);
    expect(await ctx.knex('jobs').where('firm_id', tideway.id).count<{ count: string }[]>('* as count').then((r) => Number(r[0]!.count))).toBeGreaterThanOrEqual(20);
    // Moorview shares Brightspark Electrical with Tideway.
    const shared = await ctx.knex('partnerships as p').join('firms as f', 'f.id', 'p.partner_firm_id').where('f.name', 'Brightspark Electrical').count<{ count: string }[]>('* as count');
    expect(Number(shared[0]!.count)).toBe(2);
  });

  it('has a demo account for every role', () => {
    expect(new Set(DEMO_ACCOUNTS.map((a) => a.role))).toEqual(new Set(ROLES));
  });

  it('spreads the work over the coming six weeks', async () => {
    const span = (await ctx.knex('bookings').min('starts_at as first').max('ends_at as last').first())!;
    const weeks = (new Date(span.last).getTime() - TEST_TODAY.getTime()) / (7 * 86_400_000);
    expect(weeks).toBeGreaterThan(4);
    expect(weeks).toBeLessThan(9);
    expect(new Date(span.first).getTime()).toBeLessThan(TEST_TODAY.getTime());
  });

  it('can be seeded on any day of the year (npm start seeds it on the day it first runs)', async () => {
    // Days that once broke it or sit on edges: a Wednesday in December, the day after each clock
    // change, a bank holiday, a Saturday, and the first of the year.
    const days = ['2026-12-02T09:00:00Z', '2027-03-29T08:00:00Z', '2026-10-26T09:00:00Z', '2026-12-25T10:00:00Z', '2027-05-15T10:00:00Z', '2027-01-01T09:00:00Z'];
    for (const day of days) {
      await ctx.knex.raw(`TRUNCATE ${SEEDED_TABLES.join(', ')} RESTART IDENTITY CASCADE`);
      const result = await seedDemo(ctx.knex, { today: new Date(day) });
      expect(result.skipped, day).toBe(false);
      expect(result.bookings, day).toBeGreaterThan(100);
    }
  });
});
