import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import request from 'supertest';
import type { AddressInfo } from 'node:net';
import type { Server } from 'node:http';
import { account, idOf, signIn, startTestApp, type Agent, type TestContext } from '../helpers/server.ts';
import { PERMISSIONS, ROLES, type Role } from '../../shared/permissions.ts';
import { SCOPED_MODELS } from '../../server/models/index.ts';
import { ScopedModel } from '../../server/models/base.ts';
import type { RouteSpec } from '../../server/routes/table.ts';
import { SERVER_OWNED_PAGES } from '../../src/service-worker/routes.ts';

/**
 * The access matrix, generated from the permission table (shared/permissions.ts) and the route
 * table Express actually mounted: every role on every route, with its own firm's ids and with
 * another firm's. A new route or permission is covered without touching this file, unless it takes
 * a kind of id the matrix does not know yet (then the matrix fails and says so).
 */

let ctx: TestContext;
const agents = new Map<Role, Agent>();

/** The kinds of id routes take, by the path they sit under. */
type IdKind =
  | 'job'
  | 'stage'
  | 'booking'
  | 'file'
  | 'person'
  | 'hire'
  | 'resource'
  | 'absence'
  | 'closure'
  | 'calendar'
  | 'invitation'
  | 'member';
type Reach = 'office' | 'crew' | 'partner';
const reachOfRole = (role: Role): Reach => (role === 'crew' ? 'crew' : role === 'partner' ? 'partner' : 'office');

/** Ids each reach may see (its own) and ids of another firm, per kind. */
let own: Record<Reach, Record<IdKind, string>>;
let other: Record<Reach, Record<IdKind, string>>;
let tideway: string;
/** Tideway's hired machine and its supplier (the demo's hire), for a hire the sweep can record. */
let hired: { supplierFirmId: string; resourceId: string };

const first = async (q: Promise<{ id: string | number } | undefined>) => String((await q)!.id);

beforeAll(async () => {
  ctx = await startTestApp();
  for (const role of ROLES) {
    const demo = role === 'partner' ? account('partner', 'Brightspark Electrical') : account(role);
    agents.set(role, await signIn(ctx, demo.email));
  }
  const k = ctx.knex;
  tideway = await idOf(k, 'firms', { name: 'Tideway Hot Tubs' });
  const moorview = await idOf(k, 'firms', { name: 'Moorview Spas' });
  const bookingOf = (where: (q: ReturnType<typeof k>) => unknown) => {
    const q = k('bookings')
      .join('stages', 'stages.id', 'bookings.stage_id')
      .join('jobs', 'jobs.id', 'stages.job_id')
      .join('resources', 'resources.id', 'bookings.resource_id')
      .orderBy('bookings.id');
    where(q);
    return q.first('bookings.id', 'bookings.stage_id as stageId', 'jobs.id as jobId') as Promise<{
      id: string;
      stageId: string;
      jobId: string;
    }>;
  };

  // Tideway's office: job TW-2405 and one of its bookings; its approved hire of the 3 t excavator.
  const twJob = await idOf(k, 'jobs', { reference: 'TW-2405' });
  const twBooking = await bookingOf((q) => q.where('jobs.id', twJob));
  // Crew Connor Reid works as Crew Heron: one of Heron's bookings and its job.
  const heron = await bookingOf((q) => q.where('resources.name', 'Crew Heron').where('jobs.firm_id', tideway));
  // Brightspark's coordinator: a slot (sent) of its own people, and Tom Ashworth.
  const slot = await bookingOf((q) => q.where('resources.name', 'Priya Nair').where('bookings.state', 'sent'));
  const tom = await idOf(k, 'resources', { name: 'Tom Ashworth' });
  const twHire = await first(k('hire_periods').where('hirer_firm_id', tideway).first('id'));
  const hire = await k('hire_periods').where('id', twHire).first('supplier_firm_id', 'resource_id');
  hired = { supplierFirmId: String(hire.supplierFirmId), resourceId: String(hire.resourceId) };

  // Another installer's rows: Moorview's job, stage and booking, a file and a hire period of theirs.
  const mvJob = await idOf(k, 'jobs', { reference: 'MV-118' });
  const mv = await bookingOf((q) => q.where('jobs.id', mvJob));
  const [mvFile] = await k('job_files')
    .insert({
      job_id: mvJob,
      object_key: 'jobs/mv/plan.pdf',
      name: 'plan.pdf',
      content_type: 'application/pdf',
      size_bytes: 10,
    })
    .returning('id');
  const priya = await idOf(k, 'resources', { name: 'Priya Nair' });
  const [mvHire] = await k('hire_periods')
    .insert({
      resource_id: priya,
      hirer_firm_id: moorview,
      supplier_firm_id: await idOf(k, 'firms', { name: 'Brightspark Electrical' }),
      on_hire_at: new Date('2026-06-08T07:00:00Z'),
      off_hire_at: new Date('2026-06-08T16:00:00Z'),
      day_rate_pence: 30000,
      status: 'requested',
    })
    .returning('id');
  // Another partner firm's: a crane booking of Fellside's, and Northgate's electrician.
  const crane = await bookingOf((q) => q.where('resources.name', 'like', '%crane%'));
  const gareth = await idOf(k, 'resources', { name: 'Gareth Pryce' });
  const mvCrew = await idOf(k, 'resources', { name: 'Moorview crew' });
  // Time away of each firm's own resources (a week in September 2026).
  const away = async (resource: string) =>
    first(
      k('calendar_exceptions')
        .insert({
          resource_id: resource,
          starts_at: new Date('2026-09-14T00:00:00Z'),
          ends_at: new Date('2026-09-19T00:00:00Z'),
          reason: 'Holiday',
        })
        .returning('id')
        .then((rows) => rows[0]),
    );
  const otter = await idOf(k, 'resources', { name: 'Crew Otter' });
  const absence = {
    tideway: await away(otter),
    moorview: await away(mvCrew),
    tom: await away(tom),
    gareth: await away(gareth),
  };
  // A works shutdown of each firm, on the firm's first calendar (how closures are listed).
  const closed = async (firm: string) =>
    first(
      k('calendar_exceptions')
        .insert({
          calendar_id: k('calendars')
            .where('firm_id', await idOf(k, 'firms', { name: firm }))
            .orderBy('id')
            .first('id'),
          starts_at: new Date('2026-12-24T00:00:00Z'),
          ends_at: new Date('2026-12-29T00:00:00Z'),
          reason: 'Works shutdown',
        })
        .returning('id')
        .then((rows) => rows[0]),
    );
  // Each firm's first working calendar (its standard week).
  const calendarOf = async (firm: string) =>
    first(
      k('calendars')
        .where('firm_id', await idOf(k, 'firms', { name: firm }))
        .orderBy('id')
        .first('id'),
    );
  const calendar = {
    tideway: await calendarOf('Tideway Hot Tubs'),
    moorview: await calendarOf('Moorview Spas'),
    brightspark: await calendarOf('Brightspark Electrical'),
    northgate: await calendarOf('Northgate Electrical'),
  };
  const closure = {
    tideway: await closed('Tideway Hot Tubs'),
    moorview: await closed('Moorview Spas'),
    brightspark: await closed('Brightspark Electrical'),
    northgate: await closed('Northgate Electrical'),
  };

  // An invitation of each installer, not yet accepted.
  const invited = async (firm: string, email: string) =>
    first(
      k('invitations')
        .insert({
          firm_id: await idOf(k, 'firms', { name: firm }),
          email,
          role: 'crew',
          expires_at: new Date('2026-12-31T00:00:00Z'),
        })
        .returning('id')
        .then((rows) => rows[0]),
    );
  const invitation = {
    tideway: await invited('Tideway Hot Tubs', 'new.fitter@tideway.example'),
    moorview: await invited('Moorview Spas', 'new.fitter@moorview.example'),
  };

  // A person of each installer that the write pass may change (their role as it stands, so nothing moves).
  const memberOf = async (firm: string, email: string) => {
    const [user] = await k('users')
      .insert({ email, name: email.split('@')[0] })
      .returning('id');
    await k('memberships').insert({
      user_id: user.id,
      firm_id: await idOf(k, 'firms', { name: firm }),
      role: 'viewer',
    });
    return String(user.id);
  };
  const member = {
    tideway: await memberOf('Tideway Hot Tubs', 'spare.viewer@tideway.example'),
    moorview: await memberOf('Moorview Spas', 'spare.viewer@moorview.example'),
  };

  // No file of Tideway's exists: the own-id pass below only checks a write's access rule (never a 404).
  const noFile = '999999999';
  own = {
    office: {
      job: twJob,
      stage: twBooking.stageId,
      booking: twBooking.id,
      file: noFile,
      person: tom,
      hire: twHire,
      resource: otter,
      absence: absence.tideway,
      closure: closure.tideway,
      calendar: calendar.tideway,
      invitation: invitation.tideway,
      member: member.tideway,
    },
    crew: {
      job: String(heron.jobId),
      stage: String(heron.stageId),
      booking: String(heron.id),
      file: noFile,
      person: tom,
      hire: twHire,
      resource: otter,
      absence: absence.tideway,
      closure: closure.tideway,
      calendar: calendar.tideway,
      invitation: invitation.tideway,
      member: member.tideway,
    },
    partner: {
      job: String(slot.jobId),
      stage: String(slot.stageId),
      booking: String(slot.id),
      file: noFile,
      person: tom,
      hire: twHire,
      resource: tom,
      absence: absence.tom,
      closure: closure.brightspark,
      calendar: calendar.brightspark,
      invitation: invitation.tideway,
      member: member.tideway,
    },
  };
  const theirs = {
    job: mvJob,
    stage: String(mv.stageId),
    booking: String(mv.id),
    file: String(mvFile.id),
    person: mvCrew,
    hire: String(mvHire.id),
    resource: mvCrew,
    absence: absence.moorview,
    closure: closure.moorview,
    calendar: calendar.moorview,
    invitation: invitation.moorview,
    member: member.moorview,
  };
  other = {
    office: theirs,
    crew: theirs,
    partner: {
      ...theirs,
      booking: String(crane.id),
      person: gareth,
      resource: gareth,
      absence: absence.gareth,
      closure: closure.northgate,
      calendar: calendar.northgate,
    },
  };
});
afterAll(async () => {
  await ctx.close();
});

