import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { account, idOf, signIn, startTestApp, type Agent, type TestContext } from '../helpers/server.ts';
import { unbookJobs } from '../helpers/demo.ts';

let ctx: TestContext;
let scheduler: Agent;
let stageA: string;
let stageB: string;
let crew: string;

beforeAll(async () => {
  ctx = await startTestApp();
  scheduler = await signIn(ctx, account('scheduler').email);
  // The planned jobs this file books at dates of its own start with nothing booked.
  await unbookJobs(ctx.knex, 'TW-2417', 'TW-2418', 'TW-2420');
  // Two unbooked in-ground jobs from the tray (TW-2422, TW-2423) both need an install crew for the lift.
  stageA = await idOf(ctx.knex, 'stages', {
    job_id: await idOf(ctx.knex, 'jobs', { reference: 'TW-2422' }),
    kind: 'lift',
  });
  stageB = await idOf(ctx.knex, 'stages', {
    job_id: await idOf(ctx.knex, 'jobs', { reference: 'TW-2423' }),
    kind: 'lift',
  });
  crew = await idOf(ctx.knex, 'resources', { name: 'Crew Heron' });
});
afterAll(async () => {
  await ctx.close();
});

const slot = { startsAt: '2026-10-06T08:00:00Z', endsAt: '2026-10-06T12:00:00Z' };

describe('two schedulers confirming the same crew at the same time', () => {
  it('lets exactly one through; PostgreSQL refuses the other with 409', async () => {
    const other = await signIn(ctx, account('owner').email);
    const [a, b] = await Promise.all([
      scheduler
        .post('/api/bookings')
        .set('X-CSRF-Token', scheduler.csrf)
        .send({ stageId: stageA, resourceId: crew, state: 'confirmed', ...slot }),
      other
        .post('/api/bookings')
        .set('X-CSRF-Token', other.csrf)
        .send({ stageId: stageB, resourceId: crew, state: 'confirmed', ...slot }),
    ]);
    expect([a.status, b.status].sort(), JSON.stringify([a.body, b.body])).toEqual([201, 409]);
    const refused = a.status === 409 ? a : b;
    expect(refused.headers['content-type']).toMatch(/application\/problem\+json/);
    expect(refused.body).toMatchObject({ status: 409, code: 'double-booked' });
    const rows = await ctx
      .knex('bookings')
      .where({ resource_id: crew, state: 'confirmed' })
      .where('starts_at', new Date(slot.startsAt));
    expect(rows).toHaveLength(1);
  });

  it("refuses a pencilled booking over the confirmed one with the engine's reason (422)", async () => {
    const stage = await idOf(ctx.knex, 'stages', {
      job_id: await idOf(ctx.knex, 'jobs', { reference: 'TW-2420' }),
      kind: 'lift',
    });
    const res = await scheduler
      .post('/api/bookings')
      .set('X-CSRF-Token', scheduler.csrf)
      .send({ stageId: stage, resourceId: crew, state: 'pencilled', ...slot })
      .expect(422);
    expect(res.headers['content-type']).toMatch(/application\/problem\+json/);
    expect(res.body.violations.map((v: { kind: string }) => v.kind)).toContain('clash');
    expect(await ctx.knex('bookings').where({ stage_id: stage })).toEqual([]);
  });
});

