import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { AddressInfo } from 'node:net';
import {
  account,
  idOf,
  openBoardStream,
  signIn,
  startTestApp,
  sentWhileResourcesHeld,
  type Agent,
  type TestContext,
} from '../helpers/server.ts';
import { makeJob } from '../helpers/flows.ts';

/*
 * Time away of a resource: Crew Otter (Tideway's own crew) and Priya Nair (Brightspark
 * Electrical's electrician, marked away by her own firm). The test's today is Mon 1 Jun 2026;
 * London is on BST (UTC+1) all June, so local midnight is 23:00 UTC the day before.
 */
let ctx: TestContext;
let scheduler: Agent;
let partner: Agent;
let otherInstaller: Agent;
let otter: string;
let priya: string;
let fill: { jobId: string; stage: Record<string, string> };

const WEEK = { from: '2026-06-08T00:00:00Z', to: '2026-06-15T00:00:00Z' };

beforeAll(async () => {
  ctx = await startTestApp();
  scheduler = await signIn(ctx, account('scheduler').email);
  partner = await signIn(ctx, account('partner', 'Brightspark Electrical').email);
  otherInstaller = await signIn(ctx, account('scheduler', 'Moorview Spas').email);
  otter = await idOf(ctx.knex, 'resources', { name: 'Crew Otter' });
  priya = await idOf(ctx.knex, 'resources', { name: 'Priya Nair' });
  fill = await makeJob(ctx.knex, {
    reference: 'AW-301',
    stages: [
      { kind: 'fill', name: 'Fill', minutes: 120, needs: { install_crew: 1 } },
      { kind: 'electrical_connect', name: 'Connect and certify', minutes: 120, needs: { electrician: 1 } },
    ],
    links: [],
  });
  // Wed 10 Jun 09:00–11:00 BST on Crew Otter, and Fri 12 Jun (after the time away) on Crew Otter too.
  for (const [stageId, resourceId, startsAt, endsAt] of [
    [fill.stage.fill, otter, '2026-06-10T08:00:00Z', '2026-06-10T10:00:00Z'],
    [fill.stage.electrical_connect, priya, '2026-06-10T12:00:00Z', '2026-06-10T14:00:00Z'],
  ] as const)
    await scheduler
      .post('/api/bookings')
      .set('X-CSRF-Token', scheduler.csrf)
      .send({ stageId, resourceId, startsAt, endsAt })
      .expect(201);
}, 60_000);
afterAll(async () => {
  await ctx?.close();
});

const markAway = (as: Agent, resourceId: string, body: Record<string, unknown>) =>
  as.post(`/api/resources/${resourceId}/absences`).set('X-CSRF-Token', as.csrf).send(body);
const closuresOf = async (as: Agent, resourceId: string, week = WEEK) => {
  const board = (await as.get('/api/board').query(week).expect(200)).body;
  const row = board.resources.find((r: { id: string }) => r.id === resourceId);
  const cal = board.calendars.find((c: { id: string }) => c.id === row.calendarId);
  return ((cal.closures ?? []) as { start: number; end: number }[]).map(({ start, end }) => ({ start, end }));
};
/** The reasons a reader's board gives for a resource's closures (undefined where not told). */
const reasonsOf = async (as: Agent, resourceId: string, week = WEEK) => {
  const board = (await as.get('/api/board').query(week).expect(200)).body;
  const row = board.resources.find((r: { id: string }) => r.id === resourceId);
  const cal = board.calendars.find((c: { id: string }) => c.id === row.calendarId);
  return ((cal.closures ?? []) as { reason?: string }[]).map((c) => c.reason);
};

