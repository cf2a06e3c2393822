import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { account, idOf, signIn, startTestApp, type Agent, type TestContext } from '../helpers/server.ts';
import { unbookJobs } from '../helpers/demo.ts';

let ctx: TestContext;
let scheduler: Agent;
let base: string;
let lift: string;
let gang: string;
let heron: string;

beforeAll(async () => {
  ctx = await startTestApp();
  scheduler = await signIn(ctx, account('scheduler').email);
  // The jobs this file books from the tray, at dates of its own.
  await unbookJobs(ctx.knex, 'TW-2417', 'TW-2419', 'TW-2421');
  const job = await idOf(ctx.knex, 'jobs', { reference: 'TW-2417' });
  base = await idOf(ctx.knex, 'stages', { job_id: job, kind: 'base_pour' });
  lift = await idOf(ctx.knex, 'stages', { job_id: job, kind: 'lift' });
  gang = await idOf(ctx.knex, 'resources', { name: 'Millstone gang' });
  heron = await idOf(ctx.knex, 'resources', { name: 'Crew Heron' });
});
afterAll(async () => {
  await ctx.close();
});

const post = (path: string, body: object) => scheduler.post(path).set('X-CSRF-Token', scheduler.csrf).send(body);

describe('booking a stage from the tray', () => {
  it("ends it after the stage's working duration on the resource's calendar", async () => {
    // Monday 14 September 2026, 08:00 in London (BST, UTC+1); the pour lasts 300 working minutes.
    const res = await post('/api/bookings', {
      stageId: base,
      resourceId: gang,
      startsAt: '2026-09-14T07:00:00Z',
    }).expect(201);
    expect(res.body.bookings[0]).toMatchObject({
      startsAt: '2026-09-14T07:00:00.000Z',
      endsAt: '2026-09-14T12:00:00.000Z',
      state: 'pencilled',
      version: 1,
    });
  });
});

describe('when the base has not cured', () => {
  it('refuses the lift with the cure rule as the reason (422)', async () => {
    // 70 % of 28-day strength by ACI 209R-92: t = 4·0.7 / (1 − 0.85·0.7) = 6.91 days after the pour ends.
    const res = await post('/api/bookings', {
      stageId: lift,
      resourceId: heron,
      startsAt: '2026-09-16T07:00:00Z',
    }).expect(422);
    expect(res.body.violations.map((v: { kind: string }) => v.kind)).toContain('cure');
    expect(res.body.detail).toMatch(/cure|strength/i);
    expect(await ctx.knex('bookings').where({ stage_id: lift })).toEqual([]);
  });

  it('takes the lift once the base has reached its strength and the walls (not booked yet) could be built', async () => {
    // Cured Mon 21 Sep 10:56 (11:00); the walls' 16 working hours then end Wed 23 Sep 09:00 BST.
    const res = await post('/api/bookings', {
      stageId: lift,
      resourceId: heron,
      startsAt: '2026-09-23T08:00:00Z',
    }).expect(201);
    expect(res.body.bookings[0].endsAt).toBe('2026-09-23T12:00:00.000Z');
    expect(res.body.warnings.map((v: { kind: string }) => v.kind)).toContain('capacity');
  });
});

