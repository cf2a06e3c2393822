import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { AddressInfo } from 'node:net';
import type { Server } from 'node:http';
import {
  openBoardStream,
  account,
  idOf,
  signIn,
  startTestApp,
  type Agent,
  type TestContext,
} from '../helpers/server.ts';
import { makeJob, type FixtureStage } from '../helpers/flows.ts';
import type { AutoPlaceAnswer, PlanProgress, SlotAnswer } from '../../shared/schemas/placement.ts';

/**
 * Slots and auto-place on the server, on complete data: the board holds only the week on screen,
 * while the searches look months ahead. A booking far outside that week must still count.
 */

let ctx: TestContext;
let scheduler: Agent;
const ids: Record<string, string> = {};

/** The pit dug with the firm's excavator: five working hours. */
const DIG_ONLY: FixtureStage = { kind: 'excavation', name: 'Excavate pit', minutes: 300, needs: { excavator: 1 } };
/** The spoil taken away with the tracked dumper (the firm's only one): two working hours. */
const SPOIL: FixtureStage = { kind: 'spoil', name: 'Take the spoil away', minutes: 120, needs: { dumper: 1 } };
/** Connecting the spa: an electrician (a partner's) for four working hours. */
const CONNECT: FixtureStage = {
  kind: 'electrical_connect',
  name: 'Connect and certify',
  minutes: 240,
  needs: { electrician: 1 },
};
/** Another job's spoil run: three working hours on the same dumper. */
const LONG_SPOIL: FixtureStage = { ...SPOIL, minutes: 180 };

beforeAll(async () => {
  ctx = await startTestApp();
  scheduler = await signIn(ctx, account('scheduler').email);
  for (const name of ['1.5 t excavator', 'Tracked dumper', 'Priya Nair'])
    ids[name] = await idOf(ctx.knex, 'resources', { name });
});
afterAll(async () => {
  await ctx.close();
});

const write = (path: string, body: object) => scheduler.post(path).set('X-CSRF-Token', scheduler.csrf).send(body);
const book = (stageId: string, resourceId: string, startsAt: string) =>
  write('/api/bookings', { stageId, resourceId, startsAt }).expect(201);
const iso = (t: number) => new Date(t).toISOString();

/**
 * A job whose dig is booked on a Monday months ahead, 08:00–13:00 in London (its spoil run must
 * wait for it), and another job's spoil run on the dumper that afternoon, 13:00–16:00. `utcOffset`
 * is London's on that day ('+01' in summer time, '+00' after October's clock change). Nothing of
 * the demo is booked that far ahead.
 */
async function dugOnMonday(
  prefix: string,
  monday: string,
  utcOffset: '+01' | '+00',
): Promise<{ spoil: string; jobId: string }> {
  const job = await makeJob(ctx.knex, {
    reference: `${prefix}-1`,
    stages: [DIG_ONLY, SPOIL],
    links: [['excavation', 'spoil']],
  });
  const other = await makeJob(ctx.knex, { reference: `${prefix}-2`, stages: [LONG_SPOIL], links: [] });
  await book(job.stage.excavation!, ids['1.5 t excavator']!, `${monday}T08:00:00${utcOffset}:00`);
  // The other job's spoil run takes the dumper just when this one could start.
  await book(other.stage.spoil!, ids['Tracked dumper']!, `${monday}T13:00:00${utcOffset}:00`);
  return { spoil: job.stage.spoil!, jobId: job.jobId };
}

