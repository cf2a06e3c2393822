import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import request from 'supertest';
import { TEST_TODAY, account, idOf, signIn, startTestApp, type Agent, type TestContext } from '../helpers/server.ts';
import { pencilIn, waitUntil } from '../helpers/mail.ts';
import { unbookJobs } from '../helpers/demo.ts';
import { LinkSigner } from '../../server/services/links.ts';
import { BookingWriter } from '../../server/services/booking-writes.ts';
import { actorFor } from '../../server/services/session.ts';

let ctx: TestContext;
let scheduler: Agent;
let crane: Agent;
let electrician: Agent;

beforeAll(async () => {
  ctx = await startTestApp();
  // Tables without a foreign key to the demo rows are not emptied by the helper's cascade.
  await ctx.knex.raw('TRUNCATE outbox, link_uses, link_attempts RESTART IDENTITY');
  // The demo jobs these tests book at dates of their own start with nothing booked.
  await unbookJobs(ctx.knex, 'TW-2417', 'TW-2419', 'TW-2420', 'TW-2421', 'TW-2422');
  scheduler = await signIn(ctx, account('scheduler').email);
  crane = await signIn(ctx, account('partner', 'Fellside Crane Hire').email);
  electrician = await signIn(ctx, account('partner', 'Brightspark Electrical').email);
});
afterAll(async () => {
  await ctx.close();
});

const write = (agent: Agent, method: 'post' | 'patch' | 'put' | 'delete', path: string, body?: object) =>
  agent[method](path).set('X-CSRF-Token', agent.csrf).send(body);
const stageOf = async (job: string, kind: string) =>
  idOf(ctx.knex, 'stages', { job_id: await idOf(ctx.knex, 'jobs', { reference: job }), kind });
const resource = (name: string) => idOf(ctx.knex, 'resources', { name });
// Link expiry is checked against the real clock, not the scenario's fixed today.
const tomorrow = () => new Date(Date.now() + 86_400_000);
const row = async (id: string) => ctx.knex('bookings').where('id', id).first();

describe("a partner firm's consent", () => {
  it('is the only way its electrician becomes confirmed: booking one straight in as confirmed is refused (409) and nothing is written', async () => {
    const stageId = await stageOf('TW-2420', 'electrical_connect');
    const res = await write(scheduler, 'post', '/api/bookings', {
      stageId,
      resourceId: await resource('Priya Nair'),
      startsAt: '2026-11-03T08:00:00Z',
      state: 'confirmed',
    }).expect(409);
    expect(res.headers['content-type']).toMatch(/application\/problem\+json/);
    expect(res.body).toMatchObject({
      code: 'transition-refused',
      detail: 'Only the partner firm can confirm its own people and machines: send them a request instead.',
    });
    expect(await ctx.knex('bookings').where({ stage_id: stageId })).toEqual([]);
  });

  it('cannot be faked through PATCH: confirmed, sent, on site and done are each refused and the booking stays as it was', async () => {
    const b = await pencilIn(ctx.knex, {
      job: 'TW-2420',
      stage: 'electrical_first_fix',
      resource: 'Priya Nair',
      startsAt: '2026-11-04T08:00:00Z',
      endsAt: '2026-11-04T12:00:00Z',
    });
    const times = { startsAt: '2026-11-04T08:00:00Z', endsAt: '2026-11-04T12:00:00Z' };
    for (const state of ['confirmed', 'sent', 'on_site', 'done']) {
      const res = await write(scheduler, 'patch', `/api/bookings/${b.id}`, { version: 1, ...times, state });
      expect(res.status, `${state}: ${JSON.stringify(res.body)}`).toBe(409);
      expect(res.body.code).toBe('transition-refused');
    }
    expect(await row(b.id)).toMatchObject({ state: 'pencilled', version: 1 });
    // A "sent" set by hand would never have asked the partner: no request row, no e-mail.
    expect(await ctx.knex('booking_requests').where({ booking_id: b.id })).toEqual([]);
    expect(await ctx.knex('outbox').whereRaw("payload->>'bookingId' = ?", [b.id])).toEqual([]);
  });

  it("lets the office confirm its own crew through PATCH (the firm's own say-so)", async () => {
    const stageId = await stageOf('TW-2420', 'handover');
    const created = await write(scheduler, 'post', '/api/bookings', {
      stageId,
      resourceId: await resource('Crew Otter'),
      startsAt: '2026-11-12T08:00:00Z',
    }).expect(201);
    const b = created.body.bookings[0];
    const res = await write(scheduler, 'patch', `/api/bookings/${b.id}`, {
      version: 1,
      startsAt: b.startsAt,
      endsAt: b.endsAt,
      state: 'confirmed',
    }).expect(200);
    expect(res.body.bookings[0]).toMatchObject({ state: 'confirmed', version: 2 });
  });

  it('keeps progress in order: a pencilled booking cannot be marked done', async () => {
    const stageId = await stageOf('TW-2420', 'fill');
    const created = await write(scheduler, 'post', '/api/bookings', {
      stageId,
      resourceId: await resource('Crew Otter'),
      startsAt: '2026-11-11T08:00:00Z',
    }).expect(201);
    const b = created.body.bookings[0];
    const res = await write(scheduler, 'post', `/api/bookings/${b.id}/progress`, { state: 'done', version: 1 }).expect(
      409,
    );
    expect(res.body).toMatchObject({ code: 'transition-refused', detail: "A pencilled booking can't be marked done." });
  });
});

