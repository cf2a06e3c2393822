import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { account, idOf, signIn, startTestApp, type Agent, type TestContext } from '../helpers/server.ts';

/**
 * The engine's rules on the write path, on a job of our own planned from the firm's in-ground
 * template (so the demo's other bookings don't decide the outcome): a stage can't be booked before
 * its unbooked predecessors could be done, and a stage no longer than a working day is booked
 * within one. Today is Mon 1 Jun 2026 08:00 BST (tests/helpers/server.ts).
 */

let ctx: TestContext;
let scheduler: Agent;
const stage: Record<string, string> = {};

const post = (path: string, body: object) => scheduler.post(path).set('X-CSRF-Token', scheduler.csrf).send(body);
const resource = (name: string) => idOf(ctx.knex, 'resources', { name });
type V = { kind: string; message: string };

beforeAll(async () => {
  ctx = await startTestApp();
  scheduler = await signIn(ctx, account('scheduler').email);
  const firm = await idOf(ctx.knex, 'firms', { name: 'Tideway Hot Tubs' });
  const [job] = await ctx
    .knex('jobs')
    .insert({
      firm_id: firm,
      reference: 'TW-9901',
      customer_name: 'Iris Penhallow',
      site_address: '3 Weir Cottages',
      site_town: 'Addingham',
      site_postcode: 'LS29 0QA',
      installation_type: 'in_ground',
      status: 'surveyed',
      ordered_on: '2026-05-15',
    })
    .returning('id');
  await post(`/api/jobs/${job.id}/plan`, {}).expect(201);
  for (const s of await ctx.knex('stages').where({ job_id: job.id }).select('id', 'kind')) stage[s.kind] = String(s.id);
  // On this job the walls go up only once the base has cured (the template's default is an overnight
  // set): the unbooked walls then decide how early the lift may be.
  await ctx
    .knex('dependencies')
    .where({ from_stage_id: stage.base_pour, to_stage_id: stage.walls })
    .update({ waits_for_cure: true, lag_amount: 1, lag_unit: 'elapsed_days' });
});
afterAll(async () => {
  await ctx.close();
});

describe('planning a job', () => {
  it("copies each stage's 'may continue next day' from the template: digging and walls may, the rest may not", async () => {
    const rows = await ctx.knex('stages').whereIn('id', Object.values(stage)).select('kind', 'may_continue_next_day');
    expect(Object.fromEntries(rows.map((r) => [r.kind, r.mayContinueNextDay]))).toEqual({
      survey: false,
      excavation: true,
      spoil_away: false,
      base_pour: false,
      walls: true,
      electrical_first_fix: false,
      delivery: false,
      lift_plan: false,
      lift: false,
      fill: false,
      electrical_connect: false,
      commission: false,
      handover: false,
    });
  });

  it('and the board hands it to the engine', async () => {
    const res = await scheduler
      .get('/api/board')
      .query({ from: '2026-06-01T00:00:00Z', to: '2026-06-08T00:00:00Z' })
      .expect(200);
    const walls = res.body.stages.find((s: { id: string }) => s.id === stage.walls);
    const lift = res.body.stages.find((s: { id: string }) => s.id === stage.lift);
    expect([walls?.mayContinueNextDay, lift?.mayContinueNextDay]).toEqual([true, false]);
  });

  it('marks the delivery alone as wanted just in time (on the lift day), and the board hands that on', async () => {
    const rows = await ctx
      .knex('stages')
      .whereIn('id', Object.values(stage))
      .where('just_in_time', true)
      .select('kind');
    expect(rows.map((r) => r.kind)).toEqual(['delivery']);
    const res = await scheduler
      .get('/api/board')
      .query({ from: '2026-06-01T00:00:00Z', to: '2026-06-08T00:00:00Z' })
      .expect(200);
    const flags = (id: string) => res.body.stages.find((s: { id: string }) => s.id === id)?.justInTime;
    expect([flags(stage.delivery!), flags(stage.lift!)]).toEqual([true, false]);
  });
});

