import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { account, idOf, signIn, startTestApp, type Agent, type TestContext } from '../helpers/server.ts';
import { backToEnquiry } from '../helpers/demo.ts';

let ctx: TestContext;
let scheduler: Agent;
/** TW-2418 taken back to an enquiry, now for a swim spa whose maker needs 35 working days from the order. */
let job: string;
let lorry: string;

beforeAll(async () => {
  ctx = await startTestApp();
  scheduler = await signIn(ctx, account('scheduler').email);
  await backToEnquiry(ctx.knex, 'TW-2418');
  job = await idOf(ctx.knex, 'jobs', { reference: 'TW-2418' });
  const tideway = await idOf(ctx.knex, 'firms', { name: 'Tideway Hot Tubs' });
  // An invented swim spa from an invented maker: built to order, 35 working days.
  const [unit] = await ctx
    .knex('units')
    .insert({
      firm_id: tideway,
      model: 'Tarn 5 swim spa',
      maker: 'Harbourline Works',
      length_mm: 5000,
      width_mm: 2300,
      height_mm: 1500,
      dry_weight_kg: 1900,
      filled_weight_kg: 10500,
      water_litres: 8500,
      supplies: JSON.stringify([{ amps: 32 }, { amps: 32 }]),
      maker_lead_days: 35,
    })
    .returning('id');
  // Ordered on Monday 1 June 2026 (the test's today).
  await ctx
    .knex('jobs')
    .where('id', job)
    .update({ unit_id: unit.id, ordered_on: '2026-06-01', installation_type: 'slab' });
  lorry = await idOf(ctx.knex, 'resources', { name: '18 t lorry with loader crane' });
});
afterAll(async () => {
  await ctx.close();
});

const post = (path: string, body: object = {}) => scheduler.post(path).set('X-CSRF-Token', scheduler.csrf).send(body);
const stageOf = async (kind: string) => ctx.knex('stages').where({ job_id: job, kind }).first();

describe("a stage's notice from its template", () => {
  it("is stored on the job's stage as a rule, with the maker's lead time on the delivery, and not as words in its notes", async () => {
    await post(`/api/jobs/${job}/plan`).expect(201);
    expect((await stageOf('delivery')).notice).toEqual({
      workingDays: 35,
      countedFrom: 'order',
      reason: "the maker's lead time",
    });
    expect((await stageOf('lift')).notice).toEqual({ workingDays: 10, countedFrom: 'now', resourceKind: 'crane' });
    expect((await stageOf('electrical_connect')).notice).toEqual({
      workingDays: 3,
      countedFrom: 'now',
      resourceKind: 'electrician',
    });
    const notes = (await ctx.knex('stages').where('job_id', job).select('notes')).map((s) => s.notes ?? '');
    expect(notes.filter((n: string) => /notice/i.test(n))).toEqual([]);
  });

  it('reaches the board the office loads, as lead-time rules on the stage', async () => {
    const board = (
      await scheduler.get('/api/board').query({ from: '2026-06-01T00:00:00Z', to: '2026-06-08T00:00:00Z' }).expect(200)
    ).body;
    const delivery = String((await stageOf('delivery')).id);
    const lift = String((await stageOf('lift')).id);
    expect(board.leadTimeRules).toContainEqual({
      appliesTo: { stageId: delivery },
      workingDays: 35,
      from: 'order',
      reason: "the maker's lead time",
    });
    expect(board.leadTimeRules).toContainEqual({
      appliesTo: { stageId: lift, resourceKind: 'crane' },
      workingDays: 10,
      from: 'now',
    });
  });

  it("refuses the delivery before the order date plus the maker's 35 working days, in plain words", async () => {
    const delivery = String((await stageOf('delivery')).id);
    // Fri 17 July 2026 14:00 BST: 34 working days after the order, a day short.
    const early = await post('/api/bookings', {
      stageId: delivery,
      resourceId: lorry,
      startsAt: '2026-07-17T13:00:00Z',
    }).expect(422);
    const lead = early.body.violations.filter((v: { kind: string }) => v.kind === 'lead_time');
    expect(lead.map((v: { message: string }) => v.message)).toEqual([
      "'Delivery' needs 35 working days' notice from the order date (the maker's lead time): the earliest start is Mon 20 Jul 08:00",
    ]);
    expect(await ctx.knex('bookings').where({ stage_id: delivery })).toEqual([]);
  });

  it("takes the delivery once the maker's lead time has run", async () => {
    const delivery = String((await stageOf('delivery')).id);
    // Mon 7 September 2026 09:00 BST, when the lorry is free (it brings the demo's other units in July).
    const res = await post('/api/bookings', { stageId: delivery, resourceId: lorry, startsAt: '2026-09-07T08:00:00Z' });
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    expect(res.body.bookings[0]).toMatchObject({ startsAt: '2026-09-07T08:00:00.000Z', state: 'pencilled' });
  });
});

describe('the Templates page', () => {
  it('edits notice per stage, the cure on each link and "may continue next working day"; a new plan carries them', async () => {
    const slab = (await scheduler.get('/api/templates').expect(200)).body.items.find(
      (t: { installationType: string }) => t.installationType === 'slab',
    );
    const stages = slab.stages.map((s: { kind: string }) =>
      s.kind === 'fill' ? { ...s, leadTime: { workingDays: 4, countedFrom: 'now' }, mayContinueNextDay: true } : s,
    );
    const links = slab.links.map((l: { from: string; to: string }) =>
      l.from === 'base_pour' && l.to === 'lift' ? { ...l, waitsForCure: false } : l,
    );
    await scheduler
      .put('/api/templates/slab')
      .set('X-CSRF-Token', scheduler.csrf)
      .send({ version: slab.version, name: slab.name, stages, links })
      .expect(200);
    await ctx.knex('bookings').whereIn('stage_id', ctx.knex('stages').where('job_id', job).select('id')).delete();
    await post(`/api/jobs/${job}/plan`).expect(201);
    const fill = await stageOf('fill');
    expect(fill.notice).toEqual({ workingDays: 4, countedFrom: 'now' });
    expect(fill.mayContinueNextDay).toBe(true);
    const cureLinks = await ctx
      .knex('dependencies as d')
      .join('stages as a', 'a.id', 'd.from_stage_id')
      .join('stages as b', 'b.id', 'd.to_stage_id')
      .where('a.job_id', job)
      .where('a.kind', 'base_pour')
      .select('b.kind as to', 'd.waits_for_cure')
      .orderBy('b.kind');
    expect(cureLinks).toEqual([{ to: 'lift', waitsForCure: false }]);
  });

  it('refuses a link that waits for the cure of a stage without one (400, naming the link)', async () => {
    const slab = (await scheduler.get('/api/templates').expect(200)).body.items.find(
      (t: { installationType: string }) => t.installationType === 'slab',
    );
    const links = slab.links.map((l: { from: string; to: string }) =>
      l.from === 'fill' && l.to === 'commission' ? { ...l, waitsForCure: true } : l,
    );
    const res = await scheduler
      .put('/api/templates/slab')
      .set('X-CSRF-Token', scheduler.csrf)
      .send({ version: slab.version, name: slab.name, stages: slab.stages, links })
      .expect(400);
    const n = links.findIndex((l: { from: string; to: string }) => l.from === 'fill' && l.to === 'commission');
    expect(res.body.errors).toEqual([
      { field: `links[${n}].waitsForCure`, message: `links[${n}].waitsForCure: Fill has no cure to wait for` },
    ]);
  });
});