describe('POST /api/plan/slots', () => {
  it('counts a booking months outside the week on screen: the first slot is the next free one after it', async () => {
    // Monday 12 October 2026, nineteen weeks after the test's today (Monday 1 June).
    const { spoil } = await dugOnMonday('FX-S', '2026-10-12', '+01');
    const res = await write('/api/plan/slots', { stageId: spoil, resourceKind: 'dumper', alternatives: 2 }).expect(200);
    const answer = res.body as SlotAnswer;
    expect(answer).toMatchObject({ stageId: spoil, horizonDays: 120 });
    expect(answer.kinds.map((k) => k.kind)).toEqual(['dumper']);
    const slots = answer.kinds[0]!.slots;
    // Monday after the dig is taken (13:00–16:00) and 16:00–17:00 is too short for two hours that must
    // be done in one day: Tuesday 08:00–10:00 BST is the first, then Wednesday's and Thursday's mornings.
    expect(slots.map((s) => [iso(s.start), iso(s.end), s.resourceId])).toEqual([
      ['2026-10-13T07:00:00.000Z', '2026-10-13T09:00:00.000Z', ids['Tracked dumper']],
      ['2026-10-14T07:00:00.000Z', '2026-10-14T09:00:00.000Z', ids['Tracked dumper']],
      ['2026-10-15T07:00:00.000Z', '2026-10-15T09:00:00.000Z', ids['Tracked dumper']],
    ]);
    expect(slots[0]!.cost).toMatchObject({ extraHireDays: 0, extraHirePence: 0 });
    // Booked as proposed, the write path agrees (no 422).
    await book(spoil, ids['Tracked dumper']!, iso(slots[0]!.start));
  });

  it("looks on each kind the stage needs when no kind is named, and says so for a kind it doesn't need", async () => {
    const { spoil } = await dugOnMonday('FX-K', '2026-11-02', '+00');
    const all = (await write('/api/plan/slots', { stageId: spoil }).expect(200)).body as SlotAnswer;
    expect(all.kinds.map((k) => k.kind)).toEqual(['dumper']);
    expect(all.kinds[0]!.slots).toHaveLength(4);
    // Monday 2 November is in GMT: Tuesday 08:00 is the first free start.
    expect(iso(all.kinds[0]!.slots[0]!.start)).toBe('2026-11-03T08:00:00.000Z');
    const wrong = await write('/api/plan/slots', { stageId: spoil, resourceKind: 'crane' }).expect(400);
    expect(wrong.headers['content-type']).toMatch(/application\/problem\+json/);
    expect(wrong.body.errors).toEqual([
      { field: 'resourceKind', message: "is not a kind 'Take the spoil away' needs (it needs dumper)" },
    ]);
  });

  it("counts another installer's request for a shared electrician, beyond the first span read, telling nothing of it", async () => {
    // Monday 11 January 2027, 32 weeks ahead (GMT): further than the first read of today + 150 days.
    const job = await makeJob(ctx.knex, {
      reference: 'FX-E-1',
      stages: [DIG_ONLY, CONNECT],
      links: [['excavation', 'electrical_connect']],
    });
    await book(job.stage.excavation!, ids['1.5 t excavator']!, '2027-01-11T08:00:00Z');
    // Moorview (who shares Brightspark's electricians) asks for Priya on Tuesday 07:30–11:30 and sends the request.
    const moorview = await signIn(ctx, account('scheduler', 'Moorview Spas').email);
    const [mvJob] = await ctx
      .knex('jobs')
      .insert({
        firm_id: await idOf(ctx.knex, 'firms', { name: 'Moorview Spas' }),
        reference: 'MV-PL-1',
        customer_name: 'Hal Penrose',
        site_address: '9 Fold Lane',
        site_town: 'Otley',
        site_postcode: 'LS21 1AA',
        installation_type: 'slab',
        status: 'planned',
      })
      .returning('id');
    const [mvStage] = await ctx
      .knex('stages')
      .insert({
        job_id: mvJob.id,
        kind: 'electrical_connect',
        name: 'Connect and certify',
        sequence: 1,
        duration_minutes: 240,
        requirements: JSON.stringify([{ kind: 'electrician', count: 1 }]),
      })
      .returning('id');
    const mvBooked = await moorview
      .post('/api/bookings')
      .set('X-CSRF-Token', moorview.csrf)
      .send({ stageId: String(mvStage.id), resourceId: ids['Priya Nair'], startsAt: '2027-01-12T07:30:00Z' })
      .expect(201);
    const mvBooking = mvBooked.body.bookings[0] as { id: string; version: number };
    await moorview
      .post(`/api/bookings/${mvBooking.id}/publish`)
      .set('X-CSRF-Token', moorview.csrf)
      .send({ version: mvBooking.version })
      .expect(200);

    const res = await write('/api/plan/slots', {
      stageId: job.stage.electrical_connect,
      resourceId: ids['Priya Nair'],
      alternatives: 0,
    }).expect(200);
    // Monday after the dig leaves 13:00–16:30, too short for four hours in one day; Tuesday 07:30 is
    // Moorview's: Priya's first free four hours are Tuesday 11:30–15:30 (her day is 07:30–16:30).
    expect((res.body as SlotAnswer).kinds[0]!.slots.map((s) => [iso(s.start), iso(s.end)])).toEqual([
      ['2027-01-12T11:30:00.000Z', '2027-01-12T15:30:00.000Z'],
    ]);
    expect(JSON.stringify(res.body)).not.toMatch(/MV-PL-1|Hal Penrose|Otley|Moorview/);
    expect(JSON.stringify(res.body)).not.toContain(`"${mvBooking.id}"`);
  });

  it("answers 404 for another firm's stage and for one that does not exist, telling nothing of it", async () => {
    const mvStage = String(
      (
        await ctx
          .knex('stages')
          .join('jobs', 'jobs.id', 'stages.job_id')
          .where('jobs.reference', 'MV-118')
          .first('stages.id')
      ).id,
    );
    const foreign = await write('/api/plan/slots', { stageId: mvStage }).expect(404);
    expect(foreign.headers['content-type']).toMatch(/application\/problem\+json/);
    expect(foreign.body).toMatchObject({ status: 404, detail: 'No such stage.' });
    expect(JSON.stringify(foreign.body)).not.toMatch(/Connect and certify|Alan Frost|MV-118/);
    await write('/api/plan/slots', { stageId: '999999999' }).expect(404);
  });

  it('refuses bad input with problem+json naming the field and the reason', async () => {
    const cases: [object, string, RegExp][] = [
      [{}, 'stageId', /expected string|required/i],
      [{ stageId: 'twelve' }, 'stageId', /numeric id/],
      [{ stageId: '12', alternatives: 50 }, 'alternatives', /at most 10/],
      [{ stageId: '12', alternatives: 1.5 }, 'alternatives', /whole number/],
      [{ stageId: '12', resourceKind: 'Crane; DROP' }, 'resourceKind', /resource kind/],
      [{ stageId: '12', resourceKind: 'dumper', resourceId: '3' }, 'resourceId', /not both/],
    ];
    for (const [body, field, message] of cases) {
      const res = await write('/api/plan/slots', body).expect(400);
      expect(res.headers['content-type']).toMatch(/application\/problem\+json/);
      expect(res.body.errors, JSON.stringify(body)).toEqual([
        expect.objectContaining({ field, message: expect.stringMatching(message) }),
      ]);
    }
  });

  it('is for those who may book: a viewer is refused', async () => {
    const viewer = await signIn(ctx, account('viewer').email);
    await viewer.post('/api/plan/slots').set('X-CSRF-Token', viewer.csrf).send({ stageId: '12' }).expect(403);
  });
});