describe('progress on site', () => {
  // The demo scenario's today is Monday 1 June 2026: its crews have confirmed work that day and on
  // Thursday, each day's first starting at 08:00. The first confirmed crew booking of a day:
  const crewBooking = async (day: string) =>
    String(
      (
        await ctx
          .knex('bookings')
          .join('resources', 'resources.id', 'bookings.resource_id')
          .where('resources.kind', 'install_crew')
          .where('bookings.starts_at', '>=', `${day}T00:00:00Z`)
          .where('bookings.starts_at', '<', `${day}T23:00:00Z`)
          .where('bookings.state', 'confirmed')
          .orderBy('bookings.starts_at')
          .first('bookings.id')
      ).id,
    );

  it('is marked on the day of the booking, not days ahead', async () => {
    const thursday = await crewBooking('2026-06-04');
    const early = await write(scheduler, 'post', `/api/bookings/${thursday}/progress`, {
      state: 'on_site',
      version: (await row(thursday)).version,
    }).expect(409);
    expect(early.body).toMatchObject({
      code: 'transition-refused',
      detail: 'This booking is on Thu 4 Jun 08:00: it can be marked on site on that day.',
    });
    const today = await crewBooking('2026-06-01');
    const res = await write(scheduler, 'post', `/api/bookings/${today}/progress`, {
      state: 'on_site',
      version: (await row(today)).version,
    }).expect(200);
    expect(res.body.state).toBe('on_site');
  });
});

