import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { account, idOf, signIn, startTestApp, type Agent, type TestContext } from '../helpers/server.ts';
import { makeJob } from '../helpers/flows.ts';
import { lockResources } from '../../server/services/booking-writes.ts';

/*
 * The firm's own books of crews, people and machines: Tideway (the demo installer) adds Crew Wren
 * and takes it off again; Brightspark (a partner firm) adds an electrician of its own. The test's
 * today is Mon 1 Jun 2026; Crew Heron is booked through June in the demo.
 */
let ctx: TestContext;
let scheduler: Agent;
let partner: Agent;
let otherInstaller: Agent;

const WEEK = { from: '2026-06-01T00:00:00Z', to: '2026-06-08T00:00:00Z' };

beforeAll(async () => {
  ctx = await startTestApp();
  scheduler = await signIn(ctx, account('scheduler').email);
  partner = await signIn(ctx, account('partner', 'Brightspark Electrical').email);
  otherInstaller = await signIn(ctx, account('scheduler', 'Moorview Spas').email);
}, 60_000);
afterAll(async () => {
  await ctx?.close();
});

const add = (as: Agent, body: Record<string, unknown>) =>
  as.post('/api/resources').set('X-CSRF-Token', as.csrf).send(body);
const retire = (as: Agent, id: string) => as.delete(`/api/resources/${id}`).set('X-CSRF-Token', as.csrf);
const boardRows = async (as: Agent) =>
  ((await as.get('/api/board').query(WEEK).expect(200)).body.resources as { id: string; name: string }[]).map(
    (r) => r.name,
  );

describe("adding to the firm's books", () => {
  it('adds a crew that the Resources page and the board show at once, on the firm’s standard week', async () => {
    const res = await add(scheduler, { name: 'Crew Wren', category: 'crew', kind: 'install_crew' }).expect(201);
    expect(res.body).toMatchObject({
      name: 'Crew Wren',
      category: 'crew',
      kind: 'install_crew',
      ownership: 'owned',
      firmName: 'Tideway Hot Tubs',
    });
    const listed = (await scheduler.get('/api/resources').expect(200)).body.items.map((r: { name: string }) => r.name);
    expect(listed).toContain('Crew Wren');
    expect(await boardRows(scheduler)).toContain('Crew Wren');
    const row = await ctx.knex('resources').where('id', res.body.id).first('calendar_id', 'firm_id');
    const standard = await ctx.knex('calendars').where('firm_id', row.firmId).orderBy('id').first('id');
    expect(String(row.calendarId)).toBe(String(standard.id));
    expect(await ctx.knex('audit_log').where({ entity: 'resource', entity_id: res.body.id }).pluck('action')).toEqual([
      'create',
    ]);
  });

  it('refuses a name the firm already uses, and bad input, naming the field, keeping nothing', async () => {
    const taken = await add(scheduler, { name: 'Crew Heron', category: 'crew', kind: 'install_crew' }).expect(409);
    expect(taken.body.errors).toEqual([{ field: 'name', message: 'is already used by another resource' }]);
    const cases: [Record<string, unknown>, string][] = [
      [{ name: '', category: 'crew', kind: 'install_crew' }, 'name'],
      [{ name: 'Crew Lark', category: 'van', kind: 'install_crew' }, 'category'],
      [{ name: 'Crew Lark', category: 'crew', kind: 'Install crew!' }, 'kind'],
      [{ name: 'Crew\u0000Lark', category: 'crew', kind: 'install_crew' }, 'name'],
      [{ name: 'Crew Lark', category: 'crew', kind: 'install_crew', firmId: '1' }, 'firmId'],
    ];
    for (const [body, field] of cases) {
      const res = await add(scheduler, body).expect(400);
      expect(res.headers['content-type']).toContain('application/problem+json');
      expect(
        res.body.errors.map((e: { field: string }) => e.field),
        JSON.stringify(body),
      ).toEqual([field]);
    }
    expect(await ctx.knex('resources').where('name', 'like', 'Crew%Lark').first()).toBeUndefined();
  });

  it("lets a partner firm add its own electrician, whom the installer's board then shows", async () => {
    await add(partner, { name: 'Ada Quill', category: 'person', kind: 'electrician', phone: '07700 900777' }).expect(
      201,
    );
    expect(await boardRows(scheduler)).toContain('Ada Quill');
    // Moorview works with Brightspark too (it sees Ada), but never sees Tideway's new crew.
    expect(await boardRows(otherInstaller)).toContain('Ada Quill');
    expect(await boardRows(otherInstaller)).not.toContain('Crew Wren');
  });
});

