import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { account, idOf, signIn, startTestApp, type Agent, type TestContext } from '../helpers/server.ts';
import { PERMISSIONS, ROLES, type Role } from '../../shared/permissions.ts';
import { SCOPED_MODELS } from '../../server/models/index.ts';
import { ScopedModel } from '../../server/models/base.ts';
import type { RouteSpec } from '../../server/routes/table.ts';

let ctx: TestContext;
const agents = new Map<Role, Agent>();
let ids: Record<string, string>;

beforeAll(async () => {
  ctx = await startTestApp();
  for (const role of ROLES) {
    const demo = role === 'partner' ? account('partner', 'Brightspark Electrical') : account(role);
    agents.set(role, await signIn(ctx, demo.email));
  }
  const k = ctx.knex;
  const tidewayJob = await idOf(k, 'jobs', { reference: 'TW-2405' });
  ids = {
    tideway: await idOf(k, 'firms', { name: 'Tideway Hot Tubs' }),
    tidewayJob,
    tidewayStage: await idOf(k, 'stages', { job_id: tidewayJob, kind: 'handover' }),
    tidewayBooking: String((await k('bookings').join('stages', 'stages.id', 'bookings.stage_id').where('stages.job_id', tidewayJob).first('bookings.id')).id),
    crewOtter: await idOf(k, 'resources', { name: 'Crew Otter' }),
    moorviewJob: await idOf(k, 'jobs', { reference: 'MV-118' }),
    moorviewBooking: String((await k('bookings').join('stages', 'stages.id', 'bookings.stage_id').join('jobs', 'jobs.id', 'stages.job_id').where('jobs.reference', 'MV-118').first('bookings.id')).id),
  };
});
afterAll(async () => { await ctx.close(); });

describe('the route table', () => {
  it('holds every route Express knows, each with an access rule', () => {
    const table = new Set(ctx.waterline.routes.routes.map((r) => `${r.method.toUpperCase()} ${r.path}`));
    const express: string[] = [];
    for (const layer of (ctx.waterline.app.router as unknown as { stack: { route?: { path: string; methods: Record<string, boolean> } }[] }).stack) {
      if (!layer.route) continue;
      for (const m of Object.keys(layer.route.methods)) express.push(`${m.toUpperCase()} ${layer.route.path}`);
    }
    expect(express.length).toBeGreaterThan(10);
    expect(express.filter((r) => !table.has(r))).toEqual([]);
    for (const r of ctx.waterline.routes.routes) {
      expect(r.access === 'public' || r.access === 'signed-in' || r.access in PERMISSIONS, `${r.method} ${r.path}`).toBe(true);
    }
  });

  it('refuses to take a route without an access rule', async () => {
    const { RouteTable } = await import('../../server/routes/table.ts');
    expect(() => new RouteTable().get('/api/x', undefined as never, () => undefined)).toThrow(/no access rule/);
  });

  it('has a firm scope on every model services query', () => {
    for (const model of SCOPED_MODELS) {
      expect(Object.prototype.hasOwnProperty.call(model, 'scope'), model.name).toBe(true);
      expect(model.scope).not.toBe(ScopedModel.scope);
    }
  });
});

/** A request that the route would accept from a permitted role. */
function sample(route: RouteSpec): { path: string; body?: unknown; query?: Record<string, string> } {
  const path = route.path.replace(':id', route.path.includes('bookings') ? ids.tidewayBooking! : ids.tidewayJob!);
  switch (`${route.method} ${route.path}`) {
    case 'put /api/session/firm': return { path, body: { firmId: ids.tideway } };
    case 'get /api/bookings': return { path, query: { from: '2026-06-01T00:00:00Z', to: '2026-07-01T00:00:00Z' } };
    case 'post /api/jobs': return { path, body: { reference: `T-${Math.random().toString(36).slice(2, 8)}`, customerName: 'Test Person', siteAddress: '1 Test Row', siteTown: 'Leeds', sitePostcode: 'LS1 4AP', installationType: 'slab' } };
    case 'post /api/bookings': return { path, body: { stageId: ids.tidewayStage, resourceId: ids.crewOtter, startsAt: '2026-09-01T08:00:00Z', endsAt: '2026-09-01T09:00:00Z' } };
    case 'patch /api/bookings/:id': return { path, body: { version: 1, startsAt: '2026-09-02T08:00:00Z', endsAt: '2026-09-02T09:00:00Z' } };
    default: return { path };
  }
}

function allowed(route: RouteSpec, role: Role): boolean {
  if (route.access === 'public' || route.access === 'signed-in') return true;
  return (PERMISSIONS[route.access] as readonly Role[]).includes(role);
}

