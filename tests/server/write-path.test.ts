import { afterAll, afterEach, beforeAll, describe, expect, it, vi } from 'vitest';
import request from 'supertest';
import { readdirSync, readFileSync, statSync } from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { account, signIn, startTestApp, type Agent, type TestContext } from '../helpers/server.ts';
import { may, ROLES, type Role } from '../../shared/permissions.ts';
import { BookingWriter } from '../../server/services/booking-writes.ts';
import { LinkSigner } from '../../server/services/links.ts';

/**
 * One door for every booking change: the routes that change bookings all pass through
 * BookingWriter.run (lock, state machine, engine check, outbox, audit, stream), and no other
 * server code writes the bookings table.
 */

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..', '..');
const WRITER = 'server/services/booking-writes.ts';

function sourceFiles(dir: string): string[] {
  return readdirSync(path.join(root, dir)).flatMap((name) => {
    const rel = path.join(dir, name);
    return statSync(path.join(root, rel)).isDirectory() ? sourceFiles(rel) : rel.endsWith('.ts') ? [rel] : [];
  });
}

describe('the bookings table', () => {
  it('is written by the guarded write path alone (no other server or worker code inserts, updates or deletes bookings)', () => {
    const offenders: string[] = [];
    for (const file of [...sourceFiles('server'), ...sourceFiles('workers')]) {
      if (file === WRITER) continue;
      // Statement by statement: a query on bookings (query builder or SQL) that writes.
      for (const statement of readFileSync(path.join(root, file), 'utf8').split(/;\s*\n/)) {
        const onBookings =
          /\(\s*['"]bookings(?: as \w+)?['"]\s*\)|\bBooking\.query\(|\b(?:UPDATE|INTO|FROM)\s+bookings\b/i.test(
            statement,
          );
        const writes =
          /\.(?:insert|update|patch|patchAndFetchById|updateAndFetchById|del|delete|deleteById|upsertGraph|insertGraph)\(|\b(?:UPDATE\s+bookings|INSERT\s+INTO\s+bookings|DELETE\s+FROM\s+bookings)\b/i.test(
            statement,
          );
        if (onBookings && writes) offenders.push(`${file}: ${statement.trim().slice(0, 120)}`);
      }
    }
    expect(offenders).toEqual([]);
  });
});

describe('every route that changes bookings', () => {
  let ctx: TestContext;
  const agents = new Map<Role, Agent>();
  const run = vi.spyOn(BookingWriter.prototype, 'run');

  beforeAll(async () => {
    ctx = await startTestApp();
    for (const role of ROLES) {
      agents.set(
        role,
        await signIn(ctx, (role === 'partner' ? account('partner', 'Brightspark Electrical') : account(role)).email),
      );
    }
  });
  afterAll(async () => {
    await ctx.close();
  });
  afterEach(() => {
    run.mockClear();
  });

  // An id no row has: the write path must still be entered (and answer 404 from inside it).
  const none = '999999';
  const bodies: Record<string, object> = {
    'post /api/bookings': { stageId: none, resourceId: none, startsAt: '2026-11-03T08:00:00Z' },
    'post /api/bookings/batch': { bookings: [{ stageId: none, resourceId: none, startsAt: '2026-11-03T08:00:00Z' }] },
    'patch /api/bookings/:id': { version: 1, startsAt: '2026-11-03T08:00:00Z', endsAt: '2026-11-03T09:00:00Z' },
    'delete /api/bookings/:id': {},
    'post /api/bookings/:id/progress': { state: 'on_site', version: 1 },
    'post /api/bookings/:id/publish': { version: 1 },
    'post /api/bookings/:id/cancel': { version: 1 },
    'post /api/bookings/:id/proposal/accept': { version: 1 },
    'post /api/bookings/:id/proposal/refuse': { version: 1 },
    'post /api/stages/:id/move': { startsAt: '2026-11-03T08:00:00Z', versions: {} },
    'post /api/partner/slots/:id/answer': { version: 1, action: 'confirm' },
    'put /api/partner/slots/:id/person': { resourceId: none, version: 1 },
    'post /answer/:token': {},
  };
  const changesBookings = (method: string, p: string) =>
    method !== 'get' &&
    (/^\/api\/(bookings|stages)\b/.test(p) ||
      /^\/api\/partner\/slots\/:id\/(answer|person)$/.test(p) ||
      p === '/answer/:token');

  it('is known to this test (a new one must be added above, with a body)', () => {
    const routes = ctx.waterline.routes.routes
      .filter((r) => changesBookings(r.method, r.path))
      .map((r) => `${r.method} ${r.path}`);
    expect(routes.length).toBeGreaterThanOrEqual(13);
    expect(routes.filter((r) => !(r in bodies))).toEqual([]);
  });

  it('enters the guarded write path', async () => {
    const signer = new LinkSigner(ctx.config.LINK_SECRET);
    for (const route of ctx.waterline.routes.routes.filter((r) => changesBookings(r.method, r.path))) {
      const key = `${route.method} ${route.path}`;
      run.mockClear();
      let res;
      if (route.path === '/answer/:token') {
        const token = await signer.signAnswer({
          bookingId: none,
          version: 1,
          action: 'confirm',
          expiresAt: new Date(Date.now() + 86_400_000),
        });
        res = await request(ctx.waterline.app).post(`/answer/${token}`).type('form').send({});
      } else {
        const role = ROLES.find(
          (r) => route.access === 'public' || route.access === 'signed-in' || may(r, route.access as never),
        )!;
        const agent = agents.get(role)!;
        const url = route.path.replace(':id', none) + (route.method === 'delete' ? '?version=1' : '');
        res = await agent[route.method](url).set('X-CSRF-Token', agent.csrf).send(bodies[key]);
      }
      expect(run, `${key} answered ${res.status} ${JSON.stringify(res.body)}`).toHaveBeenCalled();
      expect([404, 410], key).toContain(res.status);
    }
  });
});