describe('marking a crew away', () => {
  it('keeps whole local days, shades them on the board, names the bookings left in them, and refreshes open boards', async () => {
    const before = await scheduler.get('/api/board').query(WEEK).expect(200);
    const res = await markAway(scheduler, otter, { from: '2026-06-10', to: '2026-06-11', reason: 'Holiday' }).expect(
      201,
    );
    expect(res.body.absence).toMatchObject({
      resourceId: otter,
      from: '2026-06-10',
      to: '2026-06-11',
      reason: 'Holiday',
    });
    expect(res.body.affected).toEqual([
      {
        bookingId: expect.any(String),
        startsAt: '2026-06-10T08:00:00.000Z',
        endsAt: '2026-06-10T10:00:00.000Z',
        jobReference: 'AW-301',
        stageName: 'Fill',
      },
    ]);
    // Wed 10 Jun 00:00 BST to Fri 12 Jun 00:00 BST.
    expect(await closuresOf(scheduler, otter)).toContainEqual({
      start: Date.UTC(2026, 5, 9, 23),
      end: Date.UTC(2026, 5, 11, 23),
    });
    // A board loaded before it is out of date now (no 304).
    await scheduler
      .get('/api/board')
      .query(WEEK)
      .set('If-None-Match', before.headers.etag as string)
      .expect(200);
    const audit = await ctx.knex('audit_log').where({ entity: 'absence', entity_id: res.body.absence.id });
    expect(audit.map((a: { action: string }) => a.action)).toEqual(['create']);

    const listed = (await scheduler.get(`/api/resources/${otter}/absences`).expect(200)).body.items;
    expect(listed).toContainEqual(res.body.absence);
  });

  it('takes the time away off again, and the board shades nothing there', async () => {
    const [a] = (await scheduler.get(`/api/resources/${otter}/absences`).expect(200)).body.items;
    await scheduler.delete(`/api/absences/${a.id}`).set('X-CSRF-Token', scheduler.csrf).expect(204);
    expect(await closuresOf(scheduler, otter)).not.toContainEqual({
      start: Date.UTC(2026, 5, 9, 23),
      end: Date.UTC(2026, 5, 11, 23),
    });
    await scheduler.delete(`/api/absences/${a.id}`).set('X-CSRF-Token', scheduler.csrf).expect(404);
  });

  it('waits for a booking of the crew under way (the write path holds the crew), so it sees it or is seen', async () => {
    // A booking of Otter under way holds the write path's lock on Otter until it is saved; the time
    // away waits for it, and a booking sent after the time away started waits for that in turn.
    // Before, the two could pass each other: the booking checked against the days before the time
    // away, the time away listing the bookings before the booking was saved (201, and named nowhere).
    const { waited, response: marked } = await sentWhileResourcesHeld(ctx.knex, [otter], () =>
      markAway(scheduler, otter, { from: '2026-10-13', to: '2026-10-13', reason: 'Training day' }),
    );
    expect(waited).toBe(true);
    expect(marked.status).toBe(201);
    await scheduler.delete(`/api/absences/${marked.body.absence.id}`).set('X-CSRF-Token', scheduler.csrf).expect(204);
  });

  it('refuses bad days with the field and the reason, keeping nothing', async () => {
    const cases: [Record<string, unknown>, { field: string; message: string }][] = [
      [
        { from: '2026-06-12', to: '2026-06-10', reason: 'Holiday' },
        { field: 'to', message: 'must be on or after the first day' },
      ],
      [
        { from: '2026-06-10', to: '2027-06-11', reason: 'Holiday' },
        { field: 'to', message: 'must be at most 366 days after the first day' },
      ],
      [{ from: '9999-01-01', to: '2026-06-10', reason: 'Holiday' }, expect.objectContaining({ field: 'from' })],
      [
        { from: '2026-06-10', to: '2026-06-10', reason: '' },
        { field: 'reason', message: 'is required: say why, in a few words' },
      ],
      [{ from: '2026-06-10', to: '2026-06-10', reason: 'Hol\u0000iday' }, expect.objectContaining({ field: 'reason' })],
      [
        { from: '2026-06-10', to: '2026-06-10', reason: 'Holiday', startsAt: '2026-06-10T08:00:00Z' },
        { field: 'startsAt', message: 'is not a field this request takes' },
      ],
    ];
    const count = async () => Number((await ctx.knex('calendar_exceptions').count('* as n').first())!.n);
    const was = await count();
    for (const [body, problem] of cases) {
      const res = await markAway(scheduler, otter, body).expect(400);
      expect(res.headers['content-type']).toContain('application/problem+json');
      expect(res.body.errors, JSON.stringify(body)).toEqual([problem]);
    }
    expect(await count()).toBe(was);
  });
});