describe('the engine on every path', () => {
  let lift: { id: string };

  beforeAll(async () => {
    // TW-2417: the base is poured on Monday 14 September 2026 (ends 13:00 BST); 70 % strength by
    // ACI 209R-92 comes 6.91 days later (Mon 21 Sep 10:56), and the walls, not booked yet, need 16
    // working hours after that, so the lift can go in from Wednesday 23 September 09:00 BST.
    const base = await write(scheduler, 'post', '/api/bookings', {
      stageId: await stageOf('TW-2417', 'base_pour'),
      resourceId: await resource('Millstone gang'),
      startsAt: '2026-09-14T07:00:00Z',
    });
    expect(base.status, JSON.stringify(base.body)).toBe(201);
    const booked = await write(scheduler, 'post', '/api/bookings', {
      stageId: await stageOf('TW-2417', 'lift'),
      resourceId: await resource('60 t mobile crane'),
      startsAt: '2026-09-23T08:00:00Z',
    });
    expect(booked.status, JSON.stringify(booked.body)).toBe(201);
    lift = booked.body.bookings[0];
    await write(scheduler, 'post', `/api/bookings/${lift.id}/publish`, { version: 1 }).expect(200);
  });

  it('refuses to accept a proposed time before the base has cured; the booking and the proposal stay as they were', async () => {
    await write(crane, 'post', `/api/partner/slots/${lift.id}/answer`, {
      version: 2,
      action: 'propose',
      proposedStart: '2026-09-16T07:00:00Z',
      proposedEnd: '2026-09-16T11:00:00Z',
    }).expect(200);
    const res = await write(scheduler, 'post', `/api/bookings/${lift.id}/proposal/accept`, { version: 2 }).expect(422);
    expect(res.body.violations.map((v: { kind: string }) => v.kind)).toContain('cure');
    expect(await row(lift.id)).toMatchObject({ state: 'sent', version: 2 });
    expect((await row(lift.id)).startsAt.toISOString()).toBe('2026-09-23T08:00:00.000Z');
    expect(await ctx.knex('booking_answers').where({ booking_id: lift.id, proposal_status: 'open' })).toHaveLength(1);
  });

  it("refuses to accept a proposal for Sunday 03:00, outside the crane firm's working week", async () => {
    await write(crane, 'post', `/api/partner/slots/${lift.id}/answer`, {
      version: 2,
      action: 'propose',
      proposedStart: '2026-09-27T02:00:00Z',
      proposedEnd: '2026-09-27T06:00:00Z',
    }).expect(200);
    const res = await write(scheduler, 'post', `/api/bookings/${lift.id}/proposal/accept`, { version: 2 }).expect(422);
    expect(res.body.violations.map((v: { kind: string }) => v.kind)).toContain('availability');
    expect((await row(lift.id)).startsAt.toISOString()).toBe('2026-09-23T08:00:00.000Z');
  });

  it("checks a partner's own choice of person: someone away that day is refused", async () => {
    const b = await pencilIn(ctx.knex, {
      job: 'TW-2421',
      stage: 'electrical_connect',
      resource: 'Priya Nair',
      startsAt: '2026-11-18T08:00:00Z',
      endsAt: '2026-11-18T12:00:00Z',
      state: 'sent',
    });
    const tom = await resource('Tom Ashworth');
    await ctx.knex('calendar_exceptions').insert({
      resource_id: tom,
      starts_at: '2026-11-16T00:00:00Z',
      ends_at: '2026-11-21T00:00:00Z',
      reason: 'Holiday',
    });
    const res = await write(electrician, 'put', `/api/partner/slots/${b.id}/person`, {
      resourceId: tom,
      version: (await row(b.id)).version,
    }).expect(422);
    expect(res.body.violations.map((v: { kind: string }) => v.kind)).toContain('availability');
    expect(String((await row(b.id)).resourceId)).toBe(await resource('Priya Nair'));
  });

  it('refuses a resource of the wrong kind for the stage (a handover on the roller set)', async () => {
    const stageId = await stageOf('TW-2421', 'handover');
    const res = await write(scheduler, 'post', '/api/bookings', {
      stageId,
      resourceId: await resource('Roller set'),
      startsAt: '2026-11-20T08:00:00Z',
    }).expect(422);
    expect(res.body).toMatchObject({
      code: 'wrong-kind',
      detail: "Roller set is a rollers; 'Handover' needs install crew.",
    });
    expect(await ctx.knex('bookings').where({ stage_id: stageId })).toEqual([]);
  });
});

