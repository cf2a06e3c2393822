import { afterAll, afterEach, beforeAll, describe, expect, it, onTestFinished, vi } from 'vitest';
import { account, idOf, signIn, startTestApp, type Agent, type TestContext } from '../helpers/server.ts';
import { addStage } from '../helpers/flows.ts';
import { BookingWriter } from '../../server/services/booking-writes.ts';
import type { MyWorkList } from '../../shared/schemas/my-work.ts';

/*
 * My work on a crew member's phone. The demo's today is Mon 1 Jun 2026 (BST, UTC+1); the demo crew
 * member Connor Reid works as Crew Heron and as himself. These tests book his own row (the demo
 * books crews, not him): TW-8801's dig today 08:00–12:00 BST and its fill on Thu 4 Jun 08:00–10:00.
 */
let ctx: TestContext;
let crew: Agent;
let today: string; // booking id
let thursday: string; // TW-8801's fill, Thu 4 Jun 08:00 BST
const run = vi.spyOn(BookingWriter.prototype, 'run');

const post = (id: string, body: object) =>
  crew.post(`/api/bookings/${id}/progress`).set('X-CSRF-Token', crew.csrf).send(body);
const versionOf = async (id: string) => (await ctx.knex('bookings').where('id', id).first('version')).version as number;
const stageOf = async (id: string) => (await ctx.knex('bookings').where('id', id).first('stage_id')).stageId as string;
const myWork = async () => (await crew.get('/api/my-work').expect(200)).body as MyWorkList;

beforeAll(async () => {
  ctx = await startTestApp();
  crew = await signIn(ctx, account('crew').email);
  const tideway = await idOf(ctx.knex, 'firms', { name: 'Tideway Hot Tubs' });
  const [job] = await ctx
    .knex('jobs')
    .insert({
      firm_id: tideway,
      reference: 'TW-8801',
      customer_name: 'Mina Holt',
      customer_phone: '07700 900801',
      customer_email: 'mina@home.example',
      site_address: '9 Weir Street',
      site_town: 'Headingley',
      site_postcode: 'LS6 2AB',
      installation_type: 'in_ground',
      status: 'planned',
    })
    .returning('id');
  const [stage] = await ctx
    .knex('stages')
    .insert({
      job_id: job.id,
      kind: 'excavation',
      name: 'Excavate pit',
      sequence: 1,
      duration_minutes: 240,
      requirements: JSON.stringify([{ kind: 'install_crew', count: 1 }]),
    })
    .returning('id');
  const [fill] = await ctx
    .knex('stages')
    .insert({
      job_id: job.id,
      kind: 'fill',
      name: 'Fill',
      sequence: 2,
      duration_minutes: 120,
      requirements: JSON.stringify([{ kind: 'installer', count: 1 }]),
    })
    .returning('id');
  const connor = await idOf(ctx.knex, 'resources', { name: 'Connor Reid' });
  const [b] = await ctx
    .knex('bookings')
    .insert({
      stage_id: stage.id,
      resource_id: connor,
      starts_at: '2026-06-01T07:00:00Z',
      ends_at: '2026-06-01T11:00:00Z',
      state: 'confirmed',
    })
    .returning('id');
  today = String(b.id);
  const [t] = await ctx
    .knex('bookings')
    .insert({
      stage_id: fill.id,
      resource_id: connor,
      starts_at: '2026-06-04T07:00:00Z',
      ends_at: '2026-06-04T09:00:00Z',
      state: 'confirmed',
    })
    .returning('id');
  thursday = String(t.id);
});
afterAll(async () => {
  await ctx.close();
});
afterEach(() => {
  run.mockClear();
});