describe('time away that overlaps time away already marked', () => {
  it('is refused, naming what is marked, for whole days and part of a day; days next to it are fine', async () => {
    const week = await markAway(scheduler, otter, { from: '2026-11-09', to: '2026-11-13', reason: 'Holiday' }).expect(
      201,
    );
    const count = async () => Number((await ctx.knex('calendar_exceptions').count('* as n').first())!.n);
    const was = await count();
    for (const body of [
      { from: '2026-11-09', to: '2026-11-13', reason: 'Holiday' },
      { from: '2026-11-12', to: '2026-11-17', reason: 'Holiday' },
      { from: '2026-11-11', to: '2026-11-11', fromTime: '14:00', reason: 'Dentist' },
    ]) {
      const res = await markAway(scheduler, otter, body).expect(409);
      expect(res.body).toMatchObject({
        code: 'overlap',
        detail:
          'Crew Otter is already marked away Mon 9 Nov – Fri 13 Nov (Holiday). Change the days, or take that off first.',
        errors: [{ field: 'from', message: 'must not overlap days already marked' }],
      });
    }
    expect(await count()).toBe(was);
    // The Friday after, and the Sunday before: they meet it, they do not overlap it.
    const after = await markAway(scheduler, otter, { from: '2026-11-14', to: '2026-11-14', reason: 'Training' }).expect(
      201,
    );
    const before = await markAway(scheduler, otter, {
      from: '2026-11-08',
      to: '2026-11-08',
      fromTime: '09:00',
      reason: 'Training',
    }).expect(201);
    const part = await markAway(scheduler, otter, {
      from: '2026-11-08',
      to: '2026-11-08',
      toTime: '10:00',
      reason: 'Dentist',
    }).expect(409);
    expect(part.body.detail).toBe(
      'Crew Otter is already marked away Sun 8 Nov from 09:00 (Training). Change the days, or take that off first.',
    );
    for (const id of [week.body.absence.id, after.body.absence.id, before.body.absence.id])
      await scheduler.delete(`/api/absences/${id}`).set('X-CSRF-Token', scheduler.csrf).expect(204);
  });

  it('sent twice at once (a double-click): one is kept, the other refused', async () => {
    const body = { from: '2026-11-20', to: '2026-11-20', reason: 'Holiday' };
    const answers = await Promise.all([markAway(scheduler, otter, body), markAway(scheduler, otter, body)]);
    expect(answers.map((a) => a.status).sort()).toEqual([201, 409]);
    const listed = (await scheduler.get(`/api/resources/${otter}/absences`).expect(200)).body.items.filter(
      (a: { from: string }) => a.from === '2026-11-20',
    );
    expect(listed).toHaveLength(1);
    await scheduler.delete(`/api/absences/${listed[0].id}`).set('X-CSRF-Token', scheduler.csrf).expect(204);
  });

  it("another resource's time away, or the firm's closed days, are no overlap", async () => {
    const heron = await idOf(ctx.knex, 'resources', { name: 'Crew Heron' });
    const body = { from: '2026-11-23', to: '2026-11-23', reason: 'Holiday' };
    const a = await markAway(scheduler, otter, body).expect(201);
    const b = await markAway(scheduler, heron, body).expect(201);
    await scheduler.delete(`/api/absences/${a.body.absence.id}`).set('X-CSRF-Token', scheduler.csrf).expect(204);
    await scheduler.delete(`/api/absences/${b.body.absence.id}`).set('X-CSRF-Token', scheduler.csrf).expect(204);
  });
});