describe('two requests at once', () => {
  it('50 pencilled bookings of one crew for the same hour: exactly one is kept', async () => {
    const crew = await resource('Crew Kestrel');
    // Fifty separate one-hour visits of one job (no order between them), so each alone would be kept.
    const jobId = await idOf(ctx.knex, 'jobs', { reference: 'TW-2424' });
    const stages = await ctx
      .knex('stages')
      .insert(
        Array.from({ length: 50 }, (_, n) => ({
          job_id: jobId,
          // Not 'handover': the job's own handover stays the one stage of that kind (see stageOf).
          kind: 'service_visit',
          name: `Aftercare visit ${n + 1}`,
          sequence: 100 + n,
          duration_minutes: 60,
          requirements: JSON.stringify([{ kind: 'install_crew', count: 1 }]),
        })),
      )
      .returning('id');
    const answers = await Promise.all(
      stages.map((s) =>
        write(scheduler, 'post', '/api/bookings', {
          stageId: String(s.id),
          resourceId: crew,
          startsAt: '2027-01-12T09:00:00Z',
          endsAt: '2027-01-12T10:00:00Z',
        }),
      ),
    );
    const codes = answers.map((a) => a.status);
    expect(codes.filter((c) => c === 201)).toHaveLength(1);
    expect(codes.filter((c) => c !== 201 && c !== 422 && c !== 409)).toEqual([]);
    const kept = await ctx
      .knex('bookings')
      .where({ resource_id: crew })
      .where('starts_at', '<', '2027-01-12T10:00:00Z')
      .where('ends_at', '>', '2027-01-12T09:00:00Z');
    expect(kept).toHaveLength(1);
  });

  it('makes a second write to the same crew wait until the first has finished (advisory locks)', async () => {
    const actor = (await actorFor(
      ctx.knex,
      await idOf(ctx.knex, 'users', { email: account('scheduler').email }),
      undefined,
    ))!;
    const writer = new BookingWriter(ctx.knex, () => TEST_TODAY.getTime());
    const crew = await resource('Crew Heron');
    const times = { startsAt: Date.parse('2027-01-13T09:00:00Z'), endsAt: Date.parse('2027-01-13T10:00:00Z') };
    let reached = 0;
    let release!: () => void;
    const gate = new Promise<void>((resolve) => {
      release = resolve;
    });
    // Each write books its stage, then holds its transaction open at the gate.
    const book = (stageId: string) =>
      writer
        .run({ actor, party: 'office' }, { stageIds: [stageId], resourceIds: [crew] }, async (w) => {
          await w.apply({ action: 'book', stageId, resourceId: crew, ...times });
          reached += 1;
          await gate;
        })
        .then(
          () => 'kept',
          (error: { status?: number }) => `refused ${error.status}`,
        );
    const first = book(await stageOf('TW-2421', 'survey'));
    const second = book(await stageOf('TW-2422', 'survey'));
    const waiting = async () =>
      Number(
        (await ctx.knex.raw("SELECT count(*) AS n FROM pg_locks WHERE locktype = 'advisory' AND NOT granted")).rows[0]
          .n,
      );
    // Both got in (no lock), or one is in and the other waits for it (the lock); either way one moment decides.
    await waitUntil(
      async () => reached === 2 || (reached === 1 && (await waiting()) > 0),
      10_000,
      'one write inside, the other waiting',
    );
    expect(reached).toBe(1);
    release();
    expect((await Promise.all([first, second])).sort()).toEqual(['kept', 'refused 422']);
  });

  it('20 moves of one stage based on the same version: one wins, the others get 409', async () => {
    const stageId = await stageOf('TW-2419', 'handover');
    const created = await write(scheduler, 'post', '/api/bookings', {
      stageId,
      resourceId: await resource('Crew Heron'),
      startsAt: '2027-01-19T09:00:00Z',
    }).expect(201);
    const b = created.body.bookings[0];
    const moves = await Promise.all(
      Array.from({ length: 20 }, (_, n) =>
        write(scheduler, 'post', `/api/stages/${stageId}/move`, {
          startsAt: `2027-01-${String(20 + (n % 5)).padStart(2, '0')}T09:00:00Z`,
          versions: { [b.id]: 1 },
        }),
      ),
    );
    expect(moves.filter((m) => m.status === 200)).toHaveLength(1);
    expect(moves.filter((m) => m.status === 409).every((m) => m.body.code === 'stale-version')).toBe(true);
    expect(moves.filter((m) => m.status === 409)).toHaveLength(19);
    expect((await row(b.id)).version).toBe(2);
  });

  it('20 answers to one request (every button, twice over): exactly one changes the state', async () => {
    const b = await pencilIn(ctx.knex, {
      job: 'TW-2422',
      stage: 'electrical_connect',
      resource: 'Tom Ashworth',
      startsAt: '2027-02-02T09:00:00Z',
      endsAt: '2027-02-02T13:00:00Z',
      state: 'sent',
    });
    const signer = new LinkSigner(ctx.config.LINK_SECRET);
    const actions = ['confirm', 'decline'] as const;
    const links = await Promise.all(
      Array.from({ length: 20 }, (_, n) =>
        signer.signAnswer({ bookingId: b.id, version: 1, action: actions[n % 2]!, expiresAt: tomorrow() }),
      ),
    );
    const answers = await Promise.all(
      links.map((token) => request(ctx.waterline.app).post(`/answer/${token}`).type('form').send({})),
    );
    expect(answers.filter((a) => a.status === 200)).toHaveLength(1);
    expect(answers.filter((a) => a.status === 409)).toHaveLength(19);
    expect(await ctx.knex('booking_answers').where({ booking_id: b.id })).toHaveLength(1);
    const audit = await ctx.knex('audit_log').where({ entity: 'booking', entity_id: b.id });
    expect(audit).toHaveLength(1);
  });

  it('keeps two on-site bookings of one crew apart, as it does confirmed ones (the database refuses the overlap)', async () => {
    const crew = await resource('Crew Otter');
    const [a] = await ctx
      .knex('bookings')
      .insert({
        stage_id: await stageOf('TW-2423', 'fill'),
        resource_id: crew,
        starts_at: '2027-02-09T09:00:00Z',
        ends_at: '2027-02-09T12:00:00Z',
        state: 'on_site',
      })
      .returning('id');
    await expect(
      ctx.knex('bookings').insert({
        stage_id: await stageOf('TW-2424', 'fill'),
        resource_id: crew,
        starts_at: '2027-02-09T10:00:00Z',
        ends_at: '2027-02-09T13:00:00Z',
        state: 'confirmed',
      }),
    ).rejects.toMatchObject({ code: '23P01' });
    expect(a).toBeDefined();
  });
});