describe('My work, as the crew sees it on a phone', () => {
  it("starts today by the server's clock, today's work first", async () => {
    const list = await myWork();
    expect(list.today).toBe('2026-06-01');
    expect(list.timeZone).toBe('Europe/London');
    expect(list.items[0]!.day).toBe('2026-06-01');
    expect(list.items.find((i) => i.bookingId === today)!.day).toBe('2026-06-01');
    expect(list.items.map((i) => i.day)).toEqual([...list.items.map((i) => i.day)].sort());
    // A fortnight from Mon 1 Jun 00:00 BST: nothing after Mon 15 Jun.
    expect(list.items.every((i) => i.day >= '2026-06-01' && i.day < '2026-06-15')).toBe(true);
  });

  it('carries which way the unit faces from the survey (null until settled), for the stages that set it down', async () => {
    const card = () => myWork().then((l) => l.items.find((i) => i.bookingId === today)!);
    expect((await card()).job.unitFacing).toBeNull();
    const jobId = (await card()).job.id;
    await ctx.knex('surveys').insert({
      job_id: jobId,
      access_width_mm: 900,
      ground_type: 'clay',
      unit_facing: 'Steps towards the patio doors',
    });
    try {
      expect((await card()).job.unitFacing).toBe('Steps towards the patio doors');
    } finally {
      await ctx.knex('surveys').where({ job_id: jobId }).delete();
    }
  });

  it('says when the unit arrives on the placement the delivery comes before, and on no other card', async () => {
    const jobId = await idOf(ctx.knex, 'jobs', { reference: 'TW-8801' });
    const delivery = await addStage(
      ctx.knex,
      jobId,
      { kind: 'delivery', name: 'Delivery', minutes: 120, needs: { lorry: 1 } },
      3,
    );
    const placement = await addStage(
      ctx.knex,
      jobId,
      { kind: 'placement', name: 'Place on the slab', minutes: 180, needs: { installer: 1 } },
      4,
    );
    await ctx.knex('dependencies').insert({ from_stage_id: delivery, to_stage_id: placement, type: 'FS' });
    // Fri 5 Jun: the lorry 08:00–10:00 BST (pencilled, the office's plan), Connor placing 10:00–13:00.
    await ctx.knex('bookings').insert([
      {
        stage_id: delivery,
        resource_id: await idOf(ctx.knex, 'resources', { name: '18 t lorry with loader crane' }),
        starts_at: '2026-06-05T07:00:00Z',
        ends_at: '2026-06-05T09:00:00Z',
        state: 'pencilled',
      },
      {
        stage_id: placement,
        resource_id: await idOf(ctx.knex, 'resources', { name: 'Connor Reid' }),
        starts_at: '2026-06-05T09:00:00Z',
        ends_at: '2026-06-05T12:00:00Z',
        state: 'confirmed',
      },
    ]);
    try {
      const items = (await myWork()).items;
      const card = items.find((i) => i.stage.id === placement)!;
      expect(card.unitArrives).toEqual({
        startsAt: '2026-06-05T07:00:00.000Z',
        endsAt: '2026-06-05T09:00:00.000Z',
        firmName: 'Carrow Haulage',
      });
      // Only the lift or placement a delivery comes before says it (Crew Heron's own placement from the demo too).
      expect([...new Set(items.filter((i) => i.unitArrives !== null).map((i) => i.stage.kind))]).toEqual(['placement']);
      expect(items.find((i) => i.bookingId === today)!.unitArrives).toBeNull();
      expect(items.find((i) => i.bookingId === thursday)!.unitArrives).toBeNull();
    } finally {
      await ctx.knex('bookings').whereIn('stage_id', [delivery, placement]).delete();
      await ctx.knex('stages').whereIn('id', [delivery, placement]).delete();
    }
  });

  it('puts the street, postcode, site contact, office phone and cautions on each card', async () => {
    const card = (await myWork()).items.find((i) => i.bookingId === today)!;
    expect(card.site).toEqual({ address: '9 Weir Street', town: 'Headingley', postcode: 'LS6 2AB', accessNotes: null });
    // Own-firm crew on their own booking: the householder's name and phone, and the office's phone.
    expect(card.contacts).toEqual([
      { role: 'Customer', name: 'Mina Holt', phone: '07700 900801' },
      { role: 'Installer office', name: 'Tideway Hot Tubs', phone: '0113 496 0001' },
    ]);
    expect(JSON.stringify(card)).not.toContain('mina@home.example');
    expect(card.cautions.at(-1)).toBe('Follow local codes and licensed practice.');
    expect(card.cautions.length).toBeGreaterThan(1); // digging has its own cautions before the closing note
  });

  it('offers "On site" only on the booking\'s day, and "Done" only once on site', async () => {
    const items = (await myWork()).items;
    expect(items.find((i) => i.bookingId === today)!.actions).toEqual(['arrive']);
    expect(items.find((i) => i.bookingId === thursday)!.actions).toEqual([]);
  });
});