describe('part of a day away', () => {
  it('keeps the time it starts or ends, shades only that part of the day, and the engine books around it', async () => {
    const job = await makeJob(ctx.knex, {
      reference: 'AW-304',
      stages: [
        { kind: 'fill', name: 'Fill', minutes: 60, needs: { install_crew: 1 } },
        { kind: 'handover', name: 'Handover', minutes: 60, needs: { install_crew: 1 } },
      ],
      links: [],
    });
    // Wed 10 Jun from 12:00 BST: AW-301's fill (09:00–11:00 BST) is not in it.
    const res = await markAway(scheduler, otter, {
      from: '2026-06-10',
      to: '2026-06-10',
      fromTime: '12:00',
      reason: 'Dentist',
    }).expect(201);
    expect(res.body.absence).toMatchObject({ from: '2026-06-10', to: '2026-06-10', fromTime: '12:00', toTime: null });
    expect(res.body.affected).toEqual([]);
    // 12:00 BST is 11:00 UTC; the day ends at 00:00 BST Thu (23:00 UTC Wed).
    expect(await closuresOf(scheduler, otter)).toContainEqual({
      start: Date.UTC(2026, 5, 10, 11),
      end: Date.UTC(2026, 5, 10, 23),
    });
    const book = (stageId: string | undefined, startsAt: string, endsAt: string) =>
      scheduler
        .post('/api/bookings')
        .set('X-CSRF-Token', scheduler.csrf)
        .send({ stageId, resourceId: otter, startsAt, endsAt });
    // 13:00–14:00 BST is in the time away; 11:00–12:00 BST ends as it begins.
    const refused = await book(job.stage.fill, '2026-06-10T12:00:00Z', '2026-06-10T13:00:00Z').expect(422);
    expect(refused.body.violations.map((v: { kind: string }) => v.kind)).toContain('availability');
    await book(job.stage.fill, '2026-06-10T10:00:00Z', '2026-06-10T11:00:00Z').expect(201);

    // Thu 11 Jun until 10:30 BST names the handover booked at 09:00–10:00 BST, and lists as such.
    await book(job.stage.handover, '2026-06-11T08:00:00Z', '2026-06-11T09:00:00Z').expect(201);
    const morning = await markAway(scheduler, otter, {
      from: '2026-06-11',
      to: '2026-06-11',
      toTime: '10:30',
      reason: 'Van MOT',
    }).expect(201);
    expect(morning.body.affected.map((b: { stageName: string }) => b.stageName)).toEqual(['Handover']);
    const listed = (await scheduler.get(`/api/resources/${otter}/absences`).expect(200)).body.items;
    expect(listed.map((a: { fromTime: string | null; toTime: string | null }) => [a.fromTime, a.toTime])).toEqual([
      ['12:00', null],
      [null, '10:30'],
    ]);
    for (const a of listed)
      await scheduler.delete(`/api/absences/${a.id}`).set('X-CSRF-Token', scheduler.csrf).expect(204);
  });

  it('refuses a time that is not one, or that ends before it starts, naming the field, for a person and for the firm', async () => {
    const day = { from: '2026-06-10', to: '2026-06-10', reason: 'Dentist' };
    const cases: [Record<string, unknown>, { field: string; message: string }][] = [
      [
        { ...day, fromTime: '25:00' },
        { field: 'fromTime', message: 'must be a time of day like 13:00' },
      ],
      [
        { ...day, toTime: '9am' },
        { field: 'toTime', message: 'must be a time of day like 13:00' },
      ],
      [
        { ...day, fromTime: '14:00', toTime: '13:00' },
        { field: 'toTime', message: 'must be after the time away starts' },
      ],
      [
        { ...day, toTime: '00:00' },
        { field: 'toTime', message: 'must be after 00:00: leave it out when the last day is away whole' },
      ],
    ];
    // BST begins Sun 28 Mar 2027 at 01:00 UTC (last Sunday of March, gov.uk): 01:30 does not happen
    // (it is 02:30 BST, 01:30 UTC), so "01:30 to 02:15" would end (01:15 UTC) before it starts.
    cases.push([
      { from: '2027-03-28', to: '2027-03-28', reason: 'Dentist', fromTime: '01:30', toTime: '02:15' },
      { field: 'toTime', message: 'must be after the time away starts (the clocks go forward that night)' },
    ]);
    for (const [body, problem] of cases)
      expect((await markAway(scheduler, otter, body).expect(400)).body.errors, JSON.stringify(body)).toEqual([problem]);
    // Over two days, back at 09:00 on the second after leaving at 14:00 on the first is fine.
    const overnight = await markAway(scheduler, otter, {
      ...day,
      to: '2026-06-11',
      fromTime: '14:00',
      toTime: '09:00',
    }).expect(201);
    await scheduler
      .delete(`/api/absences/${overnight.body.absence.id}`)
      .set('X-CSRF-Token', scheduler.csrf)
      .expect(204);
    // The firm's closure takes the same rules.
    const closure = await scheduler
      .post('/api/firm/closures')
      .set('X-CSRF-Token', scheduler.csrf)
      .send({ ...day, fromTime: '14:00', toTime: '13:00' })
      .expect(400);
    expect(closure.body.errors).toEqual([{ field: 'toTime', message: 'must be after the time away starts' }]);
  });
});