describe('POST /api/plan/auto-place', () => {
  it('places around a booking months ahead, and the batch route books the result without a 422', async () => {
    // Monday 16 November 2026 (GMT): the dig 08:00–13:00, the other job's spoil run 13:00–16:00.
    const { spoil, jobId } = await dugOnMonday('FX-A', '2026-11-16', '+00');
    const res = await write('/api/plan/auto-place', { jobIds: [jobId] }).expect(200);
    const answer = res.body as AutoPlaceAnswer;
    expect(answer.unplaced).toEqual([]);
    expect(answer.placed.map((p) => [p.stageId, iso(p.start), iso(p.end), p.resourceIds])).toEqual([
      [spoil, '2026-11-17T08:00:00.000Z', '2026-11-17T10:00:00.000Z', [ids['Tracked dumper']]],
    ]);
    const batch = await write('/api/bookings/batch', {
      bookings: answer.bookings.map((b) => ({
        stageId: b.stageId,
        resourceId: b.resourceId,
        startsAt: iso(b.start),
        endsAt: iso(b.end),
      })),
    }).expect(201);
    expect(batch.body.bookings.map((b: { stageId: string; startsAt: string }) => [b.stageId, b.startsAt])).toEqual([
      [spoil, '2026-11-17T08:00:00.000Z'],
    ]);
  });

  it("answers 404 for another firm's job, 400 for bad input", async () => {
    const mvJob = await idOf(ctx.knex, 'jobs', { reference: 'MV-118' });
    const foreign = await write('/api/plan/auto-place', { jobIds: [mvJob] }).expect(404);
    expect(foreign.body).toMatchObject({ status: 404, detail: 'No such job.' });
    const cases: [object, string, RegExp][] = [
      [{ jobIds: [] }, 'jobIds', /at least one job/],
      [{ jobIds: ['7', '7'] }, 'jobIds', /twice/],
      [{ jobIds: ['7'], budgetMs: -1 }, 'budgetMs', /0 or more/],
      [{ jobIds: ['7'], budgetMs: 600_000 }, 'budgetMs', /at most 60000/],
      [{ jobIds: ['7'], planId: 'a b' }, 'planId', /letters, digits or hyphens/],
      [{ jobIds: 'all' }, 'jobIds', /^must be a list$/],
    ];
    for (const [body, field, message] of cases) {
      const res = await write('/api/plan/auto-place', body).expect(400);
      expect(res.headers['content-type']).toMatch(/application\/problem\+json/);
      expect(res.body.errors, JSON.stringify(body)).toEqual([
        expect.objectContaining({ field, message: expect.stringMatching(message) }),
      ]);
    }
  });
});