describe("taking a resource off the firm's books", () => {
  it('is refused while it still has bookings from now on, naming them, and changes nothing', async () => {
    const heron = await idOf(ctx.knex, 'resources', { name: 'Crew Heron' });
    const res = await retire(scheduler, heron).expect(409);
    expect(res.body.code).toBe('resource-booked');
    expect(res.body.detail).toMatch(/^Crew Heron has \d+ bookings from now on: move them to someone else/);
    expect(res.body.bookings.length).toBeGreaterThan(1);
    expect(res.body.bookings[0]).toEqual({
      bookingId: expect.any(String),
      startsAt: expect.any(String),
      endsAt: expect.any(String),
      jobReference: expect.stringMatching(/^TW-\d{4}$/),
      stageName: expect.any(String),
    });
    expect((await ctx.knex('resources').where('id', heron).first('active')).active).toBe(true);
  });

  it('keeps it with its history but shows and books it no more; another firm gets 404', async () => {
    const wren = await idOf(ctx.knex, 'resources', { name: 'Crew Wren' });
    await retire(otherInstaller, wren).expect(404);
    await retire(partner, wren).expect(404);
    await retire(scheduler, wren).expect(204);
    expect((await ctx.knex('resources').where('id', wren).first('active')).active).toBe(false);
    expect(await boardRows(scheduler)).not.toContain('Crew Wren');
    const listed = (await scheduler.get('/api/resources').expect(200)).body.items.map((r: { name: string }) => r.name);
    expect(listed).not.toContain('Crew Wren');
    await retire(scheduler, wren).expect(404);
  });

  it('keeps its past work on the board, marked as taken off the books, and its job can still be planned', async () => {
    const lark = (await add(scheduler, { name: 'Crew Lark', category: 'crew', kind: 'install_crew' }).expect(201)).body
      .id as string;
    const job = await makeJob(ctx.knex, {
      reference: 'RB-PAST',
      stages: [
        { kind: 'fill', name: 'Fill', minutes: 120, needs: { install_crew: 1 } },
        { kind: 'handover', name: 'Handover', minutes: 60, needs: { install_crew: 1 } },
      ],
      links: [['fill', 'handover']],
    });
    // Done in May, before the test's today (Mon 1 Jun): nothing from now on, so it may be taken off.
    await ctx.knex('bookings').insert({
      stage_id: job.stage.fill,
      resource_id: lark,
      starts_at: '2026-05-20T08:00:00Z',
      ends_at: '2026-05-20T10:00:00Z',
      state: 'done',
    });
    await retire(scheduler, lark).expect(204);
    type Row = { id: string; name: string; retired?: boolean };
    const may = (await scheduler.get('/api/board').query({ from: '2026-05-18T00:00:00Z', to: '2026-05-25T00:00:00Z' }))
      .body as { resources: Row[]; bookings: { resourceId: string }[] };
    expect(may.resources.find((r) => r.id === lark)).toMatchObject({ name: 'Crew Lark', retired: true });
    expect(may.bookings.filter((b) => b.resourceId === lark)).toHaveLength(1);
    expect(may.resources.find((r) => r.name === 'Crew Heron')?.retired).toBeUndefined();
    // In June it has no work, but the job it worked on is still in play (its handover waits in the
    // tray): its past booking comes with the job, and Crew Lark with it, marked (the board draws no
    // row for it there). The Resources page has it no more.
    const june = (await scheduler.get('/api/board').query(WEEK).expect(200)).body as { resources: Row[] };
    expect(june.resources.find((r) => r.id === lark)).toMatchObject({ retired: true });
    const listed = (await scheduler.get('/api/resources').expect(200)).body.items.map((r: { name: string }) => r.name);
    expect(listed).not.toContain('Crew Lark');
    // The job it worked on goes on being planned: its next stage is booked through the engine, which
    // reads the past work too.
    await scheduler
      .post('/api/bookings')
      .set('X-CSRF-Token', scheduler.csrf)
      .send({
        stageId: job.stage.handover,
        resourceId: (await add(scheduler, { name: 'Crew Finch', category: 'crew', kind: 'install_crew' })).body.id,
        startsAt: '2026-06-29T08:00:00Z',
        endsAt: '2026-06-29T09:00:00Z',
      })
      .expect(201);
    // Another installer never sees it, past work or not.
    const theirs = (
      await otherInstaller.get('/api/board').query({ from: '2026-05-18T00:00:00Z', to: '2026-05-25T00:00:00Z' })
    ).body as { resources: Row[] };
    expect(theirs.resources.map((r) => r.name)).not.toContain('Crew Lark');
  });

  it('frees its name: the firm can add a crew of that name again, a new one with no past', async () => {
    const old = await ctx.knex('resources').where({ name: 'Crew Wren', active: false }).first('id');
    const again = await add(scheduler, { name: 'Crew Wren', category: 'crew', kind: 'install_crew' }).expect(201);
    expect(again.body.id).not.toBe(String(old.id));
    expect(await boardRows(scheduler)).toContain('Crew Wren');
    await retire(scheduler, again.body.id).expect(204);
  });

  it('never leaves a booking on a crew taken off the books at the same moment as it was booked', async () => {
    // Five crews, each booked and taken off in two requests sent together: whichever goes first, the
    // other sees it (the booking is refused, or the taking off is).
    for (let n = 1; n <= 5; n++) {
      const crew = (
        await add(scheduler, { name: `Race crew ${n}`, category: 'crew', kind: 'install_crew' }).expect(201)
      ).body.id as string;
      const job = await makeJob(ctx.knex, {
        reference: `RB-${n}`,
        stages: [{ kind: 'fill', name: 'Fill', minutes: 120, needs: { install_crew: 1 } }],
        links: [],
      });
      const [booked, retired] = await Promise.all([
        scheduler.post('/api/bookings').set('X-CSRF-Token', scheduler.csrf).send({
          stageId: job.stage.fill,
          resourceId: crew,
          startsAt: '2026-06-24T08:00:00Z',
          endsAt: '2026-06-24T10:00:00Z',
        }),
        retire(scheduler, crew),
      ]);
      const outcome = `${booked.status}/${retired.status}`;
      expect(['201/409', '404/204'], outcome).toContain(outcome);
      const active = (await ctx.knex('resources').where('id', crew).first('active')).active;
      const standing = await ctx.knex('bookings').where('resource_id', crew).whereNot('state', 'declined');
      expect(active || standing.length === 0, outcome).toBe(true);
    }
  });
});

