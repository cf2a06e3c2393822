import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import {
  account,
  idOf,
  signIn,
  startTestApp,
  untilWaitingOnLocks,
  type Agent,
  type TestContext,
} from '../helpers/server.ts';
import { makeJob } from '../helpers/flows.ts';
import { EMPTY_WEEK } from '../../shared/schemas/working-week.ts';

/*
 * A firm's working week on the firm page: Tideway's standard week (seeded Monday–Friday
 * 08:00–17:00) and the bank holidays it works to. The test's today is Mon 1 Jun 2026; London is on
 * BST (UTC+1) all summer.
 */
let ctx: TestContext;
let owner: Agent;
let scheduler: Agent;
let standard: string;
let otter: string;
/** Tideway's own calendars (the board names them); the rest are partners'. */
let tidewayCalendars: string[];
let job: { jobId: string; stage: Record<string, string> };

const FIVE_DAYS = { from: '08:00', to: '17:00' };
const week = (over: Record<string, { from: string; to: string }[]> = {}) => ({
  mon: [FIVE_DAYS],
  tue: [FIVE_DAYS],
  wed: [FIVE_DAYS],
  thu: [FIVE_DAYS],
  fri: [FIVE_DAYS],
  sat: [],
  sun: [],
  ...over,
});
const putHours = (body: object, id = standard) =>
  owner.put(`/api/firm/calendars/${id}`).set('X-CSRF-Token', owner.csrf).send(body);
const book = (stageId: string, startsAt: string, endsAt: string) =>
  scheduler
    .post('/api/bookings')
    .set('X-CSRF-Token', scheduler.csrf)
    .send({ stageId, resourceId: otter, startsAt, endsAt });

/** Weekday and hour on London's clock. */
function london(iso: string): { weekday: string; hour: number } {
  const parts = new Intl.DateTimeFormat('en-GB', {
    timeZone: 'Europe/London',
    weekday: 'short',
    hour: 'numeric',
    hourCycle: 'h23',
  }).formatToParts(new Date(iso));
  const part = (t: string) => parts.find((p) => p.type === t)!.value;
  return { weekday: part('weekday'), hour: Number(part('hour')) };
}

/** The id of the booking a create answered with (201). */
async function bookingId(res: Promise<{ status: number; body: { bookings?: { id: string }[] } }>): Promise<string> {
  const r = await res;
  expect(r.status, JSON.stringify(r.body)).toBe(201);
  return String(r.body.bookings![0]!.id);
}

beforeAll(async () => {
  ctx = await startTestApp();
  owner = await signIn(ctx, account('owner').email);
  scheduler = await signIn(ctx, account('scheduler').email);
  otter = await idOf(ctx.knex, 'resources', { name: 'Crew Otter' });
  standard = String(
    (
      await ctx
        .knex('calendars')
        .where('firm_id', await idOf(ctx.knex, 'firms', { name: 'Tideway Hot Tubs' }))
        .orderBy('id')
        .first('id')
    ).id,
  );
  tidewayCalendars = (
    await ctx
      .knex('calendars')
      .where('firm_id', await idOf(ctx.knex, 'firms', { name: 'Tideway Hot Tubs' }))
      .select('id')
  ).map((c: { id: string }) => String(c.id));
  job = await makeJob(ctx.knex, {
    reference: 'WW-401',
    stages: [
      { kind: 'fill', name: 'Fill', minutes: 120, needs: { install_crew: 1 } },
      { kind: 'commissioning', name: 'Commission', minutes: 120, needs: { install_crew: 1 } },
      { kind: 'handover', name: 'Handover', minutes: 120, needs: { install_crew: 1 } },
      { kind: 'survey', name: 'Survey', minutes: 120, needs: { install_crew: 1 } },
    ],
    links: [],
  });
}, 60_000);
afterAll(async () => {
  await ctx?.close();
});