describe('each role on each route', () => {
  it('is let through exactly where its permissions say, and refused (403) elsewhere', async () => {
    // The live board stream stays open by design; its access is checked in tests/server/board.test.ts.
    const routes = ctx.waterline.routes.routes.filter((r) => r.path.startsWith('/api') && r.access !== 'public' && r.path !== '/api/board/stream');
    const verdicts: string[] = [];
    for (const route of routes) {
      for (const role of ROLES) {
        const agent = agents.get(role)!;
        const { path, body, query } = sample(route);
        let req = agent[route.method](path).set('X-CSRF-Token', agent.csrf);
        if (query) req = req.query(query);
        const res = await (body ? req.send(body as object) : req);
        const expectAllowed = allowed(route, role);
        const ok = expectAllowed ? ![401, 403].includes(res.status) && res.status < 500 : res.status === 403;
        if (!ok) verdicts.push(`${role} ${route.method.toUpperCase()} ${route.path} → ${res.status} (expected ${expectAllowed ? 'allowed' : '403'})`);
      }
    }
    expect(verdicts).toEqual([]);
  }, 90_000);

  it('answers 401 problem+json to a signed-out caller on every non-public API route', async () => {
    const request = (await import('supertest')).default;
    for (const route of ctx.waterline.routes.routes.filter((r) => r.path.startsWith('/api') && r.access !== 'public')) {
      // A signed-out stream request is refused before it opens, so it returns like any other.
      const res = await request(ctx.waterline.app)[route.method](sample(route).path);
      expect(res.status, `${route.method} ${route.path}`).toBe(401);
      expect(res.headers['content-type']).toMatch(/application\/problem\+json/);
    }
  });
});

describe("another firm's ids", () => {
  it('give 404, never data', async () => {
    const scheduler = agents.get('scheduler')!;
    const job = await scheduler.get(`/api/jobs/${ids.moorviewJob}`).expect(404);
    expect(job.body).toMatchObject({ status: 404, title: 'Not found' });
    expect(JSON.stringify(job.body)).not.toContain('Alan Frost');
    await scheduler.get(`/api/bookings/${ids.moorviewBooking}`).expect(404);
    await scheduler.patch(`/api/bookings/${ids.moorviewBooking}`).set('X-CSRF-Token', scheduler.csrf)
      .send({ version: 1, startsAt: '2026-09-02T08:00:00Z', endsAt: '2026-09-02T09:00:00Z' }).expect(404);
    const moorviewFirm = await idOf(ctx.knex, 'firms', { name: 'Moorview Spas' });
    await scheduler.put('/api/session/firm').set('X-CSRF-Token', scheduler.csrf).send({ firmId: moorviewFirm }).expect(404);
  });

  it('never appear in lists', async () => {
    const jobs = await agents.get('manager')!.get('/api/jobs?pageSize=200').expect(200);
    const tidewayJobs = await ctx.knex('jobs').where('firm_id', ids.tideway).count<{ count: string }[]>('* as count');
    expect(jobs.body.total).toBe(Number(tidewayJobs[0]!.count));
    expect(jobs.body.items.map((j: { reference: string }) => j.reference)).not.toContain('MV-118');
    const firms = await agents.get('viewer')!.get('/api/firms').expect(200);
    expect(firms.body.items.map((f: { name: string }) => f.name)).not.toContain('Moorview Spas');
  });
});

describe('a partner coordinator', () => {
  it("sees only bookings of their own firm's resources, from every installer they work with", async () => {
    const res = await agents.get('partner')!.get('/api/bookings').query({ from: '2026-05-01T00:00:00Z', to: '2026-08-01T00:00:00Z' }).expect(200);
    const brightspark = await ctx.knex('resources').join('firms', 'firms.id', 'resources.firm_id').where('firms.name', 'Brightspark Electrical').pluck('resources.id');
    expect(res.body.items.length).toBeGreaterThan(0);
    for (const b of res.body.items) expect(brightspark.map(String)).toContain(b.resourceId);
    expect(res.body.items.map((b: { jobReference: string }) => b.jobReference)).toContain('MV-118');
    await agents.get('partner')!.get(`/api/bookings/${ids.tidewayBooking}`).expect(404);
  });
});

describe('a crew member', () => {
  it('sees only the resources they work as', async () => {
    const res = await agents.get('crew')!.get('/api/resources').expect(200);
    expect(res.body.items.map((r: { name: string }) => r.name).sort()).toEqual(['Connor Reid', 'Crew Heron']);
  });
});