describe("renaming a resource on the firm's books", () => {
  const rename = (as: Agent, id: string, body: Record<string, unknown>) =>
    as.patch(`/api/resources/${id}`).set('X-CSRF-Token', as.csrf).send(body);

  it('renames it everywhere at once: the list, the board, its bookings; audited', async () => {
    const kestrel = await idOf(ctx.knex, 'resources', { name: 'Crew Kestrel' });
    const booked = await ctx.knex('bookings').where('resource_id', kestrel).count<{ count: string }[]>();
    const res = await rename(scheduler, kestrel, { name: 'Crew Kite', previousName: 'Crew Kestrel' }).expect(200);
    expect(res.body).toEqual({ id: kestrel, name: 'Crew Kite' });
    expect(await boardRows(scheduler)).toContain('Crew Kite');
    expect(await boardRows(scheduler)).not.toContain('Crew Kestrel');
    expect(await ctx.knex('bookings').where('resource_id', kestrel).count()).toEqual(booked);
    const audit = await ctx
      .knex('audit_log')
      .where({ entity: 'resource', entity_id: kestrel, action: 'update' })
      .first('before', 'after');
    expect(audit).toEqual({ before: { name: 'Crew Kestrel' }, after: { name: 'Crew Kite' } });
    // Back again, from the name the page now shows.
    await rename(scheduler, kestrel, { name: 'Crew Kestrel', previousName: 'Crew Kite' }).expect(200);
  });

  it('never overwrites a rename made meanwhile (409 with the name now), nor takes a name in use', async () => {
    const otter = await idOf(ctx.knex, 'resources', { name: 'Crew Otter' });
    const stale = await rename(scheduler, otter, { name: 'Crew Osprey', previousName: 'Crew Ottter' }).expect(409);
    expect(stale.body).toMatchObject({ code: 'stale-version', current: { id: otter, name: 'Crew Otter' } });
    const taken = await rename(scheduler, otter, { name: 'Crew Heron', previousName: 'Crew Otter' }).expect(409);
    expect(taken.body.errors).toEqual([{ field: 'name', message: 'is already used by another resource' }]);
    // Two renames from the same page at once: one is made, the other is told of it.
    const both = await Promise.all(
      ['Crew Osprey', 'Crew Owl'].map((name) => rename(scheduler, otter, { name, previousName: 'Crew Otter' })),
    );
    expect(both.map((r) => r.status).sort()).toEqual([200, 409]);
    const made = both.find((r) => r.status === 200)!.body.name as string;
    expect(both.find((r) => r.status === 409)!.body.current).toEqual({ id: otter, name: made });
    await rename(scheduler, otter, { name: 'Crew Otter', previousName: made }).expect(200);
    // A name only a resource taken off the books had is free.
    await rename(scheduler, otter, { name: 'Crew Wren', previousName: 'Crew Otter' }).expect(200);
    await rename(scheduler, otter, { name: 'Crew Otter', previousName: 'Crew Wren' }).expect(200);
    expect((await ctx.knex('resources').where('id', otter).first('name')).name).toBe('Crew Otter');
  });

  it("is the owner's alone: another firm's or a partner's resource is 404; bad input names the field", async () => {
    const heron = await idOf(ctx.knex, 'resources', { name: 'Crew Heron' });
    const priya = await idOf(ctx.knex, 'resources', { name: 'Priya Nair' });
    await rename(otherInstaller, heron, { name: 'Ours now', previousName: 'Crew Heron' }).expect(404);
    await rename(partner, heron, { name: 'Ours now', previousName: 'Crew Heron' }).expect(404);
    await rename(scheduler, priya, { name: 'Priya N.', previousName: 'Priya Nair' }).expect(404);
    const cases: [Record<string, unknown>, string][] = [
      [{ name: '', previousName: 'Crew Heron' }, 'name'],
      [{ name: 'Crew\u0000Heron', previousName: 'Crew Heron' }, 'name'],
      [{ name: 'Crew Hawk' }, 'previousName'],
      [{ name: 'Crew Hawk', previousName: 'Crew Heron', kind: 'crane' }, 'kind'],
    ];
    for (const [body, field] of cases) {
      const res = await rename(scheduler, heron, body).expect(400);
      expect(
        res.body.errors.map((e: { field: string }) => e.field),
        JSON.stringify(body),
      ).toEqual([field]);
    }
    expect((await ctx.knex('resources').where('id', heron).first('name')).name).toBe('Crew Heron');
  });
});