describe('an answer link', () => {
  it('answers its request once: Decline after Confirm is refused and the slot stays confirmed', async () => {
    const b = await pencilIn(ctx.knex, {
      job: 'TW-2423',
      stage: 'electrical_connect',
      resource: 'Tom Ashworth',
      startsAt: '2027-02-16T09:00:00Z',
      endsAt: '2027-02-16T13:00:00Z',
      state: 'sent',
    });
    const signer = new LinkSigner(ctx.config.LINK_SECRET);
    const confirm = await signer.signAnswer({ bookingId: b.id, version: 1, action: 'confirm', expiresAt: tomorrow() });
    const decline = await signer.signAnswer({ bookingId: b.id, version: 1, action: 'decline', expiresAt: tomorrow() });
    const web = () => request(ctx.waterline.app);
    await web().post(`/answer/${confirm}`).type('form').send({}).expect(200);
    const page = await web().get(`/answer/${decline}`);
    expect(page.status).toBe(409);
    const again = await web().post(`/answer/${decline}`).type('form').send({});
    expect(again.status).toBe(409);
    expect(await row(b.id)).toMatchObject({ state: 'confirmed' });
  });
});

describe('bounds on booking times', () => {
  const stage = () => stageOf('TW-2424', 'handover');

  it('refuses year 9999 and year 0001 at once with the field named, while the server keeps answering others', async () => {
    const stageId = await stage();
    const crew = await resource('Crew Otter');
    for (const startsAt of ['9999-12-30T09:00:00Z', '0001-01-02T09:00:00Z', '2199-06-01T09:00:00Z']) {
      const started = performance.now();
      const [res, health] = await Promise.all([
        write(scheduler, 'post', '/api/bookings', { stageId, resourceId: crew, startsAt }),
        request(ctx.waterline.app).get('/api/health'),
      ]);
      const took = performance.now() - started;
      expect(res.status, `${startsAt}: ${JSON.stringify(res.body)}`).toBe(400);
      expect(res.body.errors.map((e: { field: string }) => e.field)).toContain('startsAt');
      expect(health.status).toBe(200);
      // Before the window existed a year-9999 booking held the server for 80 s (holidays and clock changes counted year by year).
      expect(took).toBeLessThan(1000);
    }
    expect(await ctx.knex('bookings').where({ stage_id: stageId })).toEqual([]);
  });

  it('refuses a booking ten years long for a one-hour stage, naming the end and how long it may run', async () => {
    const stageId = await stage();
    const res = await write(scheduler, 'post', '/api/bookings', {
      stageId,
      resourceId: await resource('Crew Otter'),
      startsAt: '2026-12-01T09:00:00Z',
      endsAt: '2027-12-01T10:00:00Z',
    }).expect(400);
    // 60 minutes of work plus 480 of slack from Tuesday 09:00 on the crew's 08:00–17:00 week: 480 on Tuesday, 60 on Wednesday.
    expect(res.body.errors).toEqual([
      {
        field: 'endsAt',
        message: "must be no later than Wed 2 Dec 09:00 (the stage's working time plus 8 working hours)",
      },
    ]);
  });

  it("refuses a proposal that is not a real time in the firm's zone (30 February, 01:30 as the clocks go forward)", async () => {
    const b = await pencilIn(ctx.knex, {
      job: 'TW-2424',
      stage: 'electrical_connect',
      resource: 'Tom Ashworth',
      startsAt: '2027-03-30T08:00:00Z',
      endsAt: '2027-03-30T12:00:00Z',
      state: 'sent',
    });
    const signer = new LinkSigner(ctx.config.LINK_SECRET);
    const propose = await signer.signAnswer({ bookingId: b.id, version: 1, action: 'propose', expiresAt: tomorrow() });
    const web = () => request(ctx.waterline.app);
    for (const form of [
      { date: '2027-02-30', start: '09:00', end: '12:00' },
      { date: '2027-03-28', start: '01:30', end: '03:00' },
    ]) {
      const res = await web().post(`/answer/${propose}`).type('form').send(form);
      expect(res.status, JSON.stringify(form)).toBe(400);
    }
    expect(await ctx.knex('booking_answers').where({ booking_id: b.id })).toEqual([]);
    // A real time still goes through.
    await web()
      .post(`/answer/${propose}`)
      .type('form')
      .send({ date: '2027-03-31', start: '09:00', end: '12:00' })
      .expect(200);
  });
});