describe('moving a stage with its dependents', () => {
  it('moves the booked stages after it by the same working time, keeping the cure gap', async () => {
    const [baseBooking] = await ctx.knex('bookings').where({ stage_id: base });
    const [liftBooking] = await ctx.knex('bookings').where({ stage_id: lift });
    const res = await post(`/api/stages/${base}/move`, {
      startsAt: '2026-09-15T07:00:00Z',
      versions: { [baseBooking.id]: 1, [liftBooking.id]: 1 },
      moveDependents: true,
    });
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    const byStage = Object.fromEntries(res.body.bookings.map((b: { stageId: string }) => [b.stageId, b]));
    expect(byStage[base]).toMatchObject({
      startsAt: '2026-09-15T07:00:00.000Z',
      endsAt: '2026-09-15T12:00:00.000Z',
      version: 2,
    });
    // One working day (9 working hours) later on the crew's Mon–Fri 08:00–17:00 calendar; the walls
    // after the moved pour (cured Tue 22 Sep 11:00, 16 h) end Thu 24 Sep 09:00, no later.
    expect(byStage[lift]).toMatchObject({
      startsAt: '2026-09-24T08:00:00.000Z',
      endsAt: '2026-09-24T12:00:00.000Z',
      version: 2,
    });
  });

  it('refuses the whole move when one booking changed meanwhile (409) and changes nothing', async () => {
    const [baseBooking] = await ctx.knex('bookings').where({ stage_id: base });
    const res = await post(`/api/stages/${base}/move`, {
      startsAt: '2026-09-16T07:00:00Z',
      versions: { [baseBooking.id]: 1 },
    }).expect(409);
    expect(res.body.code).toBe('stale-version');
    expect((await ctx.knex('bookings').where({ stage_id: base }))[0].version).toBe(2);
  });

  it('refuses a move that breaks the cure rule and leaves both stages where they were', async () => {
    const [baseBooking] = await ctx.knex('bookings').where({ stage_id: base });
    await post(`/api/stages/${base}/move`, {
      startsAt: '2026-09-18T07:00:00Z',
      versions: { [baseBooking.id]: 2 },
    }).expect(422);
    const [after] = await ctx.knex('bookings').where({ stage_id: base });
    expect(after.startsAt.toISOString()).toBe('2026-09-15T07:00:00.000Z');
  });
});

describe('taking a booking off the board', () => {
  it('needs the current version, then sends the stage back to the tray', async () => {
    const [liftBooking] = await ctx.knex('bookings').where({ stage_id: lift });
    await scheduler.delete(`/api/bookings/${liftBooking.id}?version=1`).set('X-CSRF-Token', scheduler.csrf).expect(409);
    await scheduler.delete(`/api/bookings/${liftBooking.id}?version=2`).set('X-CSRF-Token', scheduler.csrf).expect(204);
    expect(await ctx.knex('bookings').where({ stage_id: lift })).toEqual([]);
    const audit = await ctx.knex('audit_log').where({ entity: 'booking', entity_id: liftBooking.id, action: 'delete' });
    expect(audit).toHaveLength(1);
  });
});

describe("a lift booked straight in as confirmed on the firm's own crew", () => {
  it("queues the householder's notice of the day with the booking, in the same transaction", async () => {
    const job = await idOf(ctx.knex, 'jobs', { reference: 'TW-2421' });
    const lift = await idOf(ctx.knex, 'stages', { job_id: job, kind: 'lift' });
    const crew = await idOf(ctx.knex, 'resources', { name: 'Crew Kestrel' });
    const res = await post('/api/bookings', {
      stageId: lift,
      resourceId: crew,
      startsAt: '2026-10-05T08:00:00Z',
      state: 'confirmed',
    }).expect(201);
    const notices = await ctx
      .knex('outbox')
      .where({ kind: 'customer_notice' })
      .whereRaw("payload->>'bookingId' = ?", [res.body.bookings[0].id]);
    expect(notices).toHaveLength(1);
    expect(notices[0].payload).toMatchObject({ event: 'confirmed' });
  });

  it("refuses to book a partner firm's lorry as confirmed: only the haulier's answer confirms it", async () => {
    const job = await idOf(ctx.knex, 'jobs', { reference: 'TW-2419' });
    const delivery = await idOf(ctx.knex, 'stages', { job_id: job, kind: 'delivery' });
    const lorry = await idOf(ctx.knex, 'resources', { name: '18 t lorry with loader crane' });
    const res = await post('/api/bookings', {
      stageId: delivery,
      resourceId: lorry,
      startsAt: '2026-10-05T08:00:00Z',
      state: 'confirmed',
    }).expect(409);
    expect(res.body).toMatchObject({
      code: 'transition-refused',
      detail: 'Only the partner firm can confirm its own people and machines: send them a request instead.',
    });
    expect(await ctx.knex('bookings').where({ stage_id: delivery })).toEqual([]);
    expect(
      await ctx.knex('outbox').where({ kind: 'customer_notice' }).whereRaw("payload->>'bookingId' IS NULL"),
    ).toEqual([]);
  });
});