describe('putting a resource back on the books', () => {
  const restore = (as: Agent, id: string) =>
    as.post(`/api/resources/${id}/restore`).set('X-CSRF-Token', as.csrf).send({});
  const retiredNames = async (as: Agent) =>
    ((await as.get('/api/resources/retired').expect(200)).body.items as { name: string }[]).map((r) => r.name);

  it("lists the firm's own taken off, and puts one back with its history; another firm's is 404", async () => {
    expect(await retiredNames(scheduler)).toEqual(expect.arrayContaining(['Crew Lark', 'Crew Wren']));
    expect(await retiredNames(partner)).not.toContain('Crew Lark');
    const lark = String((await ctx.knex('resources').where({ name: 'Crew Lark', active: false }).first('id')).id);
    await restore(otherInstaller, lark).expect(404);
    await restore(partner, lark).expect(404);
    expect((await restore(scheduler, lark).expect(200)).body).toEqual({ id: lark, name: 'Crew Lark' });
    expect(await boardRows(scheduler)).toContain('Crew Lark');
    expect(await retiredNames(scheduler)).not.toContain('Crew Lark');
    const again = await restore(scheduler, lark).expect(409);
    expect(again.body).toMatchObject({ code: 'not-retired', detail: 'Crew Lark is on the books already.' });
    expect(
      await ctx.knex('audit_log').where({ entity: 'resource', entity_id: lark, action: 'update' }).pluck('after'),
    ).toEqual([{ active: false }, { active: true }]);
  });

  it('is refused while another on the books has its name, naming the field', async () => {
    const [old] = await ctx.knex('resources').where({ name: 'Crew Wren', active: false }).pluck('id');
    const now = (await add(scheduler, { name: 'Crew Wren', category: 'crew', kind: 'install_crew' }).expect(201)).body
      .id as string;
    const clash = await restore(scheduler, String(old)).expect(409);
    expect(clash.body.errors).toEqual([{ field: 'name', message: 'is already used by another resource' }]);
    await retire(scheduler, now).expect(204);
    await restore(scheduler, String(old)).expect(200);
    await retire(scheduler, String(old)).expect(204);
  });
});