describe("the firm's working week", () => {
  it('shows each calendar as days and times, with who works to it', async () => {
    const res = await owner.get('/api/firm/working-week').expect(200);
    expect(res.body).toMatchObject({ timeZone: 'Europe/London', holidayRegion: 'GB-ENG' });
    const first = res.body.calendars[0];
    expect(first).toMatchObject({ id: standard, name: 'Standard week', version: 1, hours: week() });
    expect(first.standard).toBe(true);
    expect(first.usedBy.map((r: { name: string }) => r.name)).toEqual(
      expect.arrayContaining(['Crew Heron', 'Crew Otter']),
    );
    expect(first.usedBy).toContainEqual({ id: otter, name: 'Crew Otter' });
    // Only the owner manages the firm.
    await scheduler.get('/api/firm/working-week').expect(403);
  });

  it('saves shorter Fridays: the bookings now outside them are named, the board and the engine use them at once', async () => {
    // Fri 12 Jun: 09:00–11:00 BST stays inside; 14:00–16:00 BST falls outside 08:00–13:00.
    const morning = await bookingId(book(job.stage.fill!, '2026-06-12T08:00:00Z', '2026-06-12T10:00:00Z'));
    const afternoon = await bookingId(book(job.stage.commissioning!, '2026-06-12T13:00:00Z', '2026-06-12T15:00:00Z'));
    const saved = await putHours({ version: 1, hours: week({ fri: [{ from: '08:00', to: '13:00' }] }) }).expect(200);
    expect(saved.body.calendar).toMatchObject({
      id: standard,
      version: 2,
      hours: { fri: [{ from: '08:00', to: '13:00' }] },
    });
    // Named: the afternoon (and the demo's own Friday afternoons on Tideway's rows), not the morning.
    const named = saved.body.affected as { bookingId: string; startsAt: string; endsAt: string }[];
    expect(named.map((b) => b.bookingId)).toContain(afternoon);
    expect(named.map((b) => b.bookingId)).not.toContain(morning);
    // Every one named starts or finishes in the Friday afternoon the change took away.
    for (const b of named) {
      const inIt = (iso: string) => {
        const { weekday, hour } = london(iso);
        return weekday === 'Fri' && hour >= 13 && hour <= 17;
      };
      expect(inIt(b.startsAt) || inIt(b.endsAt), `${b.startsAt}–${b.endsAt}`).toBe(true);
    }

    // The board's calendar: Friday (weekday 5) is 480–780 minutes of the local day.
    const board = await scheduler
      .get('/api/board')
      .query({ from: '2026-06-08T00:00:00Z', to: '2026-06-15T00:00:00Z' })
      .expect(200);
    const cal = board.body.calendars.find((c: { id: string }) => c.id === standard);
    expect(cal.weekly[5]).toEqual([[480, 780]]);
    // Named for its own firm (the engine's refusals say "The working week "Standard week" …"); a
    // partner's weeks ride along by their hours alone (the read policy).
    expect(cal.name).toBe('Standard week');
    // (A resource's own week with its time away is `<week>+r<resource>`, named as its week.)
    const weekOf = (c: { id: string }) => String(c.id).split('+')[0]!;
    const theirs = board.body.calendars.filter((c: { id: string }) => !tidewayCalendars.includes(weekOf(c)));
    const ours = board.body.calendars.filter((c: { id: string }) => tidewayCalendars.includes(weekOf(c)));
    for (const c of ours) expect(c.name, c.id).toEqual(expect.any(String));
    expect(theirs.length).toBeGreaterThan(0);
    for (const c of theirs) expect(c).not.toHaveProperty('name');
    expect(cal.weekly[1]).toEqual([[480, 1020]]);
    // The write path's engine reads the new hours: a Friday afternoon is refused now.
    const refused = await book(job.stage.handover!, '2026-06-19T13:00:00Z', '2026-06-19T15:00:00Z').expect(422);
    expect(JSON.stringify(refused.body)).toMatch(/isn't working/);
    await book(job.stage.handover!, '2026-06-19T08:00:00Z', '2026-06-19T10:00:00Z').expect(201);

    // The change is in the audit log, before and after.
    const audit = await ctx.knex('audit_log').where({ entity: 'calendar', entity_id: standard }).first();
    expect(audit.before.hours.fri).toEqual([FIVE_DAYS]);
    expect(audit.after.hours.fri).toEqual([{ from: '08:00', to: '13:00' }]);
  });

  it('refuses a week that cannot be, saying which day and why', async () => {
    const bad = await putHours({
      version: 2,
      hours: week({
        mon: [{ from: '17:00', to: '08:00' }],
        tue: [
          { from: '08:00', to: '12:30' },
          { from: '12:00', to: '17:00' },
        ],
        wed: [{ from: '25:00', to: '26:00' }],
        thu: [FIVE_DAYS, FIVE_DAYS, FIVE_DAYS, FIVE_DAYS],
        fri: [{ from: '08:00\u0000', to: '13:00' }],
      }),
    }).expect(400);
    expect(bad.body.errors).toEqual(
      expect.arrayContaining([
        { field: 'hours.mon.0.to', message: 'must be after the start' },
        { field: 'hours.tue.1.from', message: 'must be after the span before it ends' },
        { field: 'hours.wed.0.from', message: 'must be a time of day like 08:00' },
        { field: 'hours.wed.0.to', message: 'must be a time of day like 17:00' },
        { field: 'hours.thu', message: 'can hold at most 3 spans' },
        { field: 'hours.fri.0.from', message: 'must be a time of day like 08:00' },
      ]),
    );
    const missing = await putHours({ version: 2, hours: { mon: [] } }).expect(400);
    expect(missing.body.errors.map((e: { field: string }) => e.field)).toEqual(
      expect.arrayContaining(['hours.tue', 'hours.sun']),
    );
    // A version sent as text is named as such, not as missing.
    const asText = await putHours({ version: '2', hours: week() }).expect(400);
    expect(asText.body.errors).toEqual([{ field: 'version', message: 'must be a number' }]);
    const none = await putHours({ hours: week() }).expect(400);
    expect(none.body.errors).toEqual([
      { field: 'version', message: 'is required: the version of the hours you loaded' },
    ]);
    // Up to midnight is a finish, never a start.
    await putHours({ version: 2, hours: week({ sat: [{ from: '24:00', to: '24:00' }] }) }).expect(400);
    // Every day unworked: nothing could be booked on it (the engine would refuse every booking).
    const empty = await putHours({
      version: 2,
      hours: { mon: [], tue: [], wed: [], thu: [], fri: [], sat: [], sun: [] },
    }).expect(400);
    expect(empty.body.errors).toEqual([{ field: 'hours', message: EMPTY_WEEK }]);
    expect(EMPTY_WEEK).toMatch(/^needs at least one working day/);
    // Nothing was saved.
    expect((await owner.get('/api/firm/working-week').expect(200)).body.calendars[0].version).toBe(2);
  });

  it('never overwrites hours someone else saved meanwhile', async () => {
    const [a, b] = await Promise.all([
      putHours({ version: 2, hours: week({ sat: [{ from: '08:00', to: '12:00' }] }) }),
      putHours({ version: 2, hours: week({ fri: [{ from: '08:00', to: '16:00' }] }) }),
    ]);
    expect([a.status, b.status].sort()).toEqual([200, 409]);
    const [won, lost] = a.status === 200 ? [a, b] : [b, a];
    expect(lost.body).toMatchObject({
      code: 'stale-version',
      detail: 'Someone else changed Standard week since you loaded it: reload to see theirs.',
      current: won.body.calendar,
    });
    expect((await owner.get('/api/firm/working-week').expect(200)).body.calendars[0]).toEqual(won.body.calendar);
  });

  it("is the firm's own: another firm's calendar is not found", async () => {
    const moorview = await idOf(ctx.knex, 'firms', { name: 'Moorview Spas' });
    const theirs = String((await ctx.knex('calendars').where('firm_id', moorview).first('id')).id);
    await putHours({ version: 1, hours: week() }, theirs).expect(404);
    await scheduler
      .put(`/api/firm/calendars/${standard}`)
      .set('X-CSRF-Token', scheduler.csrf)
      .send({ version: 3, hours: week() })
      .expect(403);
  });
});

describe('the bank holidays a firm works to', () => {
  const putRegion = (body: object) => owner.put('/api/firm/holiday-region').set('X-CSRF-Token', owner.csrf).send(body);

  it("moves to Scotland's: the board shades St Andrew's Day, and a booking on Scotland's August holiday is named", async () => {
    // Mon 3 Aug 2026 is a working day in England and Scotland's summer bank holiday (gov.uk's
    // published bank holidays, from memory; date-holidays agrees, tests/server/holiday-days.test.ts).
    const august = await bookingId(book(job.stage.survey!, '2026-08-03T08:00:00Z', '2026-08-03T10:00:00Z'));
    const saved = await putRegion({ holidayRegion: 'GB-SCT', was: 'GB-ENG' }).expect(200);
    expect(saved.body.holidayRegion).toBe('GB-SCT');
    expect(saved.body.affected.map((b: { bookingId: string }) => b.bookingId)).toContain(august);

    const board = await scheduler
      .get('/api/board')
      .query({ from: '2026-11-23T00:00:00Z', to: '2026-12-07T00:00:00Z' })
      .expect(200);
    const days = (
      board.body.calendars.find((c: { id: string }) => c.id === standard).holidays as { date: string }[]
    ).map((h) => h.date);
    expect(days).toContain('2026-11-30'); // St Andrew's Day
    expect(days).toContain('2026-08-03');
    expect(days).not.toContain('2026-08-31'); // England's summer bank holiday
    expect((await owner.get('/api/firm/working-week').expect(200)).body.holidayRegion).toBe('GB-SCT');
  });

  it('refuses a change from a region that is no longer the firm’s, and a region it does not know', async () => {
    const stale = await putRegion({ holidayRegion: 'GB-NIR', was: 'GB-ENG' }).expect(409);
    expect(stale.body).toMatchObject({ code: 'stale-version', current: 'GB-SCT' });
    const bad = await putRegion({ holidayRegion: 'FR', was: 'GB-SCT' }).expect(400);
    expect(bad.body.errors).toEqual([
      { field: 'holidayRegion', message: 'must be England and Wales, Scotland or Northern Ireland' },
    ]);
    await scheduler
      .put('/api/firm/holiday-region')
      .set('X-CSRF-Token', scheduler.csrf)
      .send({ holidayRegion: 'GB-ENG', was: 'GB-SCT' })
      .expect(403);
  });
});

describe('another working week for some of the firm', () => {
  let late: string;
  let second: { jobId: string; stage: Record<string, string> };
  const LATE = { from: '12:00', to: '20:00' };
  const lateWeek = week({ mon: [LATE], tue: [LATE], wed: [LATE], thu: [LATE], fri: [LATE] });
  const post = (agent: Agent, body: object) =>
    agent.post('/api/firm/calendars').set('X-CSRF-Token', agent.csrf).send(body);
  const moveOtter = (body: object, agent: Agent = owner) =>
    agent.put(`/api/resources/${otter}/calendar`).set('X-CSRF-Token', agent.csrf).send(body);
  const remove = (id: string) => owner.delete(`/api/firm/calendars/${id}`).set('X-CSRF-Token', owner.csrf);

  beforeAll(async () => {
    second = await makeJob(ctx.knex, {
      reference: 'WW-402',
      stages: [
        { kind: 'survey', name: 'Survey', minutes: 120, needs: { install_crew: 1 } },
        { kind: 'fill', name: 'Fill', minutes: 60, needs: { install_crew: 1 } },
        { kind: 'commissioning', name: 'Commission', minutes: 60, needs: { install_crew: 1 } },
      ],
      links: [],
    });
  });

  it("starts as the standard week with the firm's closures, and nothing works to it", async () => {
    const closure = await owner
      .post('/api/firm/closures')
      .set('X-CSRF-Token', owner.csrf)
      .send({ from: '2026-12-24', to: '2026-12-31', reason: 'Christmas shutdown' })
      .expect(201);
    const standardNow = (await owner.get('/api/firm/working-week').expect(200)).body.calendars[0];
    const created = await post(owner, { name: '  Late shift ' }).expect(201);
    late = created.body.calendar.id;
    expect(created.body.calendar).toEqual({
      id: late,
      name: 'Late shift',
      version: 1,
      hours: standardNow.hours,
      standard: false,
      usedBy: [],
    });
    const closures = await ctx.knex('calendar_exceptions').where('calendar_id', late).select('reason', 'starts_at');
    expect(closures).toEqual([{ reason: 'Christmas shutdown', startsAt: expect.any(Date) }]);
    expect(closures[0]!.startsAt.toISOString()).toBe('2026-12-24T00:00:00.000Z'); // midnight in London, GMT in winter
    // A closure taken away later goes from every week, this one too.
    await owner.delete(`/api/firm/closures/${closure.body.closure.id}`).set('X-CSRF-Token', owner.csrf).expect(204);
    expect(await ctx.knex('calendar_exceptions').where('calendar_id', late).count('* as n').first()).toEqual({
      n: '0',
    });
    expect(
      await ctx
        .knex('audit_log')
        .where({ entity: 'calendar', entity_id: late, action: 'create' })
        .count('* as n')
        .first(),
    ).toEqual({ n: '1' });

    // Names: the same again, none, a NUL byte, too long; only the owner adds one.
    const same = await post(owner, { name: 'Late shift' }).expect(409);
    expect(same.body.errors).toEqual([{ field: 'name', message: 'is already used by another calendar' }]);
    expect((await post(owner, { name: '   ' }).expect(400)).body.errors).toEqual([
      { field: 'name', message: 'is required' },
    ]);
    expect((await post(owner, { name: 'Late\u0000' }).expect(400)).body.errors[0].field).toBe('name');
    expect((await post(owner, { name: 'x'.repeat(61) }).expect(400)).body.errors).toEqual([
      { field: 'name', message: 'must be at most 60 characters' },
    ]);
    await post(scheduler, { name: 'Early shift' }).expect(403);
    // Two owners add the same name at once: one week, and the other told the name is taken.
    const twice = await Promise.all([post(owner, { name: 'Early shift' }), post(owner, { name: 'Early shift' })]);
    expect(twice.map((r) => r.status).sort()).toEqual([201, 409]);
    const early = twice.find((r) => r.status === 201)!.body.calendar.id;
    await remove(early).expect(204);

    // Renamed by the name the page showed: a rename meanwhile is refused with the week as it stands.
    const rename = (body: object, agent: Agent = owner) =>
      agent.patch(`/api/firm/calendars/${late}`).set('X-CSRF-Token', agent.csrf).send(body);
    expect((await rename({ name: 'Late shft', previousName: 'Late shift' }).expect(200)).body).toMatchObject({
      id: late,
      name: 'Late shft',
    });
    const stale = await rename({ name: 'Evening shift', previousName: 'Late shift' }).expect(409);
    expect(stale.body).toMatchObject({ code: 'stale-version', current: { id: late, name: 'Late shft' } });
    expect((await rename({ name: 'Standard week', previousName: 'Late shft' }).expect(409)).body.errors).toEqual([
      { field: 'name', message: 'is already used by another calendar' },
    ]);
    expect((await rename({ name: 'Late shift' }).expect(400)).body.errors).toEqual([
      { field: 'previousName', message: 'is required: the name the page showed' },
    ]);
    await rename({ name: 'Late shift', previousName: 'Late shft' }, scheduler).expect(403);
    await rename({ name: 'Late shift', previousName: 'Late shft' }).expect(200);
    const saved = await putHours({ version: 1, hours: lateWeek }, late).expect(200);
    expect(saved.body.calendar).toMatchObject({ name: 'Late shift', version: 2, hours: lateWeek, usedBy: [] });
  });

  it('moves a crew onto it: its morning bookings are named, and the board and the write path use its hours at once', async () => {
    // Tue 16 Jun 2026, 09:00–11:00 BST: inside the standard week, outside 12:00–20:00.
    const morning = await bookingId(book(second.stage.survey!, '2026-06-16T08:00:00Z', '2026-06-16T10:00:00Z'));
    const moved = await moveOtter({ calendarId: late, was: standard }).expect(200);
    const affected = moved.body.affected as { bookingId: string; startsAt: string; endsAt: string }[];
    expect(affected.map((b) => b.bookingId)).toContain(morning);
    // Every one named starts before noon or runs past 20:00 (Otter's seeded days and this file's
    // mornings); Friday 12 June's 14:00–16:00 booking lies within the new hours and is not named.
    for (const b of affected)
      expect(london(b.startsAt).hour < 12 || london(b.endsAt).hour >= 20, b.startsAt).toBe(true);
    const afternoon = String(
      (await ctx.knex('bookings').where({ stage_id: job.stage.commissioning, resource_id: otter }).first('id')).id,
    );
    expect(affected.map((b) => b.bookingId)).not.toContain(afternoon);
    expect(moved.body.to).toMatchObject({ id: late, usedBy: [{ id: otter, name: 'Crew Otter' }] });
    expect(moved.body.from.usedBy).not.toContainEqual({ id: otter, name: 'Crew Otter' });

    const board = await scheduler
      .get('/api/board')
      .query({ from: '2026-06-15T00:00:00Z', to: '2026-06-22T00:00:00Z' })
      .expect(200);
    const otterRow = board.body.resources.find((r: { id: string }) => r.id === otter);
    const cal = board.body.calendars.find((c: { id: string }) => c.id === otterRow.calendarId);
    expect(cal.weekly[2]).toEqual([[720, 1200]]);
    // 09:00 is no longer Otter's working time; 18:00 is.
    const refused = await book(second.stage.fill!, '2026-06-17T08:00:00Z', '2026-06-17T09:00:00Z');
    expect(refused.status, JSON.stringify(refused.body)).toBe(422);
    await bookingId(book(second.stage.commissioning!, '2026-06-17T17:00:00Z', '2026-06-17T18:00:00Z'));

    // The Resources page says which week it keeps, to its own firm only, and only when not the standard.
    const listed = (await scheduler.get('/api/resources').expect(200)).body.items as {
      name: string;
      workingWeek: string | null;
    }[];
    const weekOf = (name: string) => listed.find((r) => r.name === name)?.workingWeek;
    expect(weekOf('Crew Otter')).toBe('Late shift');
    expect(weekOf('Crew Heron')).toBeNull();
    expect(weekOf('Priya Nair')).toBeNull(); // Brightspark's electrician keeps Brightspark's Electricians week
    const partner = await signIn(ctx, account('partner', 'Brightspark Electrical').email);
    const theirList = (await partner.get('/api/resources').expect(200)).body.items as typeof listed;
    expect(theirList.find((r) => r.name === 'Priya Nair')?.workingWeek).toBe('Electricians');

    // Moved meanwhile by someone else: refused with where it is now.
    const stale = await moveOtter({ calendarId: standard, was: standard }).expect(409);
    expect(stale.body).toMatchObject({ code: 'stale-version', current: late });
    // Another firm's week, an id that is no id, the scheduler.
    const moorview = await idOf(ctx.knex, 'firms', { name: 'Moorview Spas' });
    const theirs = String((await ctx.knex('calendars').where('firm_id', moorview).first('id')).id);
    expect((await moveOtter({ calendarId: theirs, was: late }).expect(400)).body.errors).toEqual([
      { field: 'calendarId', message: "is not one of your firm's working weeks" },
    ]);
    expect((await moveOtter({ calendarId: 'late', was: late }).expect(400)).body.errors).toEqual([
      { field: 'calendarId', message: 'must be a numeric id' },
    ]);
    expect((await moveOtter({ calendarId: late }).expect(400)).body.errors).toEqual([
      { field: 'was', message: 'is required: the week the page showed it on' },
    ]);
    await moveOtter({ calendarId: standard, was: late }, scheduler).expect(403);
    const audit = await ctx
      .knex('audit_log')
      .where({ entity: 'resource', entity_id: otter, action: 'update' })
      .orderBy('id', 'desc')
      .first('before', 'after');
    expect(audit).toMatchObject({ before: { calendar: 'Standard week' }, after: { calendar: 'Late shift' } });
  });

  it('is taken away only once nothing works to it; the standard week stays', async () => {
    const inUse = await remove(late).expect(409);
    expect(inUse.body).toMatchObject({
      code: 'in-use',
      detail: 'Crew Otter works to Late shift: move it onto another week first.',
    });
    await moveOtter({ calendarId: standard, was: late }).expect(200);
    expect((await ctx.knex('resources').where('id', otter).first('calendar_id')).calendarId).toBeNull();
    // A move onto it under way (the week read, the crew not yet written) while the week is taken
    // away: the test holds writes to resources, so the move waits there, then sends the take-away.
    // The take-away waits for the move (both take the firm's row first), then sees Otter on the week
    // and is refused; the move stands. Before, the two deadlocked (a 500), or the take-away won and
    // the move failed on a week that was gone.
    const holder = await ctx.knex.transaction();
    await holder.raw('LOCK TABLE resources IN SHARE MODE');
    const moving = moveOtter({ calendarId: late, was: standard }).then((r) => r);
    await untilWaitingOnLocks(ctx.knex, 1);
    const taking = remove(late).then((r) => r);
    await untilWaitingOnLocks(ctx.knex, 2);
    await holder.commit();
    const [move, gone] = await Promise.all([moving, taking]);
    expect([move.status, gone.status], JSON.stringify([move.body, gone.body])).toEqual([200, 409]);
    expect(gone.body.code).toBe('in-use');
    expect(String((await ctx.knex('resources').where('id', otter).first('calendar_id')).calendarId)).toBe(late);
    await moveOtter({ calendarId: standard, was: late }).expect(200);
    await remove(late).expect(204);
    const after = (await owner.get('/api/firm/working-week').expect(200)).body.calendars;
    expect(after.map((c: { id: string }) => c.id)).not.toContain(late);
    await remove(late).expect(404);
    const kept = await remove(standard).expect(409);
    expect(kept.body.code).toBe('standard-week');
    expect(
      await ctx
        .knex('audit_log')
        .where({ entity: 'calendar', entity_id: late, action: 'delete' })
        .count('* as n')
        .first(),
    ).toEqual({ n: '1' });
  });
});