describe('the route table', () => {
  it('holds every route Express knows, each with an access rule', () => {
    const table = new Set(ctx.waterline.routes.routes.map((r) => `${r.method.toUpperCase()} ${r.path}`));
    const express: string[] = [];
    for (const layer of (
      ctx.waterline.app.router as unknown as { stack: { route?: { path: string; methods: Record<string, boolean> } }[] }
    ).stack) {
      if (!layer.route) continue;
      for (const m of Object.keys(layer.route.methods)) express.push(`${m.toUpperCase()} ${layer.route.path}`);
    }
    expect(express.length).toBeGreaterThan(10);
    expect(express.filter((r) => !table.has(r))).toEqual([]);
    for (const r of ctx.waterline.routes.routes) {
      expect(
        r.access === 'public' || r.access === 'signed-in' || r.access in PERMISSIONS,
        `${r.method} ${r.path}`,
      ).toBe(true);
    }
  });

  it("is never answered from a phone's kept copy of the app: every route the server owns is one the service worker leaves to it", () => {
    const paths = ctx.waterline.routes.routes.map((r) => r.path.replace(/:[^/]+/g, 'x'));
    expect(paths.length).toBeGreaterThan(10);
    expect(paths.filter((p) => !SERVER_OWNED_PAGES.some((re) => re.test(p)))).toEqual([]);
    // …and the app's own pages are the service worker's to open without a signal.
    for (const page of ['/board', '/my-work', '/jobs/12', '/sign-in', '/slots'])
      expect(
        SERVER_OWNED_PAGES.some((re) => re.test(page)),
        page,
      ).toBe(false);
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

  it('checks every permission of the table on at least one route', () => {
    const used = new Set(ctx.waterline.routes.routes.map((r) => r.access));
    expect(Object.keys(PERMISSIONS).filter((p) => !used.has(p as never))).toEqual([]);
  });

  it('checks each read against its own permission, not a borrowed one', () => {
    const rule = (method: string, path: string) =>
      ctx.waterline.routes.routes.find((r) => r.method === method && r.path === path)?.access;
    expect(rule('get', '/api/board')).toBe('board:read');
    expect(rule('get', '/api/board/stream')).toBe('board:read');
    expect(rule('get', '/api/jobs/:id')).toBe('jobs:read');
    expect(rule('get', '/api/bookings/:id')).toBe('bookings:read');
    expect(rule('get', '/api/day-sheets')).toBe('day-sheets:read');
    expect(rule('get', '/api/my-work')).toBe('my-work:read');
    expect(rule('get', '/api/partner/slots')).toBe('slots:read');
    expect(rule('get', '/api/partner/day-sheets')).toBe('slots:read');
  });
});

const RANGE = { from: '2026-06-01T00:00:00Z', to: '2026-06-29T00:00:00Z' };
/** Queries a read needs to get past validation, so it reaches the service. */
const QUERIES: Record<string, Record<string, string>> = {
  '/api/board': RANGE,
  '/api/bookings': RANGE,
  '/api/my-work': RANGE,
  '/api/day-sheets': { date: '2026-06-08' },
  '/api/partner/day-sheets': { date: '2026-06-08' },
};

function idKindOf(path: string): IdKind | null {
  if (!path.includes(':id')) return null;
  const kinds: [string, IdKind][] = [
    ['/api/jobs/', 'job'],
    ['/api/stages/', 'stage'],
    ['/api/bookings/', 'booking'],
    ['/api/files/', 'file'],
    ['/api/partner/slots/', 'booking'],
    ['/api/partner/people/', 'person'],
    ['/api/hire-periods/', 'hire'],
    ['/api/resources/', 'resource'],
    ['/api/absences/', 'absence'],
    ['/api/firm/closures/', 'closure'],
    ['/api/firm/calendars/', 'calendar'],
    ['/api/firm/invitations/', 'invitation'],
    ['/api/firm/members/', 'member'],
  ];
  const found = kinds.find(([prefix]) => path.startsWith(prefix));
  if (!found) throw new Error(`the access matrix has no id for ${path}: add its kind to idKindOf`);
  return found[1];
}

function pathFor(route: RouteSpec, ids: Record<IdKind, string>): string {
  const kind = idKindOf(route.path);
  return route.path.replace(':installationType', 'slab').replace(':id', kind ? ids[kind] : '');
}

const DAY = [{ from: '08:00', to: '17:00' }];

/** A body valid enough that a write reaches its lookup (so another firm's id meets the scope, not the validator). */
function validBody(
  route: RouteSpec,
  ids: Record<IdKind, string>,
): { body?: object; query?: Record<string, string>; file?: boolean } {
  switch (`${route.method} ${route.path}`) {
    case 'patch /api/bookings/:id':
      return { body: { version: 1, startsAt: '2026-09-02T08:00:00Z', endsAt: '2026-09-02T09:00:00Z' } };
    case 'delete /api/bookings/:id':
      return { query: { version: '1' } };
    case 'post /api/bookings/:id/progress':
      return { body: { state: 'on_site', version: 1 } };
    case 'post /api/stages/:id/move':
      return { body: { startsAt: '2026-09-02T08:00:00Z', versions: {} } };
    case 'patch /api/jobs/:id':
      return { body: { version: 1, accessNotes: 'Side gate' } };
    case 'put /api/jobs/:id/survey':
      return { body: { version: 0, survey: { accessWidthMm: 900, groundType: 'clay' } } };
    case 'post /api/jobs/:id/files':
      return { file: true };
    case 'post /api/partner/slots/:id/answer':
      return { body: { version: 1, action: 'confirm' } };
    case 'put /api/partner/slots/:id/person':
      return { body: { resourceId: ids.person, version: 1 } };
    case 'patch /api/hire-periods/:id':
      return { body: { version: 1, status: 'ended' } };
    case 'delete /api/hire-periods/:id':
      // An old version: refused as stale (409), so the hire stays for later passes.
      return { query: { version: '99' } };
    case 'put /api/resources/:id/members':
      return { body: { personIds: [], previousPersonIds: [] } };
    case 'put /api/firm/members/:id':
      return { body: { role: 'viewer', previousRole: 'viewer' } };
    case 'delete /api/firm/members/:id':
      // The role shown is not theirs: refused as stale (409), so the person stays for later passes.
      return { query: { role: 'crew' } };
    case 'patch /api/resources/:id':
      return { body: { name: 'Crew Renamed', previousName: 'Crew Heron' } };
    case 'put /api/firm/calendars/:id':
      return {
        // The demo's own standard week (Mon–Fri 08:00–17:00): taken, it leaves the plan as it was.
        body: { version: 1, hours: { mon: DAY, tue: DAY, wed: DAY, thu: DAY, fri: DAY, sat: [], sun: [] } },
      };
    case 'patch /api/firm/calendars/:id':
      return { body: { name: 'Renamed week', previousName: 'Standard week' } };
    case 'put /api/resources/:id/calendar':
      return { body: { calendarId: ids.calendar, was: ids.calendar } };
    case 'put /api/firm/holiday-region':
      return { body: { holidayRegion: 'GB-ENG', was: 'GB-ENG' } };
    // Routes without an id, so the hostile-input sweep below reaches past validation into the service.
    case 'post /api/bookings':
      return { body: { stageId: ids.stage, resourceId: ids.resource, startsAt: '2026-09-02T08:00:00Z' } };
    case 'post /api/bookings/batch':
      return {
        body: { bookings: [{ stageId: ids.stage, resourceId: ids.resource, startsAt: '2026-09-02T08:00:00Z' }] },
      };
    case 'post /api/jobs':
      return {
        body: {
          reference: 'TW-3999',
          customerName: 'Ines Calloway',
          siteAddress: '4 Heron Row',
          siteTown: 'Otley',
          sitePostcode: 'LS21 3AB',
          installationType: 'slab',
        },
      };
    case 'post /api/resources':
      return { body: { name: 'Crew Sweep', category: 'crew', kind: 'install_crew' } };
    case 'post /api/firm/calendars':
      return { body: { name: 'Sweep week' } };
    case 'post /api/firm/invitations':
      return { body: { email: 'sweep@tideway.example', role: 'viewer' } };
    case 'post /api/plan/slots':
      return { body: { stageId: ids.stage, resourceKind: 'install_crew' } };
    case 'post /api/plan/auto-place':
      return { body: { jobIds: [ids.job], budgetMs: 0 } };
    case 'post /api/hire-periods':
      return {
        body: { ...hired, onHireAt: '2026-10-05T07:00:00Z', offHireAt: '2026-10-09T16:00:00Z', dayRatePence: 14500 },
      };
    case 'put /api/jobs/:id/price':
      return { body: { pricePence: 1_250_000, wasPence: null } };
    case 'post /api/jobs/:id/payments/deposit':
      return { body: { amountPence: 10_000 } };
    case 'put /api/firm/settings':
      return { body: { keepPhotoLocation: false } };
    case 'post /api/firm/closures':
    case 'post /api/resources/:id/absences':
      return { body: { from: '2026-09-21', to: '2026-09-21', reason: 'Holiday' } };
    default:
      if (
        /^post \/api\/bookings\/:id\/(publish|cancel|proposal\/accept|proposal\/refuse)$/.test(
          `${route.method} ${route.path}`,
        )
      )
        return { body: { version: 1 } };
      return {};
  }
}

async function call(
  role: Role,
  route: RouteSpec,
  path: string,
  options: { body?: object; query?: Record<string, string>; file?: boolean },
) {
  const agent = agents.get(role)!;
  let req = agent[route.method](path).set('X-CSRF-Token', agent.csrf);
  if (options.query) req = req.query(options.query);
  if (options.file) return req.attach('file', Buffer.from('%PDF-1.4\n%%EOF\n'), 'note.pdf');
  return options.body ? req.send(options.body) : req;
}

function allowed(route: RouteSpec, role: Role): boolean {
  if (route.access === 'public' || route.access === 'signed-in') return true;
  return (PERMISSIONS[route.access] as readonly Role[]).includes(role);
}

const apiRoutes = () =>
  ctx.waterline.routes.routes.filter(
    (r) => r.path.startsWith('/api') && r.access !== 'public' && r.path !== '/api/board/stream',
  );

describe('each role on each route (generated from the two tables)', () => {
  // Runs first: another firm's ids change nothing, so the own-id passes below see the demo as seeded.
  it("gets 404 for another firm's id on every route taking one, wherever the role is let through (403 where it is not)", async () => {
    const verdicts: string[] = [];
    for (const route of apiRoutes().filter((r) => idKindOf(r.path))) {
      for (const role of ROLES) {
        const ids = other[reachOfRole(role)];
        const res = await call(role, route, pathFor(route, ids), validBody(route, ids));
        const expected = allowed(route, role) ? 404 : 403;
        if (res.status !== expected)
          verdicts.push(
            `${role} ${route.method.toUpperCase()} ${route.path} → ${res.status} ${JSON.stringify(res.body).slice(0, 160)} (expected ${expected})`,
          );
        else expect(JSON.stringify(res.body)).not.toMatch(/Alan Frost|Valley Drive/);
      }
    }
    expect(verdicts).toEqual([]);
  }, 120_000);

  it('reads: let through with its own ids exactly where the table says (never 401/403/404), refused with 403 elsewhere', async () => {
    const verdicts: string[] = [];
    for (const route of apiRoutes().filter((r) => r.method === 'get')) {
      for (const role of ROLES) {
        const res = await call(role, route, pathFor(route, own[reachOfRole(role)]), { query: QUERIES[route.path] });
        const ok = allowed(route, role)
          ? ![401, 403, 404].includes(res.status) && res.status < 500
          : res.status === 403;
        if (!ok)
          verdicts.push(
            `${role} GET ${route.path} → ${res.status} (expected ${allowed(route, role) ? 'allowed' : '403'})`,
          );
      }
    }
    expect(verdicts).toEqual([]);
  }, 120_000);

  it('writes: let through exactly where the table says, refused with 403 elsewhere', async () => {
    const verdicts: string[] = [];
    // An empty body: the access rule is what is tested here, not the write (nothing is changed).
    const sample = (route: RouteSpec): { body?: object } =>
      route.path === '/api/session/firm' ? { body: { firmId: tideway } } : { body: {} };
    for (const route of apiRoutes().filter((r) => r.method !== 'get')) {
      for (const role of ROLES) {
        const res = await call(role, route, pathFor(route, own[reachOfRole(role)]), sample(route));
        const ok = allowed(route, role) ? ![401, 403].includes(res.status) && res.status < 500 : res.status === 403;
        if (!ok)
          verdicts.push(
            `${role} ${route.method.toUpperCase()} ${route.path} → ${res.status} (expected ${allowed(route, role) ? 'allowed' : '403'})`,
          );
      }
    }
    expect(verdicts).toEqual([]);
  }, 120_000);

  it('opens the live board stream exactly to the roles the table lets read the board', async () => {
    const server: Server = ctx.waterline.app.listen(0, '127.0.0.1');
    try {
      await new Promise((r) => server.once('listening', r));
      const port = (server.address() as AddressInfo).port;
      const stream = ctx.waterline.routes.routes.find((r) => r.path === '/api/board/stream')!;
      for (const role of ROLES) {
        const agent = agents.get(role)!;
        const cookie = (
          agent as unknown as { jar: { getCookie: (n: string, o: object) => { toValueString(): string } } }
        ).jar
          .getCookie('waterline.sid', { domain: '127.0.0.1', path: '/', secure: false, script: false })
          .toValueString();
        const controller = new AbortController();
        const res = await fetch(`http://127.0.0.1:${port}/api/board/stream`, {
          headers: { cookie },
          signal: controller.signal,
        });
        expect(res.status, role).toBe(allowed(stream, role) ? 200 : 403);
        controller.abort();
      }
    } finally {
      server.close();
    }
  });

  it('answers 401 problem+json to a signed-out caller on every non-public API route', async () => {
    for (const route of ctx.waterline.routes.routes.filter((r) => r.path.startsWith('/api') && r.access !== 'public')) {
      // A signed-out stream request is refused before it opens, so it returns like any other.
      const res = await request(ctx.waterline.app)[route.method](pathFor(route, own.office));
      expect(res.status, `${route.method} ${route.path}`).toBe(401);
      expect(res.headers['content-type']).toMatch(/application\/problem\+json/);
    }
  });
});

describe("another firm's ids", () => {
  it('give 404, never data', async () => {
    const scheduler = agents.get('scheduler')!;
    const job = await scheduler.get(`/api/jobs/${other.office.job}`).expect(404);
    expect(job.body).toMatchObject({ status: 404, title: 'Not found' });
    expect(JSON.stringify(job.body)).not.toContain('Alan Frost');
    await scheduler.get(`/api/bookings/${other.office.booking}`).expect(404);
    await scheduler
      .patch(`/api/bookings/${other.office.booking}`)
      .set('X-CSRF-Token', scheduler.csrf)
      .send({ version: 1, startsAt: '2026-09-02T08:00:00Z', endsAt: '2026-09-02T09:00:00Z' })
      .expect(404);
    const moorviewFirm = await idOf(ctx.knex, 'firms', { name: 'Moorview Spas' });
    await scheduler
      .put('/api/session/firm')
      .set('X-CSRF-Token', scheduler.csrf)
      .send({ firmId: moorviewFirm })
      .expect(404);
  });

  it('never appear in lists', async () => {
    const jobs = await agents.get('manager')!.get('/api/jobs?pageSize=200').expect(200);
    const tidewayJobs = await ctx.knex('jobs').where('firm_id', tideway).count<{ count: string }[]>('* as count');
    expect(jobs.body.total).toBe(Number(tidewayJobs[0]!.count));
    expect(jobs.body.items.map((j: { reference: string }) => j.reference)).not.toContain('MV-118');
    const firms = await agents.get('viewer')!.get('/api/firms').expect(200);
    expect(firms.body.items.map((f: { name: string }) => f.name)).not.toContain('Moorview Spas');
  });
});

describe('a crew member', () => {
  it('sees only the resources they work as', async () => {
    const res = await agents.get('crew')!.get('/api/resources').expect(200);
    expect(res.body.items.map((r: { name: string }) => r.name).sort()).toEqual(['Connor Reid', 'Crew Heron']);
  });
});

describe('hostile input on every route (generated from the route table)', () => {
  const HOSTILE: [string, unknown][] = [
    ['NUL', 'a\u0000b'],
    ['year 9999', '9999-12-31T23:59:59Z'],
    ['year 275760', '+275760-09-13T00:00:00Z'],
    ['date 9999', '9999-12-31'],
    ['1e308', 1e308],
    ['-1', -1],
    ['2^53+2', 9007199254740994],
    ['1.5', 1.5],
    ['object', { a: 1 }],
    ['array', ['x']],
    ['null', null],
    ['true', true],
    ['lone surrogate', '\ud800'],
    ['long text', 'x'.repeat(20_000)],
  ];
  const FIELDS = [
    'version',
    'startsAt',
    'endsAt',
    'from',
    'to',
    'date',
    'name',
    'reason',
    'note',
    'notes',
    'accessNotes',
    'state',
    'action',
    'resourceId',
    'stageId',
    'jobId',
    'firmId',
    'personIds',
    'previousPersonIds',
    'role',
    'previousRole',
    'previousName',
    'calendarId',
    'was',
    'hours',
    'survey',
    'status',
    'onHire',
    'offHire',
    'onHireDate',
    'offHireDate',
    'dailyRate',
    'amount',
    'amountPence',
    'email',
    'reference',
    'customerName',
    'siteAddress',
    'siteTown',
    'sitePostcode',
    'installationType',
    'promisedBy',
    'kind',
    'versions',
    'items',
    'bookings',
    'region',
    'stepMinutes',
    'bookingStepMinutes',
    'token',
    'ids',
    'jobIds',
    'earliest',
    'horizonDays',
  ];
  it('never answers 500, and every refusal is problem+json', async () => {
    const verdicts: string[] = [];
    // The owner reaches every office route; a crew member and a partner reach their own few.
    for (const role of ['owner', 'crew', 'partner'] as const)
      for (const route of apiRoutes().filter((r) => allowed(r, role) && r.path !== '/api/session/firm')) {
        const ids = own[reachOfRole(role)];
        const path = pathFor(route, ids);
        const base = validBody(route, ids);
        const bodies: [string, unknown][] = [];
        for (const [what, value] of HOSTILE) {
          bodies.push([`every field ${what}`, Object.fromEntries(FIELDS.map((f) => [f, value]))]);
          for (const f of Object.keys(base.body ?? {})) bodies.push([`${f} ${what}`, { ...base.body, [f]: value }]);
        }
        bodies.push(['array body', []], ['text body', 'x'], ['number body', 7]);
        // The base itself passes validation, so each change of one field is what is refused or taken.
        if (base.body) {
          const agent = agents.get(role)!;
          const req = agent[route.method](path).set('X-CSRF-Token', agent.csrf);
          if (base.query) req.query(base.query);
          const res = await req.send(base.body);
          if (res.status === 400)
            verdicts.push(
              `${role} ${route.method.toUpperCase()} ${route.path}: its base body is refused ${JSON.stringify(res.body.errors)}`,
            );
        }
        for (const [what, body] of bodies) {
          const agent = agents.get(role)!;
          const req = agent[route.method](path).set('X-CSRF-Token', agent.csrf).set('Content-Type', 'application/json');
          if (base.query) req.query(base.query);
          const res = await req.send(JSON.stringify(body));
          const ok =
            res.status < 500 &&
            (res.status < 400 || /application\/problem\+json/.test(res.headers['content-type'] ?? ''));
          if (!ok)
            verdicts.push(
              `${role} ${route.method.toUpperCase()} ${route.path} ${what} → ${res.status} ${JSON.stringify(res.body).slice(0, 200)}`,
            );
        }
      }
    expect(verdicts).toEqual([]);
  }, 600_000);

  it('never answers 500 to a read, whatever its query holds', async () => {
    const VALUES = [
      'a\u0000b',
      '9999-12-31T23:59:59Z',
      '+275760-09-13T00:00:00Z',
      '9999-12-31',
      '0000-01-01',
      '-1',
      '1e308',
      '1.5',
      '\ud800',
      'x'.repeat(600),
    ];
    const KEYS = [
      'from',
      'to',
      'date',
      'search',
      'page',
      'pageSize',
      'jobId',
      'resourceId',
      'stageId',
      'firmId',
      'kind',
      'status',
      'state',
      'weeks',
      'days',
      'version',
      'role',
      'q',
      'sort',
    ];
    const verdicts: string[] = [];
    for (const role of ['owner', 'crew', 'partner'] as const)
      for (const route of apiRoutes().filter((r) => r.method === 'get' && allowed(r, role))) {
        const agent = agents.get(role)!;
        const path = pathFor(route, own[reachOfRole(role)]);
        const queries: [string, Record<string, string | string[]>][] = VALUES.map((v) => [
          JSON.stringify(v).slice(0, 30),
          { ...QUERIES[route.path], ...Object.fromEntries(KEYS.map((k) => [k, v])) },
        ]);
        queries.push(['repeated keys', Object.fromEntries(KEYS.map((k) => [k, ['2026-06-01', '2026-06-02']]))]);
        for (const [what, query] of queries) {
          const res = await agent.get(path).query(query);
          const ok =
            res.status < 500 &&
            (res.status < 400 || /application\/problem\+json/.test(res.headers['content-type'] ?? ''));
          if (!ok)
            verdicts.push(
              `${role} GET ${route.path} ${what} → ${res.status} ${JSON.stringify(res.body).slice(0, 200)}`,
            );
        }
      }
    expect(verdicts).toEqual([]);
  }, 600_000);
});

/** Where a route's `version` lives, so both requests carry the current one and truly race. */
const VERSION_OF: Record<IdKind, string | undefined> = {
  booking: 'bookings',
  job: 'jobs',
  hire: 'hire_periods',
  calendar: 'calendars',
  stage: undefined,
  file: undefined,
  person: undefined,
  resource: undefined,
  absence: undefined,
  closure: undefined,
  invitation: undefined,
  member: undefined,
};

/**
 * A booking of the caller's own firm still ahead (pencilled or confirmed, on its own crew), a new
 * one for each booking route: the seeded ids of the matrix are done bookings, which every change
 * refuses before any lock is taken.
 */
async function liveBooking(role: 'owner' | 'crew' | 'partner', taken: Set<string>) {
  const q = ctx
    .knex('bookings')
    .join('resources', 'resources.id', 'bookings.resource_id')
    .join('stages', 'stages.id', 'bookings.stage_id')
    .join('jobs', 'jobs.id', 'stages.job_id')
    .where('bookings.starts_at', '>', new Date('2026-06-08T00:00:00Z'))
    .whereNotIn('bookings.id', [...taken])
    .orderBy('bookings.starts_at')
    .first('bookings.id', 'bookings.stage_id', 'bookings.version', 'bookings.starts_at', 'bookings.ends_at');
  if (role === 'partner') q.where('resources.name', 'Priya Nair').where('bookings.state', 'sent');
  else if (role === 'crew')
    q.where('resources.name', 'Crew Heron').whereIn('bookings.state', ['pencilled', 'confirmed']);
  else q.where('jobs.firm_id', tideway).where('resources.firm_id', tideway).where('bookings.state', 'pencilled');
  const row = await q;
  if (row === undefined) return undefined;
  taken.add(String(row.id));
  return row as { id: string; stageId: string; version: number; startsAt: Date; endsAt: Date };
}

/** The route's valid body (see validBody) made current: the version stored now, a crew's people as they are. */
async function current(route: RouteSpec, ids: Record<IdKind, string>) {
  const base = validBody(route, ids);
  if (`${route.method} ${route.path}` === 'put /api/resources/:id/members') {
    const people = (await ctx.knex('crew_members').where('crew_id', ids.resource).orderBy('person_id')).map(
      (m: { personId: string }) => String(m.personId),
    );
    return { body: { personIds: people, previousPersonIds: people } };
  }
  const kind = idKindOf(route.path);
  const table = kind ? VERSION_OF[kind] : undefined;
  if (!kind || !table) return base;
  if (route.path.endsWith('/survey')) {
    const survey = await ctx.knex('surveys').where('job_id', ids.job).first('version');
    return { ...base, body: { ...base.body, version: survey?.version ?? 0 } };
  }
  const row = await ctx.knex(table).where('id', ids[kind]).first('version');
  if (row === undefined) return base;
  const body = base.body && 'version' in base.body ? { ...base.body, version: row.version } : base.body;
  const query = base.query && 'version' in base.query ? { ...base.query, version: String(row.version) } : base.query;
  return { ...base, body, query };
}

/** The ids a route is sent with: a booking still ahead for booking and stage routes (see liveBooking). */
async function idsFor(role: 'owner' | 'crew' | 'partner', path: string, taken: Set<string>) {
  const ids = own[reachOfRole(role)];
  const kind = idKindOf(path);
  if (kind !== 'booking' && kind !== 'stage') return ids;
  const live = await liveBooking(role, taken);
  return live ? { ...ids, booking: String(live.id), stage: String(live.stageId) } : ids;
}

/** What a route is sent: its valid body at the current version; a move or a booking's change a day later. */
async function optionsFor(route: RouteSpec, ids: Record<IdKind, string>) {
  const moving = route.path === '/api/stages/:id/move' || `${route.method} ${route.path}` === 'patch /api/bookings/:id';
  if (!moving) return current(route, ids);
  const b = await ctx.knex('bookings').where('id', ids.booking).first('starts_at', 'ends_at', 'version');
  const later = (d: Date) => new Date(d.getTime() + 86_400_000).toISOString();
  return route.path === '/api/stages/:id/move'
    ? { body: { startsAt: later(b.startsAt), versions: { [ids.booking]: b.version } } }
    : { body: { version: b.version, startsAt: later(b.startsAt), endsAt: later(b.endsAt) } };
}

/*
 * A double-click, or two people saving the same thing: every write route the owner, a crew member
 * and a partner may call, sent twice at once. Neither may fail as a 500 or without problem+json, and
 * of two changes from the same version only one may be taken (the other is told it is stale). The
 * row a versioned change writes is held by the test until both requests have read what they read,
 * so the two truly overlap.
 */
describe('two of the same request at once, on every write route (generated from the route table)', () => {
  /**
   * Sends the requests while the test holds the row they change (FOR UPDATE), and lets it go only
   * once each is either answered or waiting on a lock: both have read what they read before either
   * writes, the tightest the two can be. Rows without a version are not held.
   */
  async function heldAtOnce<R extends { status: number }>(
    route: RouteSpec,
    ids: Record<IdKind, string>,
    send: () => PromiseLike<R>[],
  ): Promise<R[]> {
    const kind = idKindOf(route.path);
    const table = kind ? VERSION_OF[kind] : undefined;
    if (!kind || !table) return Promise.all(send());
    const holder = await ctx.knex.transaction();
    let answered = 0;
    let sent: Promise<R[]> | undefined;
    try {
      if (route.path.endsWith('/survey')) await holder('jobs').where('id', ids.job).forUpdate().first('id');
      else await holder(table).where('id', ids[kind]).forUpdate().first('id');
      const requests = send().map((r) => Promise.resolve(r).then((res) => (answered++, res)));
      sent = Promise.all(requests);
      const waiting = async () =>
        Number(
          (
            await ctx.knex.raw(
              `SELECT count(*) AS n FROM pg_stat_activity WHERE datname = current_database() AND wait_event_type = 'Lock'`,
            )
          ).rows[0].n,
        );
      for (const started = Date.now(); Date.now() - started < 10_000;) {
        if (answered + (await waiting()) >= requests.length) break;
        await new Promise((r) => setTimeout(r, 10));
      }
    } finally {
      await holder.commit();
    }
    return sent;
  }

  const versioned = (options: { body?: object; query?: object }) =>
    'version' in (options.body ?? {}) || 'version' in (options.query ?? {});
  const writes = (role: Role) =>
    apiRoutes().filter((r) => r.method !== 'get' && allowed(r, role) && r.path !== '/api/session/firm');
  const name = (route: RouteSpec) => `${route.method.toUpperCase()} ${route.path}`;

  /** Each answer below 500 and every refusal problem+json: what is wrong, else nothing. */
  function unclear(what: string, answers: { status: number; headers: Record<string, string>; body: unknown }[]) {
    return answers
      .filter(
        (res) =>
          res.status >= 500 ||
          (res.status >= 400 && !/application\/problem\+json/.test(res.headers['content-type'] ?? '')),
      )
      .map((res) => `${what} → ${res.status} ${JSON.stringify(res.body).slice(0, 200)}`);
  }

  it('answers both below 500, each refusal problem+json, and at most one of a versioned pair is taken', async () => {
    const verdicts: string[] = [];
    const taken = new Set<string>();
    for (const role of ['owner', 'crew', 'partner'] as const)
      for (const route of writes(role)) {
        const ids = await idsFor(role, route.path, taken);
        const options = await optionsFor(route, ids);
        const path = pathFor(route, ids);
        const both = await heldAtOnce(route, ids, () => [
          call(role, route, path, options),
          call(role, route, path, options),
        ]);
        verdicts.push(...unclear(`${role} ${name(route)}`, both));
        if (versioned(options) && both.every((r) => r.status < 300))
          verdicts.push(`${role} ${name(route)}: both took the same version`);
      }
    expect(verdicts).toEqual([]);
  }, 600_000);

  it('answers two different changes of the same thing at once below 500, and takes at most one from the same version', async () => {
    // Pairs of routes on the same kind of thing (a booking and its stage count as one), each pair on
    // a thing of its own where the kind allows: PATCH and DELETE of one booking, its progress and its
    // withdrawal, a job's details and its survey…
    const group = (path: string) => {
      const kind = idKindOf(path);
      return kind === 'stage' ? 'booking' : kind;
    };
    const verdicts: string[] = [];
    const taken = new Set<string>();
    let pairs = 0;
    for (const role of ['owner', 'crew', 'partner'] as const) {
      const routes = writes(role).filter((r) => group(r.path) !== null);
      for (let i = 0; i < routes.length; i++)
        for (let j = i + 1; j < routes.length; j++) {
          const a = routes[i]!,
            b = routes[j]!;
          if (group(a.path) !== group(b.path)) continue;
          pairs++;
          const ids = await idsFor(role, a.path, taken);
          const [optionsA, optionsB] = [await optionsFor(a, ids), await optionsFor(b, ids)];
          const answers = await heldAtOnce(idKindOf(a.path) === 'stage' ? b : a, ids, () => [
            call(role, a, pathFor(a, ids), optionsA),
            call(role, b, pathFor(b, ids), optionsB),
          ]);
          const what = `${role} ${name(a)} with ${name(b)}`;
          verdicts.push(...unclear(what, answers));
          // Both from the same version of the same row: one of them must be told it is stale.
          const sameRow =
            idKindOf(a.path) === idKindOf(b.path) && !a.path.endsWith('/survey') && !b.path.endsWith('/survey');
          if (sameRow && versioned(optionsA) && versioned(optionsB) && answers.every((r) => r.status < 300))
            verdicts.push(`${what}: both took the same version`);
        }
    }
    expect(pairs).toBeGreaterThan(50);
    expect(verdicts).toEqual([]);
  }, 600_000);
});

/*
 * Another firm's ids where a body names things (a stage, a resource, a week, people, jobs, a unit, a
 * supplier): every write route with such a field, as the owner, a crew member and a partner, with
 * each field in turn given the id of a firm the caller has nothing to do with. None may be taken;
 * the refusal tells nothing of the other firm's thing.
 */
describe("another firm's ids in a request's body", () => {
  it('are never taken, on any write route, by any role', async () => {
    const k = ctx.knex;
    const moorview = await idOf(k, 'firms', { name: 'Moorview Spas' });
    // A unit in Moorview's own catalogue (the demo gives it none).
    const [unit] = await k('units')
      .insert({
        firm_id: moorview,
        model: 'Moor 6',
        maker: 'Moorview',
        length_mm: 2200,
        width_mm: 2200,
        height_mm: 900,
        dry_weight_kg: 400,
        filled_weight_kg: 1900,
        water_litres: 1500,
      })
      .returning('id');
    const theirUnit = String(unit.id);
    const verdicts: string[] = [];
    const taken = new Set<string>();
    let tried = 0;
    for (const role of ['owner', 'crew', 'partner'] as const) {
      const theirs = other[reachOfRole(role)];
      /** The foreign value for a body field naming something, or undefined for any other field. */
      const foreign = (field: string, value: unknown): unknown => {
        const one: Record<string, string> = {
          stageId: theirs.stage,
          resourceId: theirs.resource,
          calendarId: theirs.calendar,
          was: theirs.calendar,
          unitId: theirUnit,
          supplierFirmId: moorview,
        };
        if (field in one) return one[field];
        if (field === 'personIds' || field === 'previousPersonIds') return [theirs.person];
        if (field === 'jobIds') return [theirs.job];
        if (field === 'versions') return { [theirs.booking]: 1 };
        if (field === 'bookings' && Array.isArray(value))
          return value.map((b: object) => ({ ...b, stageId: theirs.stage }));
        return undefined;
      };
      for (const route of apiRoutes().filter(
        (r) => r.method !== 'get' && allowed(r, role) && r.path !== '/api/session/firm',
      )) {
        // Bodies as they would pass now (current versions, a booking still ahead), so each refusal
        // is the foreign id's and not a stale version's.
        const ids = await idsFor(role, route.path, taken);
        const base = await optionsFor(route, ids);
        // A job's unit is left out of the bodies above: try it too where a job is written.
        const fields = Object.entries(base.body ?? {});
        if (/^(post \/api\/jobs|patch \/api\/jobs\/:id)$/.test(`${route.method} ${route.path}`))
          fields.push(['unitId', undefined]);
        for (const [field, value] of fields) {
          const swapped = foreign(field, value);
          if (swapped === undefined) continue;
          tried++;
          const res = await call(role, route, pathFor(route, ids), {
            ...base,
            body: { ...base.body, [field]: swapped },
          });
          if (res.status < 400 || res.status >= 500)
            verdicts.push(
              `${role} ${route.method.toUpperCase()} ${route.path} with their ${field} → ${res.status} ${JSON.stringify(res.body).slice(0, 200)}`,
            );
          else if (JSON.stringify(res.body).includes('Moorview'))
            verdicts.push(
              `${role} ${route.method.toUpperCase()} ${route.path} with their ${field}: the refusal names Moorview`,
            );
        }
      }
    }
    expect(tried).toBeGreaterThanOrEqual(17);
    expect(verdicts).toEqual([]);
  }, 120_000);
});

/*
 * What no other firm may read, planted as marked values in Moorview's rows (an installer Tideway has
 * nothing to do with) and in Tideway's own private fields, then looked for in every read the route
 * table has, as each of Tideway's roles and as Brightspark's partner coordinator (who works for both
 * installers). A marked value in any answer of a firm it is not theirs to read is a leak.
 */
describe('what is not theirs, looked for in every read (generated from the route table)', () => {
  it("no role of another firm reads another firm's householders, prices, reasons, weeks or invitations", async () => {
    const k = ctx.knex;
    const moorview = await idOf(k, 'firms', { name: 'Moorview Spas' });
    const mark = (firm: string, what: string) => `zq${firm}${what}qz`;
    /** Marks every private field of a firm's rows; returns the marked texts and numbers. */
    async function plant(firmId: string, firm: string): Promise<string[]> {
      await k('jobs')
        .where('firm_id', firmId)
        .update({
          customer_phone: `07${firm === 'mv' ? '1' : '2'}00 900${firm === 'mv' ? '111' : '222'}`,
          customer_email: `${mark(firm, 'mail')}@home.example`,
          price_pence: firm === 'mv' ? 987_654_301 : 987_654_302,
        });
      // Names are unique within a firm: the mark, then the calendar's id.
      await k('calendars')
        .where('firm_id', firmId)
        .update({ name: k.raw("? || ' ' || id", [mark(firm, 'week')]) });
      const calendarIds = k('calendars').where('firm_id', firmId).select('id');
      const resourceIds = k('resources').where('firm_id', firmId).select('id');
      await k('calendar_exceptions')
        .whereIn('calendar_id', calendarIds)
        .orWhereIn('resource_id', resourceIds)
        .update({ reason: mark(firm, 'reason') });
      await k('hire_periods')
        .where('hirer_firm_id', firmId)
        .update({ day_rate_pence: firm === 'mv' ? 987_654_311 : 987_654_312 });
      await k('invitations')
        .where('firm_id', firmId)
        .update({ email: `${mark(firm, 'invite')}@example.com` });
      const phones = (await k('jobs').where('firm_id', firmId).distinct('customer_phone')).map(
        (r: { customerPhone: string }) => r.customerPhone,
      );
      return [
        ...phones,
        mark(firm, 'mail'),
        mark(firm, 'week'),
        mark(firm, 'reason'),
        mark(firm, 'invite'),
        String(firm === 'mv' ? 987_654_301 : 987_654_302),
        String(firm === 'mv' ? 987_654_311 : 987_654_312),
      ];
    }
    const theirs = await plant(moorview, 'mv');
    const ours = await plant(tideway, 'tw');
    // Brightspark's own (it has no jobs, and its coordinator keeps no invitations): its people's
    // reasons for time away and its weeks' names.
    const partners = (await plant(await idOf(k, 'firms', { name: 'Brightspark Electrical' }), 'bs')).filter((m) =>
      /^zqbs(reason|week)/.test(m),
    );

    const verdicts: string[] = [];
    let reads = 0;
    /** Everything Tideway's owner and Brightspark's coordinator read: each firm's marks must be in its own (they are readable at all). */
    const ownerRead: string[] = [];
    const partnerRead: string[] = [];
    for (const role of ROLES) {
      // Tideway's roles must not read Moorview's; Brightspark's coordinator neither installer's.
      const forbidden = role === 'partner' ? [...theirs, ...ours] : [...theirs, ...partners];
      const agent = agents.get(role)!;
      for (const route of apiRoutes().filter((r) => r.method === 'get' && allowed(r, role))) {
        for (const ids of [own[reachOfRole(role)], other[reachOfRole(role)]]) {
          const res = await agent.get(pathFor(route, ids)).query(QUERIES[route.path] ?? {});
          reads++;
          const text = res.text ?? '';
          if (role === 'owner') ownerRead.push(text);
          if (role === 'partner') partnerRead.push(text);
          for (const secret of forbidden)
            if (text.includes(secret)) verdicts.push(`${role} GET ${pathFor(route, ids)} reads ${secret}`);
        }
      }
    }
    // The calendar feed of each of Brightspark's people (read by any calendar app, no sign-in).
    const partner = agents.get('partner')!;
    for (const person of ['Tom Ashworth', 'Priya Nair']) {
      const personId = await idOf(k, 'resources', { name: person });
      const feed = await partner
        .post(`/api/partner/people/${personId}/feed`)
        .set('X-CSRF-Token', partner.csrf)
        .expect(201);
      const ics = await request(ctx.waterline.app).get(new URL(feed.body.url).pathname).expect(200);
      expect(ics.text).toMatch(/^BEGIN:VCALENDAR/);
      reads++;
      for (const secret of [...theirs, ...ours])
        if (ics.text.includes(secret)) verdicts.push(`${person}'s calendar feed reads ${secret}`);
    }
    expect(reads).toBeGreaterThan(100);
    expect(ours.filter((mark) => !ownerRead.some((text) => text.includes(mark)))).toEqual([]);
    expect(partners.filter((mark) => !partnerRead.some((text) => text.includes(mark)))).toEqual([]);
    expect(verdicts).toEqual([]);
  }, 300_000);
});

/*
 * Every change is in the audit log: each write route, sent once with a body that changes something,
 * as the owner, a crew member and a partner; whatever it answers with 2xx must have left a row in
 * the audit log. Only the planner's two previews change nothing, by design.
 */
describe('every change audited (generated from the route table)', () => {
  const PREVIEWS = ['post /api/plan/slots', 'post /api/plan/auto-place'];

  it('leaves an audit row for every write a route takes', async () => {
    const k = ctx.knex;
    const audited = async () => Number((await k('audit_log').count('* as n'))[0]!.n);
    // Another week of Tideway's, to move a crew onto (the matrix's body moves it onto its own week).
    const [week] = await k('calendars')
      .insert({ firm_id: tideway, name: 'Audit week', weekly_hours: JSON.stringify({ 1: [[480, 1020]] }) })
      .returning('id');
    const verdicts: string[] = [];
    const taken = new Set<string>();
    let writes = 0;
    for (const role of ['owner', 'crew', 'partner'] as const)
      for (const route of apiRoutes().filter(
        (r) => r.method !== 'get' && allowed(r, role) && r.path !== '/api/session/firm',
      )) {
        let ids = await idsFor(role, route.path, taken);
        // An invitation still open to withdraw (earlier sweeps withdrew the matrix's own).
        if (idKindOf(route.path) === 'invitation') {
          const [open] = await k('invitations')
            .insert({
              firm_id: tideway,
              email: 'audit.sweep@tideway.example',
              role: 'viewer',
              expires_at: new Date('2026-12-31T00:00:00Z'),
            })
            .returning('id');
          ids = { ...ids, invitation: String(open.id) };
        }
        let options = await optionsFor(route, ids);
        // The matrix's bodies that change nothing, made changes.
        const key = `${route.method} ${route.path}`;
        if (key === 'put /api/firm/members/:id') {
          const { role: now } = await k('memberships').where({ user_id: ids.member, firm_id: tideway }).first('role');
          options = { body: { role: now === 'scheduler' ? 'viewer' : 'scheduler', previousRole: now } };
        }
        if (key === 'put /api/firm/holiday-region') {
          const firmId = role === 'partner' ? await idOf(k, 'firms', { name: 'Brightspark Electrical' }) : tideway;
          const { holidayRegion: was } = await k('firms').where('id', firmId).first('holiday_region');
          options = { body: { holidayRegion: was === 'GB-SCT' ? 'GB-ENG' : 'GB-SCT', was } };
        }
        if (key === 'put /api/resources/:id/calendar') {
          const { calendarId } = await k('resources').where('id', ids.resource).first('calendar_id');
          const was = String(calendarId ?? ids.calendar);
          options = { body: { calendarId: String(week.id) === was ? ids.calendar : String(week.id), was } };
        }
        const before = await audited();
        const res = await call(role, route, pathFor(route, ids), options);
        if (res.status >= 300) continue;
        writes++;
        const rows = (await audited()) - before;
        if (PREVIEWS.includes(key)) {
          if (rows !== 0) verdicts.push(`${role} ${key}: a preview wrote ${rows} audit rows`);
        } else if (rows === 0) verdicts.push(`${role} ${key} → ${res.status}, and nothing in the audit log`);
      }
    expect(writes).toBeGreaterThanOrEqual(20);
    expect(verdicts).toEqual([]);
  }, 300_000);
});