describe('the people in a crew', () => {
  const membersOf = async (id: string) =>
    (await scheduler.get(`/api/resources/${id}/members`).expect(200)).body as {
      members: { id: string; name: string; alsoIn: string[] }[];
      people: { id: string; name: string; alsoIn: string[] }[];
    };
  const setMembers = (as: Agent, id: string, body: Record<string, unknown>) =>
    as.put(`/api/resources/${id}/members`).set('X-CSRF-Token', as.csrf).send(body);
  const boardPeople = async (id: string) =>
    (
      (await scheduler.get('/api/board').query(WEEK).expect(200)).body.resources as {
        id: string;
        personIds: string[];
      }[]
    )
      .find((r) => r.id === id)!
      .personIds.slice()
      .sort();

  it('lists who is in the crew, and every person of the firm with the other crews they are in', async () => {
    const heron = await idOf(ctx.knex, 'resources', { name: 'Crew Heron' });
    const list = await membersOf(heron);
    expect(list.members.map((m) => m.name)).toEqual(['Aisha Bello', 'Connor Reid']);
    expect(list.people.find((p) => p.name === 'Jamie Whitlow')?.alsoIn).toEqual(['Crew Kestrel']);
    expect(list.people.find((p) => p.name === 'Connor Reid')?.alsoIn).toEqual([]);
    expect(list.people.map((p) => p.name)).not.toContain('Priya Nair');
  });

  it('takes a new person in and out again; the board knows them as the crew’s, and it is audited', async () => {
    const heron = await idOf(ctx.knex, 'resources', { name: 'Crew Heron' });
    const ola = (await add(scheduler, { name: 'Ola Quist', category: 'person', kind: 'installer' }).expect(201)).body
      .id as string;
    const before = (await membersOf(heron)).members.map((m) => m.id);
    const res = await setMembers(scheduler, heron, { personIds: [...before, ola], previousPersonIds: before }).expect(
      200,
    );
    expect(res.body.members.map((m: { name: string }) => m.name)).toEqual(['Aisha Bello', 'Connor Reid', 'Ola Quist']);
    expect(await boardPeople(heron)).toEqual([...before, ola].sort());
    await setMembers(scheduler, heron, { personIds: before, previousPersonIds: [...before, ola] }).expect(200);
    expect(await boardPeople(heron)).toEqual(before.slice().sort());
    const audit = await ctx
      .knex('audit_log')
      .where({ entity: 'resource', entity_id: heron, action: 'update' })
      .orderBy('id')
      .pluck('after');
    expect(audit.slice(-2).map((a: { personIds: string[] }) => a.personIds.length)).toEqual([3, 2]);
  });

  it('refuses a person who would then be in two places from now on, naming both bookings, and changes nothing', async () => {
    // Jamie is in Crew Kestrel, which the demo books through June as it does Crew Heron.
    const heron = await idOf(ctx.knex, 'resources', { name: 'Crew Heron' });
    const jamie = await idOf(ctx.knex, 'resources', { name: 'Jamie Whitlow' });
    const before = (await membersOf(heron)).members.map((m) => m.id);
    const res = await setMembers(scheduler, heron, {
      personIds: [...before, jamie],
      previousPersonIds: before,
    }).expect(409);
    expect(res.body.code).toBe('person-double');
    expect(res.body.detail).toMatch(/^Jamie Whitlow would be in two places: Crew Heron is booked while/);
    expect(res.body.doubles.length).toBeGreaterThan(0);
    type Span = { startsAt: string; endsAt: string };
    for (const d of res.body.doubles as { crewBooking: Span; elsewhere: Span }[]) {
      expect(Date.parse(d.crewBooking.startsAt)).toBeLessThan(Date.parse(d.elsewhere.endsAt));
      expect(Date.parse(d.elsewhere.startsAt)).toBeLessThan(Date.parse(d.crewBooking.endsAt));
      expect(Date.parse(d.crewBooking.endsAt)).toBeGreaterThan(Date.parse('2026-06-01T00:00:00Z'));
    }
    expect((await membersOf(heron)).members.map((m) => m.id)).toEqual(before);
  });

  it('keeps a person in a crew on the books: they leave the crew first', async () => {
    const jamie = await idOf(ctx.knex, 'resources', { name: 'Jamie Whitlow' });
    const res = await retire(scheduler, jamie).expect(409);
    expect(res.body).toMatchObject({
      code: 'in-a-crew',
      crews: ['Crew Kestrel'],
      detail: "Jamie Whitlow is in Crew Kestrel: take them out of the crew first (a crew's Edit).",
    });
    expect((await ctx.knex('resources').where('id', jamie).first('active')).active).toBe(true);
  });

  it('saves a crew whose list still held someone taken off the books before, dropping them', async () => {
    // Older data: a person taken off while in a crew (as the rule above now refuses).
    const otter = await idOf(ctx.knex, 'resources', { name: 'Crew Otter' });
    const gone = (await add(scheduler, { name: 'Pat Lowe', category: 'person', kind: 'installer' }).expect(201)).body
      .id as string;
    await ctx.knex('crew_members').insert({ crew_id: otter, person_id: gone });
    await ctx.knex('resources').where('id', gone).update({ active: false });
    const shown = (await membersOf(otter)).members.map((m) => m.id);
    expect(shown).not.toContain(gone);
    await setMembers(scheduler, otter, { personIds: shown, previousPersonIds: shown }).expect(200);
    expect((await ctx.knex('crew_members').where('crew_id', otter).pluck('person_id')).map(String)).not.toContain(gone);
  });

  it('waits for a booking being written on their other crew, and then sees it: never a person in two places', async () => {
    // Pip is in Crew Birch; Crew Alder is booked Mon 22 Jun 09:00–10:00 BST. A booking of Birch at
    // that time is being written (its transaction holds Birch's booking lock, not yet committed)
    // when Pip is put in Alder too: the change must wait for it, then refuse.
    const newOne = async (body: Record<string, unknown>) => (await add(scheduler, body).expect(201)).body.id as string;
    const alder = await newOne({ name: 'Crew Alder', category: 'crew', kind: 'install_crew' });
    const birch = await newOne({ name: 'Crew Birch', category: 'crew', kind: 'install_crew' });
    const pip = await newOne({ name: 'Pip Rowe', category: 'person', kind: 'installer' });
    await setMembers(scheduler, birch, { personIds: [pip], previousPersonIds: [] }).expect(200);
    const job = await makeJob(ctx.knex, {
      reference: 'RM-1',
      stages: [
        { kind: 'fill', name: 'Fill', minutes: 60, needs: { install_crew: 1 } },
        { kind: 'handover', name: 'Handover', minutes: 60, needs: { install_crew: 1 } },
      ],
      links: [],
    });
    const at = { starts_at: '2026-06-22T08:00:00Z', ends_at: '2026-06-22T09:00:00Z' };
    await ctx.knex('bookings').insert({ stage_id: job.stage.fill, resource_id: alder, state: 'pencilled', ...at });
    const writing = await ctx.knex.transaction();
    try {
      await lockResources(writing, [birch]);
      await writing('bookings').insert({ stage_id: job.stage.handover, resource_id: birch, state: 'pencilled', ...at });
      let answered = false;
      const joining = setMembers(scheduler, alder, { personIds: [pip], previousPersonIds: [] }).then((r) => {
        answered = true;
        return r;
      });
      // Until the change either answers or is seen waiting on a lock.
      const waiting = async () =>
        Number(
          (await ctx.knex.raw(`SELECT count(*) AS n FROM pg_locks WHERE locktype = 'advisory' AND NOT granted`)).rows[0]
            .n,
        );
      await expect.poll(async () => answered || (await waiting()) > 0).toBe(true);
      await writing.commit();
      const res = await joining;
      expect(res.status).toBe(409);
      expect(res.body.code).toBe('person-double');
    } finally {
      if (!writing.isCompleted()) await writing.rollback();
    }
    expect((await ctx.knex('crew_members').where('crew_id', alder).pluck('person_id')).map(String)).toEqual([]);
  });

  it('never overwrites a change made meanwhile, takes only the firm’s own people, and is for crews only', async () => {
    const heron = await idOf(ctx.knex, 'resources', { name: 'Crew Heron' });
    const before = (await membersOf(heron)).members.map((m) => m.id);
    const stale = await setMembers(scheduler, heron, { personIds: before, previousPersonIds: before.slice(1) }).expect(
      409,
    );
    expect(stale.body.code).toBe('stale-version');
    expect(stale.body.current.members.map((m: { id: string }) => m.id)).toEqual(before);
    const priya = await idOf(ctx.knex, 'resources', { name: 'Priya Nair' });
    const stranger = await setMembers(scheduler, heron, { personIds: [...before, priya], previousPersonIds: before });
    expect(stranger.status).toBe(400);
    expect(stranger.body.errors.map((e: { field: string }) => e.field)).toEqual(['personIds']);
    const dumper = await idOf(ctx.knex, 'resources', { name: 'Tracked dumper' });
    expect((await setMembers(scheduler, dumper, { personIds: [], previousPersonIds: [] }).expect(409)).body.code).toBe(
      'not-a-crew',
    );
    await setMembers(otherInstaller, heron, { personIds: [], previousPersonIds: before }).expect(404);
    await setMembers(partner, heron, { personIds: [], previousPersonIds: before }).expect(404);
    await otherInstaller.get(`/api/resources/${heron}/members`).expect(404);
    const bad = await setMembers(scheduler, heron, { personIds: ['x'], previousPersonIds: before }).expect(400);
    expect(bad.body.errors.map((e: { field: string }) => e.field)).toEqual(['personIds.0']);
    expect((await membersOf(heron)).members.map((m) => m.id)).toEqual(before);
  });
});