describe("a partner firm's own people", () => {
  it("are marked away by their own firm, which the installer's open board hears of and then shades, naming no installer's job to them", async () => {
    const other = await makeJob(ctx.knex, {
      reference: 'AW-303',
      stages: [{ kind: 'electrical_connect', name: 'Connect and certify', minutes: 60, needs: { electrician: 1 } }],
      links: [],
    });
    const made = (
      await scheduler
        .post('/api/bookings')
        .set('X-CSRF-Token', scheduler.csrf)
        .send({
          stageId: other.stage.electrical_connect,
          resourceId: priya,
          startsAt: '2026-06-10T07:00:00Z',
          endsAt: '2026-06-10T08:00:00Z',
        })
        .expect(201)
    ).body.bookings[0] as { id: string; version: number };
    await scheduler
      .post(`/api/bookings/${made.id}/publish`)
      .set('X-CSRF-Token', scheduler.csrf)
      .send({ version: made.version })
      .expect(200);
    const asked = String(made.id);
    const server = ctx.waterline.app.listen(0, '127.0.0.1');
    await new Promise((r) => server.once('listening', r));
    const board = await openBoardStream(scheduler, (server.address() as AddressInfo).port);
    let res;
    try {
      res = await markAway(partner, priya, { from: '2026-06-10', to: '2026-06-10', reason: 'Training' }).expect(201);
      // The installer's board reloads (an event naming no booking).
      expect(await board.until((t) => t.includes('data: {"bookingId":""}'))).toContain(
        'event: bookings\ndata: {"bookingId":""}\n\n',
      );
    } finally {
      board.close();
      await new Promise((r) => server.close(r));
    }
    // What Tideway has asked her for that day (AW-303, 08:00 BST) is listed by its times only; its
    // pencilled plan for her (AW-301, 13:00 BST) is its own and not listed to her firm at all.
    expect(res.body.affected).toEqual([
      {
        bookingId: asked,
        startsAt: '2026-06-10T07:00:00.000Z',
        endsAt: '2026-06-10T08:00:00.000Z',
        jobReference: null,
        stageName: null,
      },
    ]);
    expect(await closuresOf(scheduler, priya)).toContainEqual({
      start: Date.UTC(2026, 5, 9, 23),
      end: Date.UTC(2026, 5, 10, 23),
    });
  });

  it("say why on their own firm's board only: the installer sees the partner's time, not its reason", async () => {
    // Priya was marked away by her own firm ("Training", 10 Jun) above.
    expect(await reasonsOf(scheduler, priya)).toEqual([undefined]);
    const otterAway = await markAway(scheduler, otter, {
      from: '2026-06-09',
      to: '2026-06-09',
      reason: 'Holiday',
    }).expect(201);
    try {
      expect(await reasonsOf(scheduler, otter)).toContain('Holiday');
    } finally {
      await scheduler
        .delete(`/api/absences/${otterAway.body.absence.id}`)
        .set('X-CSRF-Token', scheduler.csrf)
        .expect(204);
    }
  });

  it("are not the installer's to mark, nor another installer's resource: 404 as if they did not exist", async () => {
    await markAway(scheduler, priya, { from: '2026-06-10', to: '2026-06-10', reason: 'Holiday' }).expect(404);
    await markAway(otherInstaller, otter, { from: '2026-06-10', to: '2026-06-10', reason: 'Holiday' }).expect(404);
    await markAway(partner, otter, { from: '2026-06-10', to: '2026-06-10', reason: 'Holiday' }).expect(404);
    const [own] = (await partner.get(`/api/resources/${priya}/absences`).expect(200)).body.items;
    await scheduler.delete(`/api/absences/${own.id}`).set('X-CSRF-Token', scheduler.csrf).expect(404);
    await otherInstaller.get(`/api/resources/${priya}/absences`).expect(404);
    expect((await partner.get(`/api/resources/${priya}/absences`).expect(200)).body.items).toHaveLength(1);
  });

  it("show on the partner's own slot asked for before the time away, with the reason", async () => {
    // Installers can't ask for a time the person is away (the engine refuses it): this slot, Thu 18 Jun
    // 13:00–15:00 BST, was asked for first, and Priya was marked off sick that day afterwards.
    const job = await makeJob(ctx.knex, {
      reference: 'AW-302',
      stages: [{ kind: 'electrical_connect', name: 'Connect and certify', minutes: 120, needs: { electrician: 1 } }],
      links: [],
    });
    const created = await scheduler
      .post('/api/bookings')
      .set('X-CSRF-Token', scheduler.csrf)
      .send({
        stageId: job.stage.electrical_connect,
        resourceId: priya,
        startsAt: '2026-06-18T12:00:00Z',
        endsAt: '2026-06-18T14:00:00Z',
      })
      .expect(201);
    const booking = created.body.bookings[0] as { id: string; version: number };
    await scheduler
      .post(`/api/bookings/${booking.id}/publish`)
      .set('X-CSRF-Token', scheduler.csrf)
      .send({ version: booking.version })
      .expect(200);
    const slotsNow = async () =>
      (await partner.get('/api/partner/slots').query({ from: '2026-06-01T00:00:00Z' }).expect(200)).body.items as {
        id: string;
        away: string | null;
        startsAt: string;
        resource: { name: string };
      }[];
    expect((await slotsNow()).find((x) => x.id === String(booking.id))?.away).toBeNull();
    await markAway(partner, priya, { from: '2026-06-18', to: '2026-06-18', reason: 'Off sick' }).expect(201);
    const slots = await slotsNow();
    expect(slots.find((x) => x.id === String(booking.id))?.away).toBe('Priya Nair is marked away then (Off sick)');
    // Her slots say so exactly on the days she is away (10 Jun, Training; 18 Jun, Off sick); Tom's never.
    const awayDays = ['2026-06-10', '2026-06-18'];
    for (const x of slots)
      expect(x.away !== null, `${x.resource.name} ${x.startsAt} ${x.away}`).toBe(
        x.resource.name === 'Priya Nair' && awayDays.includes(x.startsAt.slice(0, 10)),
      );
  });
});