describe('marking progress, and taking it back, through the guarded writer', () => {
  it('marks on site, takes it back, then done and takes that back', async () => {
    const arrived = await post(today, { action: 'arrive', version: await versionOf(today) }).expect(200);
    expect(arrived.body.state).toBe('on_site');
    expect((await myWork()).items.find((i) => i.bookingId === today)!.actions).toEqual(['finish', 'undo-arrive']);

    const back = await post(today, { action: 'undo-arrive', version: arrived.body.version }).expect(200);
    expect(back.body).toMatchObject({ state: 'confirmed', version: arrived.body.version + 1 });

    const again = await post(today, { action: 'arrive', version: back.body.version }).expect(200);
    const done = await post(today, { action: 'finish', version: again.body.version }).expect(200);
    expect(done.body.state).toBe('done');
    expect((await myWork()).items.find((i) => i.bookingId === today)!.actions).toEqual(['undo-finish']);

    const undone = await post(today, { action: 'undo-finish', version: done.body.version }).expect(200);
    expect(undone.body.state).toBe('on_site');
    // Five writes, each through the one door, each audited.
    expect(run).toHaveBeenCalledTimes(5);
    const audit = await ctx
      .knex('audit_log')
      .where({ entity: 'booking', entity_id: today })
      .orderBy('id')
      .select('after');
    expect(audit.map((a) => (a.after as { action: string }).action)).toEqual([
      'arrive',
      'undo-arrive',
      'arrive',
      'finish',
      'undo-finish',
    ]);
  });

  it("lists the reader's own days away and the firm's closed days in the fortnight, and no one else's", async () => {
    const scheduler = await signIn(ctx, account('scheduler').email);
    const mark = (path: string, body: object) =>
      scheduler.post(path).set('X-CSRF-Token', scheduler.csrf).send(body).expect(201);
    const heron = await idOf(ctx.knex, 'resources', { name: 'Crew Heron' });
    const otter = await idOf(ctx.knex, 'resources', { name: 'Crew Otter' });
    await mark(`/api/resources/${heron}/absences`, { from: '2026-06-03', to: '2026-06-04', reason: 'Holiday' });
    await mark(`/api/resources/${otter}/absences`, { from: '2026-06-02', to: '2026-06-02', reason: 'Training' });
    const connor = await idOf(ctx.knex, 'resources', { name: 'Connor Reid' });
    await mark(`/api/resources/${connor}/absences`, {
      from: '2026-06-09',
      to: '2026-06-09',
      fromTime: '14:00',
      reason: 'Dentist',
    });
    await mark('/api/firm/closures', { from: '2026-06-12', to: '2026-06-12', reason: 'Training day' });
    await mark('/api/firm/closures', { from: '2026-06-22', to: '2026-06-23', reason: 'Works shutdown' });
    try {
      // Connor works as Crew Heron (not Otter); the shutdown of 22 Jun is past the fortnight.
      // His own afternoon off (from 14:00 BST on Tue 9 Jun) is told with its time.
      const whole = { fromTime: null, toTime: null };
      expect((await myWork()).away).toEqual([
        { resourceName: 'Crew Heron', from: '2026-06-03', to: '2026-06-04', ...whole, reason: 'Holiday' },
        {
          resourceName: 'Connor Reid',
          from: '2026-06-09',
          to: '2026-06-09',
          fromTime: '14:00',
          toTime: null,
          reason: 'Dentist',
        },
        { resourceName: null, from: '2026-06-12', to: '2026-06-12', ...whole, reason: 'Training day' },
      ]);
    } finally {
      await ctx
        .knex('calendar_exceptions')
        .whereIn('reason', ['Holiday', 'Training', 'Training day', 'Works shutdown', 'Dentist'])
        .where('starts_at', '>=', '2026-06-01')
        .delete();
    }
  });

  it('says the hours of the week each of his rows works to, a crew moved onto a late shift on a line of its own', async () => {
    // The demo's standard week: Mon–Fri 08:00–17:00 (seeds/demo.ts, invented for the demo). Connor's
    // own row keeps no week of its own (as after a move back onto the standard week): it works to it.
    const connor = await idOf(ctx.knex, 'resources', { name: 'Connor Reid' });
    const stored = await ctx.knex('resources').where({ id: connor }).first('calendar_id');
    await ctx.knex('resources').where({ id: connor }).update({ calendar_id: null });
    onTestFinished(() => ctx.knex('resources').where({ id: connor }).update({ calendar_id: stored.calendarId }));
    expect((await myWork()).hours).toEqual([
      { resourceNames: ['Connor Reid', 'Crew Heron'], week: 'Standard week', words: 'Mon–Fri 08:00–17:00' },
    ]);
    const owner = await signIn(ctx, account('owner').email);
    const added = await owner
      .post('/api/firm/calendars')
      .set('X-CSRF-Token', owner.csrf)
      .send({ name: 'Late shift' })
      .expect(201);
    const late = String(added.body.calendar.id);
    await ctx
      .knex('calendars')
      .where({ id: late })
      .update({ weekly_hours: JSON.stringify({ 1: [[720, 1200]], 2: [[720, 1200]], 5: [[960, 1440]] }) });
    const heron = await idOf(ctx.knex, 'resources', { name: 'Crew Heron' });
    const tideway = await idOf(ctx.knex, 'firms', { name: 'Tideway Hot Tubs' });
    try {
      await owner
        .put(`/api/resources/${heron}/calendar`)
        .set('X-CSRF-Token', owner.csrf)
        .send({ calendarId: late, was: await idOf(ctx.knex, 'calendars', { name: 'Standard week', firm_id: tideway }) })
        .expect(200);
      expect((await myWork()).hours).toEqual([
        { resourceNames: ['Connor Reid'], week: 'Standard week', words: 'Mon–Fri 08:00–17:00' },
        { resourceNames: ['Crew Heron'], week: 'Late shift', words: 'Mon, Tue 12:00–20:00; Fri 16:00–midnight' },
      ]);
    } finally {
      await ctx.knex('resources').where({ id: heron }).update({ calendar_id: null });
      await ctx.knex('calendars').where({ id: late }).delete();
    }
  });

  it('refuses "On site" days ahead and "Done" before "On site" (409, in plain words)', async () => {
    const early = await post(thursday, { action: 'arrive', version: await versionOf(thursday) }).expect(409);
    expect(early.body.detail).toBe('This booking is on Thu 4 Jun 08:00: it can be marked on site on that day.');
    const notYet = await post(thursday, { action: 'finish', version: await versionOf(thursday) }).expect(409);
    expect(notYet.body.detail).toBe("A confirmed booking can't be marked done.");
  });

  it('takes a step a phone kept without a signal, checked against the day it was marked, the time kept in the audit', async () => {
    // Sunday's base pour, marked on site at 09:30 BST on the day with no signal, sent on Monday at 08:00 BST.
    const job = (
      await ctx
        .knex('stages')
        .where({ id: await stageOf(today) })
        .first('job_id')
    ).jobId as string;
    const [stage] = await ctx
      .knex('stages')
      .insert({
        job_id: job,
        kind: 'base',
        name: 'Pour base',
        sequence: 3,
        duration_minutes: 120,
        requirements: JSON.stringify([{ kind: 'install_crew', count: 1 }]),
      })
      .returning('id');
    const [b] = await ctx
      .knex('bookings')
      .insert({
        stage_id: stage.id,
        resource_id: await idOf(ctx.knex, 'resources', { name: 'Connor Reid' }),
        starts_at: '2026-05-31T08:00:00Z',
        ends_at: '2026-05-31T10:00:00Z',
        state: 'confirmed',
      })
      .returning('id');
    const sunday = String(b.id);
    onTestFinished(() => ctx.knex('stages').where({ id: stage.id }).delete());

    const late = await post(sunday, { action: 'arrive', version: 1 }).expect(409);
    expect(late.body.detail).toBe('This booking is on Sun 31 May 09:00: it can be marked on site on that day.');

    // 22 h 30 min before the test clock's Mon 1 Jun 07:00Z, by the phone's own clock.
    const kept = await post(sunday, { action: 'arrive', version: 1, markedMsAgo: 22.5 * 3_600_000 }).expect(200);
    expect(kept.body).toMatchObject({ state: 'on_site', version: 2 });
    const audit = await ctx.knex('audit_log').where({ entity: 'booking', entity_id: sunday }).orderBy('id').first();
    expect(audit.after).toMatchObject({ action: 'arrive', markedAt: '2026-05-31T08:30:00.000Z' });
    // The job page says when: on site from the time kept on the phone, done at the server's now.
    const onJobPage = async () =>
      ((await crew.get(`/api/jobs/${job}/stages`).expect(200)).body.items as { bookings: { id: string }[] }[])
        .flatMap((s) => s.bookings)
        .find((b) => String(b.id) === sunday);
    expect(await onJobPage()).toMatchObject({ state: 'on_site', arrivedAt: '2026-05-31T08:30:00.000Z', doneAt: null });
    const done = await post(sunday, { action: 'finish', version: 2 }).expect(200);
    expect(await onJobPage()).toMatchObject({
      state: 'done',
      arrivedAt: '2026-05-31T08:30:00.000Z',
      doneAt: '2026-06-01T07:00:00.000Z',
    });
    await post(sunday, { action: 'undo-finish', version: done.body.version }).expect(200);
    expect(await onJobPage()).toMatchObject({ state: 'on_site', doneAt: null });

    // The marked day is checked as today would be: a kept step can't mark Thursday's work on site early.
    const early = await post(thursday, {
      action: 'arrive',
      version: await versionOf(thursday),
      markedMsAgo: 3_600_000,
    }).expect(409);
    expect(early.body.detail).toBe('This booking is on Thu 4 Jun 08:00: it can be marked on site on that day.');
  });

  it('refuses a kept step marked more than 48 hours ago, or a time still to come, naming markedMsAgo (400)', async () => {
    const old = await post(thursday, { action: 'finish', version: 1, markedMsAgo: 48 * 3_600_000 + 60_000 }).expect(
      400,
    );
    expect(old.body.errors).toEqual([{ field: 'markedMsAgo', message: 'must be within the last 48 hours' }]);
    const ahead = await post(thursday, { action: 'finish', version: 1, markedMsAgo: -60_000 }).expect(400);
    expect(ahead.body.errors).toEqual([{ field: 'markedMsAgo', message: 'must not be negative' }]);
    for (const markedMsAgo of [1.5, '60000', 1e308, null]) {
      const bad = await post(thursday, { action: 'finish', version: 1, markedMsAgo }).expect(400);
      expect([...new Set(bad.body.errors.map((e: { field: string }) => e.field))]).toEqual(['markedMsAgo']);
    }
    expect(await versionOf(thursday)).toBe(1);
  });

  it('still takes the older { state } form', async () => {
    const res = await post(today, { state: 'done', version: await versionOf(today) }).expect(200);
    expect(res.body.state).toBe('done');
  });

  it('refuses an unknown action, or both forms at once, naming the field (400)', async () => {
    const unknown = await post(today, { action: 'teleport', version: 1 }).expect(400);
    expect(unknown.body.errors.map((e: { field: string }) => e.field)).toEqual(['action']);
    const both = await post(today, { action: 'arrive', state: 'on_site', version: 1 }).expect(400);
    expect(both.body.errors).toEqual([{ field: 'action', message: 'give either action or state, not both' }]);
  });
});