describe('a crane lift booked while everything before it is unbooked', () => {
  it('is refused (422) naming the walls that could not be built in time, and nothing is written', async () => {
    // Survey Mon 08–10, dig 12 h to Tue 13:00, pour Wed 3 Jun 08–13, 70 % strength Wed 10 Jun 10:56
    // (ACI 209R-92, 6.9136 days), walls 16 h from 11:00 to Fri 12 Jun 09:00.
    const res = await post('/api/bookings', {
      stageId: stage.lift,
      resourceId: await resource('60 t mobile crane'),
      startsAt: '2026-06-11T07:00:00Z',
    }).expect(422);
    const unbooked = (res.body.violations as V[])
      .filter((v) => v.kind === 'unbooked_predecessor')
      .map((v) => v.message);
    expect(unbooked).toEqual([
      "'Crane lift into pit' can't start before about Fri 12 Jun 09:00: 'Block retaining walls' (not booked yet) needs 16 h first; it can't start itself before about Wed 10 Jun 11:00 (after 'Pour reinforced base', not booked yet)",
    ]);
    expect(await ctx.knex('bookings').where({ stage_id: stage.lift })).toEqual([]);
  });

  it('is taken where the stages before it can be done first; then the pour can be moved only as far as the walls still fit', async () => {
    await post('/api/bookings', {
      stageId: stage.lift,
      resourceId: await resource('60 t mobile crane'),
      startsAt: '2027-01-14T08:00:00Z',
    }).expect(201);
    const base = await post('/api/bookings', {
      stageId: stage.base_pour,
      resourceId: await resource('Millstone gang'),
      startsAt: '2027-01-04T08:00:00Z',
    });
    expect(base.status, JSON.stringify(base.body)).toBe(201);
    const [pour] = await ctx.knex('bookings').where({ stage_id: stage.base_pour });
    // Poured Thu 7 Jan 08–13: cured Thu 14 Jan 10:56 (11:00), walls Thu 11–17, Fri 15 and Mon 18 Jan 08–09: neither fits before the lift.
    const moved = await post(`/api/stages/${stage.base_pour}/move`, {
      startsAt: '2027-01-07T08:00:00Z',
      versions: { [pour.id]: pour.version },
    }).expect(422);
    expect((moved.body.violations as V[]).map((v) => v.kind).sort()).toEqual(['cure', 'unbooked_predecessor']);
    expect((moved.body.violations as V[]).find((v) => v.kind === 'unbooked_predecessor')?.message).toBe(
      "'Crane lift into pit' can't start before about Mon 18 Jan 09:00: 'Block retaining walls' (not booked yet) needs 16 h first; it can't start itself before about Thu 14 Jan 11:00 (after 'Pour reinforced base')",
    );
  });
});

describe("a 4-hour electrician's visit after the lift (Mon–Fri 07:30–16:30, Sat 08:00–12:00)", () => {
  it('from Friday 13:00 would run into Saturday: refused (422), saying where it fits', async () => {
    const res = await post('/api/bookings', {
      stageId: stage.electrical_connect,
      resourceId: await resource('Priya Nair'),
      startsAt: '2027-01-15T13:00:00Z',
    }).expect(422);
    expect((res.body.violations as V[]).map((v) => v.message)).toEqual([
      "'Connect and certify' would be split over two working days (Fri 15 Jan 13:00 to Sat 16 Jan 08:30): its 4 h must be done within one working day — start by 12:30 or from Sat 16 Jan 08:00",
    ]);
    expect(await ctx.knex('bookings').where({ stage_id: stage.electrical_connect })).toEqual([]);
  });

  it('on Saturday morning fits exactly', async () => {
    const res = await post('/api/bookings', {
      stageId: stage.electrical_connect,
      resourceId: await resource('Priya Nair'),
      startsAt: '2027-01-16T08:00:00Z',
    });
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    expect(res.body.bookings[0]).toMatchObject({
      startsAt: '2027-01-16T08:00:00.000Z',
      endsAt: '2027-01-16T12:00:00.000Z',
    });
  });
});