const openStream = openBoardStream;

const progressOf = (text: string) =>
  [...text.matchAll(/event: plan-progress\ndata: (.*)\n/g)].map((m) => JSON.parse(m[1]!) as PlanProgress);

describe("auto-place's progress on the board stream", () => {
  it("reaches the caller's own stream, named by the planId, and no one else's", async () => {
    const server: Server = ctx.waterline.app.listen(0, '127.0.0.1');
    await new Promise((r) => server.once('listening', r));
    const port = (server.address() as AddressInfo).port;
    const owner = await signIn(ctx, account('owner').email);
    const mine = await openStream(scheduler, port);
    const theirs = await openStream(owner, port);
    try {
      // Two stages to place, so the planner searches beyond its first plan.
      const job = await makeJob(ctx.knex, {
        reference: 'FX-PR-1',
        stages: [DIG_ONLY, SPOIL],
        links: [['excavation', 'spoil']],
      });
      const planId = 'plan-progress-test-1';
      const answer = (await write('/api/plan/auto-place', { jobIds: [job.jobId], planId, budgetMs: 50 }).expect(200))
        .body as AutoPlaceAnswer;
      expect(answer.placed.map((p) => p.stageId).sort()).toEqual([job.stage.excavation, job.stage.spoil].sort());
      await mine.until((t) => t.includes('"phase":"placing"') || t.includes('"phase":"search"'));
      const heard = progressOf(mine.text());
      expect(heard[0]).toEqual({ planId, phase: 'single-pass', schedules: 1, used: 0 });
      expect(heard.every((p) => p.planId === planId)).toBe(true);
      expect(heard.length).toBeGreaterThanOrEqual(2);
      // Booking the result tells both office streams; the owner's heard that and no progress before it.
      const booked = await write('/api/bookings/batch', {
        bookings: answer.bookings.map((b) => ({
          stageId: b.stageId,
          resourceId: b.resourceId,
          startsAt: iso(b.start),
          endsAt: iso(b.end),
        })),
      }).expect(201);
      const firstId = String(booked.body.bookings[0].id);
      await theirs.until((t) => t.includes(firstId));
      expect(theirs.text()).not.toContain('plan-progress');
    } finally {
      mine.close();
      theirs.close();
      server.close();
    }
  });
});
