import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { account, idOf, signIn, startTestApp, type Agent, type TestContext } from '../helpers/server.ts';
import { DIG, makeJob } from '../helpers/flows.ts';
import type { StageCompletion } from '../../shared/schemas/bookings.ts';

/**
 * Booking a stage as a whole: after the first resource is dropped, the server proposes the rest of
 * the stage's requirements from free resources of the right kinds, and the batch route books them.
 */

let ctx: TestContext;
let scheduler: Agent;
const ids: Record<string, string> = {};

beforeAll(async () => {
  ctx = await startTestApp();
  scheduler = await signIn(ctx, account('scheduler').email);
  // Four jobs of the test's own, each only 'Excavate pit' (a groundworks crew, an excavator and a dumper, five working hours).
  for (const ref of ['FX-2419', 'FX-2420', 'FX-2422', 'FX-2423'])
    ids[ref] = (await makeJob(ctx.knex, { reference: ref, stages: [DIG], links: [] })).stage.excavation!;
  for (const name of [
    '1.5 t excavator',
    '3 t excavator (hired)',
    'Tracked dumper',
    'Millstone gang',
    '25 t city crane',
  ])
    ids[name] = await idOf(ctx.knex, 'resources', { name });
});
afterAll(async () => {
  await ctx.close();
});

const completion = (stageId: string, query: Record<string, string>) =>
  scheduler.get(`/api/stages/${stageId}/completion`).query(query);
const byKind = (c: StageCompletion) => Object.fromEntries(c.requirements.map((r) => [r.kind, r]));
// Monday 12 October 2026, 08:00 in London (BST): nothing of the demo is booked that far ahead.
const MONDAY = '2026-10-12T07:00:00Z';

describe('dropping the excavator of "Excavate pit" on its row', () => {
  it('proposes the groundworks gang and the dumper at that time, and says the stage is then complete', async () => {
    const res = await completion(ids['FX-2422']!, { resourceId: ids['1.5 t excavator']!, startsAt: MONDAY }).expect(
      200,
    );
    const c = res.body as StageCompletion;
    expect(c).toMatchObject({
      stageName: 'Excavate pit',
      jobReference: 'FX-2422',
      startsAt: '2026-10-12T07:00:00.000Z',
      complete: true,
    });
    const kinds = byKind(c);
    expect(kinds.excavator).toMatchObject({ count: 1, booked: [ids['1.5 t excavator']], proposed: [], short: 0 });
    expect(kinds.groundworks_crew!.proposed.map((p) => p.name)).toEqual(['Millstone gang']);
    expect(kinds.dumper!.proposed.map((p) => p.name)).toEqual(['Tracked dumper']);
    // The dig takes 300 working minutes: Monday 08:00 to 13:00 in London (BST).
    expect(kinds.dumper!.proposed[0]).toMatchObject({
      startsAt: '2026-10-12T07:00:00.000Z',
      endsAt: '2026-10-12T12:00:00.000Z',
      free: true,
      ownership: 'owned',
    });
    // The hired excavator is no alternative then: it is not on hire in October.
    expect(kinds.excavator!.alternatives).toEqual([
      expect.objectContaining({ name: '3 t excavator (hired)', free: false, reason: expect.stringMatching(/hire/i) }),
    ]);
  });

  it('books the proposal through the batch route, leaving no resource short', async () => {
    const c = (await completion(ids['FX-2422']!, { resourceId: ids['1.5 t excavator']!, startsAt: MONDAY }).expect(200))
      .body as StageCompletion;
    const chosen = [ids['1.5 t excavator']!, ...c.requirements.flatMap((r) => r.proposed.map((p) => p.resourceId))];
    const res = await scheduler
      .post('/api/bookings/batch')
      .set('X-CSRF-Token', scheduler.csrf)
      .send({ bookings: chosen.map((resourceId) => ({ stageId: ids['FX-2422'], resourceId, startsAt: MONDAY })) })
      .expect(201);
    expect(res.body.bookings.map((b: { resourceId: string }) => b.resourceId).sort()).toEqual([...chosen].sort());
    expect(res.body.warnings.filter((v: { kind: string }) => v.kind === 'capacity')).toEqual([]);
    // Asked again with no time, it reads the stage's own booked start and finds nothing missing.
    const again = (await completion(ids['FX-2422']!, {}).expect(200)).body as StageCompletion;
    expect(again.complete).toBe(true);
    expect(again.requirements.every((r) => r.booked.length === r.count && r.proposed.length === 0)).toBe(true);
  });
});