describe('refusals in the words of the trade', () => {
  it('names the person and the stage when a stage is booked on someone twice (no database column names)', async () => {
    const stageId = await stageOf('TW-2423', 'commission');
    const crew = await resource('Crew Heron');
    await write(scheduler, 'post', '/api/bookings', {
      stageId,
      resourceId: crew,
      startsAt: '2027-03-02T09:00:00Z',
    }).expect(201);
    const again = await write(scheduler, 'post', '/api/bookings', {
      stageId,
      resourceId: crew,
      startsAt: '2027-03-04T09:00:00Z',
    }).expect(409);
    expect(again.body).toMatchObject({
      code: 'already-booked',
      detail: "Crew Heron already has 'Commission' on TW-2423.",
    });
  });

  it('says which item of a batch was refused, and keeps none of it', async () => {
    const fill = await stageOf('TW-2423', 'handover');
    const res = await write(scheduler, 'post', '/api/bookings/batch', {
      bookings: [
        { stageId: fill, resourceId: await resource('Crew Heron'), startsAt: '2027-03-09T09:00:00Z' },
        { stageId: '999999', resourceId: await resource('Crew Heron'), startsAt: '2027-03-10T09:00:00Z' },
      ],
    }).expect(404);
    expect(res.body).toMatchObject({ detail: 'Booking 2 of the batch: No such stage.', item: 1 });
    const late = await write(scheduler, 'post', '/api/bookings/batch', {
      bookings: [
        { stageId: fill, resourceId: await resource('Crew Heron'), startsAt: '2027-03-09T09:00:00Z' },
        { stageId: fill, resourceId: await resource('Crew Otter'), startsAt: '2199-03-10T09:00:00Z' },
      ],
    }).expect(400);
    expect(late.body.errors.map((e: { field: string }) => e.field)).toEqual(['bookings[1].startsAt']);
    expect(await ctx.knex('bookings').where({ stage_id: fill })).toEqual([]);
  });
});