describe('closing the whole firm', () => {
  const close = (as: Agent, body: Record<string, unknown>) =>
    as.post('/api/firm/closures').set('X-CSRF-Token', as.csrf).send(body);

  it("waits for a booking of any of the firm's resources under way (the write path holds it)", async () => {
    const { waited, response: closed } = await sentWhileResourcesHeld(ctx.knex, [otter], () =>
      close(scheduler, { from: '2026-10-14', to: '2026-10-14', reason: 'Stocktake' }),
    );
    expect(waited).toBe(true);
    expect(closed.status).toBe(201);
    await scheduler
      .delete(`/api/firm/closures/${closed.body.closure.id}`)
      .set('X-CSRF-Token', scheduler.csrf)
      .expect(204);
  });

  it("shades every one of the firm's resources on the board and names the firm's bookings left in those days", async () => {
    const res = await close(scheduler, { from: '2026-06-10', to: '2026-06-10', reason: 'Works shutdown' }).expect(201);
    expect(res.body.closure).toMatchObject({ from: '2026-06-10', to: '2026-06-10', reason: 'Works shutdown' });
    expect(res.body.affected).toContainEqual({
      bookingId: expect.any(String),
      startsAt: '2026-06-10T08:00:00.000Z',
      endsAt: '2026-06-10T10:00:00.000Z',
      jobReference: 'AW-301',
      stageName: 'Fill',
    });
    // Priya is Brightspark's, not Tideway's: her booking that day is not Tideway's to move for this.
    expect(res.body.affected.map((b: { startsAt: string }) => b.startsAt)).not.toContain('2026-06-10T12:00:00.000Z');
    const day = { start: Date.UTC(2026, 5, 9, 23), end: Date.UTC(2026, 5, 10, 23) };
    for (const name of ['Crew Otter', 'Crew Heron', 'Tracked dumper'])
      expect(await closuresOf(scheduler, await idOf(ctx.knex, 'resources', { name })), name).toContainEqual(day);
    expect((await scheduler.get('/api/firm/closures').expect(200)).body.items).toEqual([res.body.closure]);
    // Another installer's board is not closed by it.
    expect(
      await closuresOf(otherInstaller, await idOf(ctx.knex, 'resources', { name: 'Moorview crew' })),
    ).not.toContainEqual(day);
  });

  it('closes the firm for part of a day (from 13:00), on its board and in its list', async () => {
    const res = await close(scheduler, {
      from: '2026-06-12',
      to: '2026-06-12',
      fromTime: '13:00',
      reason: 'Early finish',
    }).expect(201);
    expect(res.body.closure).toMatchObject({ from: '2026-06-12', to: '2026-06-12', fromTime: '13:00', toTime: null });
    // 13:00 BST is 12:00 UTC, to 00:00 BST Sat (23:00 UTC Fri).
    expect(await closuresOf(scheduler, otter)).toContainEqual({
      start: Date.UTC(2026, 5, 12, 12),
      end: Date.UTC(2026, 5, 12, 23),
    });
    await scheduler.delete(`/api/firm/closures/${res.body.closure.id}`).set('X-CSRF-Token', scheduler.csrf).expect(204);
  });

  it('refuses closed days that overlap days already closed, naming them, twice at once too', async () => {
    const res = await close(scheduler, { from: '2026-06-10', to: '2026-06-11', reason: 'Works shutdown' }).expect(409);
    expect(res.body).toMatchObject({
      code: 'overlap',
      detail: 'The firm is already closed Wed 10 Jun (Works shutdown). Change the days, or take that off first.',
      errors: [{ field: 'from', message: 'must not overlap days already marked' }],
    });
    const body = { from: '2026-12-29', to: '2026-12-30', reason: 'Stocktake' };
    const answers = await Promise.all([close(scheduler, body), close(scheduler, body)]);
    expect(answers.map((a) => a.status).sort()).toEqual([201, 409]);
    const kept = answers.find((a) => a.status === 201)!.body.closure;
    expect((await scheduler.get('/api/firm/closures').expect(200)).body.items).toContainEqual(kept);
    await scheduler.delete(`/api/firm/closures/${kept.id}`).set('X-CSRF-Token', scheduler.csrf).expect(204);
  });

  it('opens the firm again on every calendar, and another firm cannot take it off', async () => {
    const [closure] = (await scheduler.get('/api/firm/closures').expect(200)).body.items;
    await otherInstaller
      .delete(`/api/firm/closures/${closure.id}`)
      .set('X-CSRF-Token', otherInstaller.csrf)
      .expect(404);
    await partner.delete(`/api/firm/closures/${closure.id}`).set('X-CSRF-Token', partner.csrf).expect(404);
    await scheduler.delete(`/api/firm/closures/${closure.id}`).set('X-CSRF-Token', scheduler.csrf).expect(204);
    expect((await scheduler.get('/api/firm/closures').expect(200)).body.items).toEqual([]);
    expect(await closuresOf(scheduler, otter)).not.toContainEqual({
      start: Date.UTC(2026, 5, 9, 23),
      end: Date.UTC(2026, 5, 10, 23),
    });
  });

  it("of a partner firm closes its people on each installer's board, on each of its calendars", async () => {
    await close(partner, { from: '2026-06-16', to: '2026-06-17', reason: 'Works shutdown' }).expect(201);
    // Priya works to the electricians' calendar, Tom to the standard week: both are closed.
    for (const name of ['Priya Nair', 'Tom Ashworth'])
      expect(
        await closuresOf(scheduler, await idOf(ctx.knex, 'resources', { name }), {
          from: '2026-06-15T00:00:00Z',
          to: '2026-06-22T00:00:00Z',
        }),
        name,
      ).toContainEqual({ start: Date.UTC(2026, 5, 15, 23), end: Date.UTC(2026, 5, 17, 23) });
  });
});