describe('moving a booking', () => {
  let handoverA: string;
  let handoverB: string;
  beforeAll(async () => {
    handoverA = await idOf(ctx.knex, 'stages', {
      job_id: await idOf(ctx.knex, 'jobs', { reference: 'TW-2417' }),
      kind: 'handover',
    });
    handoverB = await idOf(ctx.knex, 'stages', {
      job_id: await idOf(ctx.knex, 'jobs', { reference: 'TW-2418' }),
      kind: 'handover',
    });
  });

  it('saves with the next version and writes the audit log', async () => {
    const res = await scheduler
      .post('/api/bookings')
      .set('X-CSRF-Token', scheduler.csrf)
      .send({
        stageId: handoverA,
        resourceId: await idOf(ctx.knex, 'resources', { name: 'Crew Otter' }),
        startsAt: '2026-10-07T08:00:00Z',
        endsAt: '2026-10-07T09:00:00Z',
      })
      .expect(201);
    const created = { body: res.body.bookings[0] };
    const moved = await scheduler
      .patch(`/api/bookings/${created.body.id}`)
      .set('X-CSRF-Token', scheduler.csrf)
      .send({ version: 1, startsAt: '2026-10-08T08:00:00Z', endsAt: '2026-10-08T09:00:00Z' })
      .expect(200);
    expect(moved.body.bookings[0]).toMatchObject({
      version: 2,
      startsAt: '2026-10-08T08:00:00.000Z',
      endsAt: '2026-10-08T09:00:00.000Z',
      jobReference: 'TW-2417',
    });
    const audit = await ctx.knex('audit_log').where({ entity: 'booking', entity_id: created.body.id }).orderBy('id');
    expect(audit.map((a) => a.action)).toEqual(['create', 'update']);
    expect(audit[1].before.startsAt).toBe('2026-10-07T08:00:00.000Z');
    expect(audit[1].after.startsAt).toBe('2026-10-08T08:00:00.000Z');
    expect(audit[1].actorUserId).toBe(
      String(
        (
          await ctx
            .knex('users')
            .where({ email: account('scheduler').email })
            .first()
        ).id,
      ),
    );
  });

  it('refuses a change based on an old version (409) and leaves the newer one in place', async () => {
    const res = await scheduler
      .post('/api/bookings')
      .set('X-CSRF-Token', scheduler.csrf)
      .send({
        stageId: handoverB,
        resourceId: await idOf(ctx.knex, 'resources', { name: 'Crew Kestrel' }),
        startsAt: '2026-10-09T08:00:00Z',
        endsAt: '2026-10-09T09:00:00Z',
      })
      .expect(201);
    const created = { body: res.body.bookings[0] };
    await scheduler
      .patch(`/api/bookings/${created.body.id}`)
      .set('X-CSRF-Token', scheduler.csrf)
      .send({ version: 1, startsAt: '2026-10-09T10:00:00Z', endsAt: '2026-10-09T11:00:00Z' })
      .expect(200);
    const stale = await scheduler
      .patch(`/api/bookings/${created.body.id}`)
      .set('X-CSRF-Token', scheduler.csrf)
      .send({ version: 1, startsAt: '2026-10-09T13:00:00Z', endsAt: '2026-10-09T14:00:00Z' })
      .expect(409);
    expect(stale.body).toMatchObject({
      code: 'stale-version',
      current: { version: 2, startsAt: '2026-10-09T10:00:00.000Z' },
    });
    // A misspelt field is refused by name, not dropped (the booking would look moved and wasn't).
    const misspelt = await scheduler
      .patch(`/api/bookings/${created.body.id}`)
      .set('X-CSRF-Token', scheduler.csrf)
      .send({ version: 2, startsAt: '2026-10-09T10:00:00Z', endsAt: '2026-10-09T11:00:00Z', resourceID: crew })
      .expect(400);
    expect(misspelt.body.errors).toEqual([{ field: 'resourceID', message: 'is not a field this request takes' }]);
    expect((await ctx.knex('bookings').where('id', created.body.id).first('version')).version).toBe(2);
  });
});

describe('bad input', () => {
  it('gets 400 problem+json naming each field and the reason', async () => {
    const res = await scheduler
      .post('/api/bookings')
      .set('X-CSRF-Token', scheduler.csrf)
      .send({ stageId: 'abc', resourceId: crew, startsAt: '2026-10-06 08:00', endsAt: '2026-10-06T07:00:00Z' })
      .expect(400);
    expect(res.headers['content-type']).toMatch(/application\/problem\+json/);
    expect(res.body.status).toBe(400);
    const fields = Object.fromEntries(
      res.body.errors.map((e: { field: string; message: string }) => [e.field, e.message]),
    );
    expect(fields.stageId).toBe('must be a numeric id');
    expect(fields.startsAt).toMatch(/ISO 8601/);
  });

  it('names the field when the end is before the start', async () => {
    const res = await scheduler
      .post('/api/bookings')
      .set('X-CSRF-Token', scheduler.csrf)
      .send({ stageId: stageA, resourceId: crew, startsAt: '2026-10-06T12:00:00Z', endsAt: '2026-10-06T08:00:00Z' })
      .expect(400);
    expect(res.body.errors).toEqual([{ field: 'endsAt', message: 'must be after the start' }]);
  });

  it('names the query field on a list', async () => {
    const res = await scheduler.get('/api/jobs?pageSize=abc&status=lost').expect(400);
    const fields = res.body.errors.map((e: { field: string }) => e.field).sort();
    expect(fields).toEqual(['query.pageSize', 'query.status']);
  });

  it('answers malformed JSON with 400, not 500', async () => {
    const res = await scheduler
      .post('/api/jobs')
      .set('X-CSRF-Token', scheduler.csrf)
      .set('Content-Type', 'application/json')
      .send('{"reference":');
    expect(res.status).toBe(400);
    expect(res.headers['content-type']).toMatch(/application\/problem\+json/);
  });

  it('answers an unknown API path with 404 problem+json', async () => {
    const res = await scheduler.get('/api/no-such-thing').expect(404);
    expect(res.body.title).toBe('Not found');
  });

  it('answers a job with a bad postcode and window with both fields named', async () => {
    const res = await scheduler
      .post('/api/jobs')
      .set('X-CSRF-Token', scheduler.csrf)
      .send({
        reference: 'TW-9999',
        customerName: 'A Person',
        siteAddress: '1 Row',
        siteTown: 'Leeds',
        sitePostcode: 'NOT A CODE',
        installationType: 'slab',
        promisedFrom: '2026-07-10',
        promisedTo: '2026-07-01',
      })
      .expect(400);
    expect(res.body.errors).toEqual([
      { field: 'sitePostcode', message: 'must be a UK postcode such as LS6 2AB' },
      { field: 'promisedTo', message: 'must be on or after the start of the promised window' },
    ]);
  });
});

describe('the health check', () => {
  it('reports the database and the queue', async () => {
    const res = await scheduler.get('/api/health').expect(200);
    expect(res.body).toMatchObject({ status: 'ok', ready: true, database: { status: 'ok' }, queue: { status: 'ok' } });
  });
});