describe('when the only dumper is busy', () => {
  it('leaves the dumper short and says why, naming the other job', async () => {
    // FX-2423's dig takes the dumper on Monday 19 October.
    await scheduler
      .post('/api/bookings')
      .set('X-CSRF-Token', scheduler.csrf)
      .send({ stageId: ids['FX-2423'], resourceId: ids['Tracked dumper'], startsAt: '2026-10-19T07:00:00Z' })
      .expect(201);
    const c = (
      await completion(ids['FX-2420']!, {
        resourceId: ids['1.5 t excavator']!,
        startsAt: '2026-10-19T07:00:00Z',
      }).expect(200)
    ).body as StageCompletion;
    expect(c.complete).toBe(false);
    const dumper = byKind(c).dumper!;
    expect(dumper).toMatchObject({ proposed: [], short: 1 });
    expect(dumper.alternatives).toEqual([expect.objectContaining({ name: 'Tracked dumper', free: false })]);
    expect(dumper.alternatives[0]!.reason).toMatch(/Tracked dumper is booked/);
    expect(dumper.alternatives[0]!.reason).toMatch(/FX-2423/);
  });
});

describe('the choice among free resources', () => {
  it("proposes the firm's own excavator before the hired one, and offers the hired one as the alternative", async () => {
    // The hired excavator is on hire that week, so both are free.
    await ctx.knex('hire_periods').insert({
      resource_id: ids['3 t excavator (hired)'],
      hirer_firm_id: await idOf(ctx.knex, 'firms', { name: 'Tideway Hot Tubs' }),
      supplier_firm_id: await idOf(ctx.knex, 'firms', { name: 'Ridgeway Plant Hire' }),
      on_hire_at: new Date('2026-10-26T07:00:00Z'),
      off_hire_at: new Date('2026-10-31T18:00:00Z'),
      day_rate_pence: 14500,
      status: 'approved',
    });
    const c = (
      await completion(ids['FX-2419']!, {
        resourceId: ids['Tracked dumper']!,
        startsAt: '2026-10-26T08:00:00Z',
      }).expect(200)
    ).body as StageCompletion;
    const excavator = byKind(c).excavator!;
    expect(excavator.proposed.map((p) => p.name)).toEqual(['1.5 t excavator']);
    expect(excavator.alternatives).toEqual([
      expect.objectContaining({ name: '3 t excavator (hired)', free: true, ownership: 'hired' }),
    ]);
  });
});

describe('refusals', () => {
  it('refuses a resource of a kind the stage does not need (422 wrong-kind), in plain words', async () => {
    const res = await completion(ids['FX-2419']!, { resourceId: ids['25 t city crane']!, startsAt: MONDAY }).expect(
      422,
    );
    expect(res.headers['content-type']).toMatch(/application\/problem\+json/);
    expect(res.body).toMatchObject({
      code: 'wrong-kind',
      detail: "25 t city crane is a crane; 'Excavate pit' needs groundworks crew, excavator, dumper.",
    });
  });

  it('asks for a time when the stage has no booking yet (400 naming the field)', async () => {
    const res = await completion(ids['FX-2419']!, {}).expect(400);
    expect(res.body.errors).toEqual([{ field: 'query.startsAt', message: 'is required for a stage with no booking' }]);
  });

  it('names a malformed query field (400), never a 500', async () => {
    const res = await completion(ids['FX-2419']!, { resourceId: 'crane', startsAt: 'Monday' }).expect(400);
    expect(res.body.errors.map((e: { field: string }) => e.field).sort()).toEqual([
      'query.resourceId',
      'query.startsAt',
    ]);
  });

  it("is not open to the crew, and another installer's stage is not found", async () => {
    const crew = await signIn(ctx, account('crew').email);
    await crew.get(`/api/stages/${ids['FX-2419']}/completion`).query({ startsAt: MONDAY }).expect(403);
    const mv = await idOf(ctx.knex, 'stages', { job_id: await idOf(ctx.knex, 'jobs', { reference: 'MV-118' }) });
    await completion(mv, { startsAt: MONDAY }).expect(404);
  });
});
