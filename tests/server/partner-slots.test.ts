import request from 'supertest';
import ICAL from 'ical.js';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { account, idOf, signIn, type Agent } from '../helpers/server.ts';
import { pencilIn, startMailTestApp, type MailTestContext } from '../helpers/mail.ts';
import { unbookJobs } from '../helpers/demo.ts';
import type { PartnerSlot } from '../../shared/schemas/answers.ts';
import type { DaySheetList } from '../../shared/schemas/day-sheets.ts';
import { unitArrivalFor, unitFacingFor } from '../../server/services/read-policy.ts';

let ctx: MailTestContext;
let scheduler: Agent;
let partner: Agent;
let slot: string;

beforeAll(async () => {
  ctx = await startMailTestApp();
  scheduler = await signIn(ctx, account('scheduler').email);
  partner = await signIn(ctx, account('partner', 'Brightspark Electrical').email);
  await unbookJobs(ctx.knex, 'TW-2417');
  const b = await pencilIn(ctx.knex, {
    job: 'TW-2417',
    stage: 'electrical_connect',
    resource: 'Priya Nair',
    startsAt: '2027-08-03T08:00:00Z',
    endsAt: '2027-08-03T12:00:00Z',
  });
  await scheduler
    .post(`/api/bookings/${b.id}/publish`)
    .set('X-CSRF-Token', scheduler.csrf)
    .send({ version: 1 })
    .expect(200);
  slot = b.id;
});
afterAll(async () => {
  await ctx.close();
});
/** A booking's version now, as a partner's page would have loaded it. */
const slotVersion = async (id: string): Promise<number> =>
  (await ctx.knex('bookings').where('id', id).first('version')).version as number;

describe("a partner's own slots", () => {
  it('lists upcoming slots of the firm for every installer it works with, with only what the day needs', async () => {
    const res = await partner.get('/api/partner/slots?from=2026-05-01T00:00:00Z').expect(200);
    const items = res.body.items as {
      id: string;
      state: string;
      installer: { name: string };
      site: Record<string, unknown>;
    }[];
    expect(new Set(items.map((i) => i.installer.name))).toEqual(new Set(['Tideway Hot Tubs', 'Moorview Spas']));
    const mine = items.find((i) => i.id === slot)!;
    expect(mine).toMatchObject({
      state: 'sent',
      version: 2,
      timeZone: 'Europe/London',
      stage: { name: 'Connect and certify', kind: 'electrical_connect' },
      resource: { name: 'Priya Nair', kind: 'electrician' },
      site: { address: '56 Church Street', town: 'Bingley', postcode: 'BD16 2LE' },
      installer: { name: 'Tideway Hot Tubs', phone: '0113 496 0001' },
      job: { reference: 'TW-2417' },
    });
    expect((mine as unknown as { cautions: string[] }).cautions.join(' ')).toMatch(
      /registered \(licensed\) electrician/,
    );
    // A pencilled booking is the installer's private plan.
    expect(items.map((i) => i.state)).not.toContain('pencilled');
    expect(items.length).toBeGreaterThan(1);
  });

  it("lists from the app's own today when the page gives no date (a slot of this week is not hidden by the server's clock)", async () => {
    // The test app's today is Mon 1 Jun 2026 (TEST_TODAY), months before the machine's clock: a slot
    // of that week is upcoming to the app, and only the app's clock may decide so.
    const items = (await partner.get('/api/partner/slots').expect(200)).body.items as PartnerSlot[];
    const startsOf = items.map((i) => Date.parse(i.startsAt));
    expect(startsOf.some((t) => t < Date.parse('2026-07-01T00:00:00Z'))).toBe(true);
    expect(Math.min(...items.map((i) => Date.parse(i.endsAt)))).toBeGreaterThan(Date.parse('2026-06-01T00:00:00Z'));
  });

  it('tells the crane firm which way the unit faces on its lift, as the survey settled it (and nothing to the electrician)', async () => {
    const crane = await signIn(ctx, account('partner', 'Fellside Crane Hire').email);
    const lift = await pencilIn(ctx.knex, {
      job: 'TW-2417',
      stage: 'lift',
      resource: '60 t mobile crane',
      startsAt: '2027-08-05T08:00:00Z',
      endsAt: '2027-08-05T12:00:00Z',
      state: 'sent',
    });
    const jobId = await idOf(ctx.knex, 'jobs', { reference: 'TW-2417' });
    const facingOf = async (agent: Agent, id: string) =>
      ((await agent.get('/api/partner/slots?from=2026-05-01T00:00:00Z').expect(200)).body.items as PartnerSlot[]).find(
        (i) => i.id === id,
      )?.facing;
    try {
      // Not surveyed yet: an in-ground unit, so the crane firm is told it is still to settle.
      expect(await facingOf(crane, lift.id)).toBe(
        "Which way the unit faces is not settled: agree it with the householder before it goes in (it can't be turned in the pit)",
      );
      await ctx.knex('surveys').insert({
        job_id: jobId,
        access_width_mm: 900,
        ground_type: 'clay',
        unit_facing: 'Controls towards the house',
      });
      expect(await facingOf(crane, lift.id)).toBe('Unit faces: Controls towards the house');
      expect(await facingOf(partner, slot)).toBeNull();
      // Their day sheets follow the same read policy (a day sheet lists people, so the crane,
      // a machine, is on none): the electrician's connection does not carry it.
      const facingOnSheet = async (agent: Agent, date: string, id: string, path = '/api/partner/day-sheets') =>
        ((await agent.get(path).query({ date }).expect(200)).body as DaySheetList).sheets
          .flatMap((sh) => sh.visits)
          .find((v) => v.bookingId === id)?.job;
      const connection = await facingOnSheet(partner, '2027-08-03', slot);
      expect(connection?.reference).toBe('TW-2417');
      expect(connection?.unitFacing).toBeNull();
      // The installer's own office sees it on every stage of its job (the pit is dug to it).
      expect((await facingOnSheet(scheduler, '2027-08-03', slot, '/api/day-sheets'))?.unitFacing).toBe(
        'Controls towards the house',
      );
      // A partner's person on a stage that sets the unit down is told (a haulier's driver, a crane operator).
      const partnerActor = { userId: '1', firmId: '2', firmKind: 'haulage', role: 'partner' } as const;
      expect(unitFacingFor(partnerActor, 'delivery', 'Controls towards the house')).toBe('Controls towards the house');
      expect(unitFacingFor(partnerActor, 'electrical_connect', 'Controls towards the house')).toBeNull();
      // When the unit arrives, on the lift: a pencilled delivery is the installer's plan, not yet the crane firm's to read.
      const arrival = {
        startsAt: new Date('2027-08-05T07:00:00Z'),
        endsAt: new Date('2027-08-05T09:00:00Z'),
        firmName: 'Carrow Haulage',
      };
      expect(unitArrivalFor(partnerActor, [{ ...arrival, state: 'pencilled' }])).toBeNull();
      expect(unitArrivalFor(partnerActor, [{ ...arrival, state: 'sent' }])).toEqual({
        startsAt: '2027-08-05T07:00:00.000Z',
        endsAt: '2027-08-05T09:00:00.000Z',
        firmName: 'Carrow Haulage',
      });
    } finally {
      await ctx.knex('surveys').where({ job_id: jobId }).delete();
      await ctx.knex('bookings').where({ id: lift.id }).delete();
    }
  });

  it('never shows the householder, their phone or e-mail, or any price', async () => {
    const res = await partner.get('/api/partner/slots?from=2026-05-01T00:00:00Z').expect(200);
    const body = JSON.stringify(res.body);
    const jobs = await ctx.knex('jobs').select('customer_name', 'customer_phone', 'customer_email');
    for (const j of jobs) {
      expect(body).not.toContain(j.customerName);
      if (j.customerPhone) expect(body).not.toContain(j.customerPhone);
      if (j.customerEmail) expect(body).not.toContain(j.customerEmail);
    }
    expect(body).not.toMatch(/pence|price|rate|customer/i);
  });

  it('answers through the app: a proposal shows on the board', async () => {
    const res = await partner
      .post(`/api/partner/slots/${slot}/answer`)
      .set('X-CSRF-Token', partner.csrf)
      .send({
        version: await slotVersion(slot),
        action: 'propose',
        proposedStart: '2027-08-04T08:00:00Z',
        proposedEnd: '2027-08-04T12:00:00Z',
      })
      .expect(200);
    expect(res.body).toMatchObject({
      result: 'proposed',
      slot: { id: slot, answer: { action: 'propose', via: 'app', proposalStatus: 'open' } },
    });
    const board = await scheduler.get(`/api/bookings/${slot}`).expect(200);
    expect(board.body.answer).toMatchObject({ action: 'propose', proposedStart: '2027-08-04T08:00:00.000Z' });
    await partner
      .post(`/api/partner/slots/${slot}/answer`)
      .set('X-CSRF-Token', partner.csrf)
      .send({ version: await slotVersion(slot), action: 'propose' })
      .expect(400);
  });

  it("refuses another firm's slot with 404", async () => {
    const crane = await pencilIn(ctx.knex, {
      job: 'TW-2417',
      stage: 'lift',
      resource: '60 t mobile crane',
      startsAt: '2027-07-29T08:00:00Z',
      endsAt: '2027-07-29T12:00:00Z',
      state: 'sent',
    });
    await partner
      .post(`/api/partner/slots/${crane.id}/answer`)
      .set('X-CSRF-Token', partner.csrf)
      .send({ version: await slotVersion(crane.id), action: 'confirm' })
      .expect(404);
  });

  it('puts another of its own people on the slot, and no one else', async () => {
    const tom = await idOf(ctx.knex, 'resources', { name: 'Tom Ashworth' });
    const res = await partner
      .put(`/api/partner/slots/${slot}/person`)
      .set('X-CSRF-Token', partner.csrf)
      .send({ resourceId: tom, version: 2 })
      .expect(200);
    expect(res.body).toMatchObject({ id: slot, version: 3, resource: { name: 'Tom Ashworth' } });
    // Still awaiting an answer: a fresh request (version 3) goes out so the links in hand work.
    expect(await ctx.knex('outbox').where('idempotency_key', `booking.${slot}.v3.update.r${tom}`)).toHaveLength(1);
    await partner
      .put(`/api/partner/slots/${slot}/person`)
      .set('X-CSRF-Token', partner.csrf)
      .send({ resourceId: await idOf(ctx.knex, 'resources', { name: 'Gareth Pryce' }), version: 3 })
      .expect(404);
    await partner
      .put(`/api/partner/slots/${slot}/person`)
      .set('X-CSRF-Token', partner.csrf)
      .send({ resourceId: await idOf(ctx.knex, 'resources', { name: '60 t mobile crane' }), version: 3 })
      .expect(404);
  });

  it('never confirms a slot changed since the page loaded it: 409 with the slot as it stands', async () => {
    // The page loaded version 3 (Tom's); the installer moves the slot a day later meanwhile.
    await ctx
      .knex('bookings')
      .where('id', slot)
      .increment('version', 1)
      .update({ starts_at: '2027-08-04T08:00:00Z', ends_at: '2027-08-04T12:00:00Z' });
    try {
      const stale = await partner
        .post(`/api/partner/slots/${slot}/answer`)
        .set('X-CSRF-Token', partner.csrf)
        .send({ version: 3, action: 'confirm' })
        .expect(409);
      expect(stale.body).toMatchObject({
        code: 'stale-version',
        detail: 'This slot was changed since you loaded it: check its time and answer again.',
        current: { id: slot, state: 'sent', version: 4, startsAt: '2027-08-04T08:00:00.000Z' },
      });
      expect(Object.keys(stale.body.current).sort()).toEqual(['endsAt', 'id', 'startsAt', 'state', 'version']);
      const person = await partner
        .put(`/api/partner/slots/${slot}/person`)
        .set('X-CSRF-Token', partner.csrf)
        .send({ resourceId: await idOf(ctx.knex, 'resources', { name: 'Priya Nair' }), version: 3 })
        .expect(409);
      expect(person.body.code).toBe('stale-version');
      expect(await ctx.knex('bookings').where('id', slot).first('state', 'version', 'resource_id')).toEqual({
        state: 'sent',
        version: 4,
        resourceId: await idOf(ctx.knex, 'resources', { name: 'Tom Ashworth' }),
      });
      expect(await ctx.knex('booking_answers').where({ booking_id: slot, action: 'confirm' })).toEqual([]);
    } finally {
      await ctx
        .knex('bookings')
        .where('id', slot)
        .decrement('version', 1)
        .update({ starts_at: '2027-08-03T08:00:00Z', ends_at: '2027-08-03T12:00:00Z' });
    }
  });

  it('confirms through the app', async () => {
    const res = await partner
      .post(`/api/partner/slots/${slot}/answer`)
      .set('X-CSRF-Token', partner.csrf)
      .send({ version: 3, action: 'confirm' })
      .expect(200);
    expect(res.body).toMatchObject({ result: 'confirmed', slot: { state: 'confirmed' } });
    const again = await partner
      .post(`/api/partner/slots/${slot}/answer`)
      .set('X-CSRF-Token', partner.csrf)
      .send({ version: await slotVersion(slot), action: 'confirm' })
      .expect(409);
    expect(again.body.code).toBe('not-awaiting-answer');
  });
});

describe('a private calendar feed per person', () => {
  it('is made, rotated and revoked by the partner; the URL alone opens it', async () => {
    const tom = await idOf(ctx.knex, 'resources', { name: 'Tom Ashworth' });
    const first = await partner.post(`/api/partner/people/${tom}/feed`).set('X-CSRF-Token', partner.csrf).expect(201);
    expect(first.body.url).toMatch(/\/feeds\/[\w-]{32}\.ics$/);
    const path1 = new URL(first.body.url).pathname;
    const feed = await request(ctx.waterline.app).get(path1).expect(200);
    expect(feed.headers['content-type']).toMatch(/^text\/calendar/);
    const cal = new ICAL.Component(ICAL.parse(feed.text));
    expect(cal.getFirstPropertyValue('method')).toBe('PUBLISH'); // RFC 5546 §3.2.1
    const events = cal.getAllSubcomponents('vevent').map((v) => new ICAL.Event(v));
    const mine = events.find((e) => e.uid === `booking-${slot}@127.0.0.1`); // RFC 5545 §3.8.4.7: same UID as the invites
    expect(mine).toBeDefined();
    expect(mine!.sequence).toBe(4); // request (2), another person (3), confirmed (4)
    expect(mine!.startDate.toJSDate().toISOString()).toBe('2027-08-03T08:00:00.000Z');
    expect(mine!.description).toContain('Follow local codes and licensed practice');
    // The slot as the request e-mail gives it, through the read policy: the house's supply for
    // this electrical work, whom to call (the office; not the householder, whom Tideway doesn't share).
    const description = mine!.description.split('\n');
    expect(description.slice(0, 6)).toEqual([
      'Connect and certify for Tideway Hot Tubs (job TW-2417)',
      'State: confirmed.',
      '',
      'When:',
      'Tuesday 3 August 2027',
      '09:00–13:00 (Europe/London, BST)',
    ]);
    expect(description).toContain('Electrical supply:');
    expect(
      description.slice(description.indexOf('On the day, call:'), description.indexOf('On the day, call:') + 2),
    ).toEqual(['On the day, call:', 'Installer office, Tideway Hot Tubs: 0113 496 0001']);
    expect(feed.text).not.toContain('@home.example');
    // Only a hash of the link's secret is stored: the secret itself appears in no row.
    const secret = path1
      .split('/')
      .pop()!
      .replace(/\.ics$/, '');
    const stored = await ctx.knex('calendar_feeds').where('resource_id', tom);
    expect(stored.length).toBeGreaterThan(0);
    for (const row of stored) {
      expect(row.tokenHash).toMatch(/^[0-9a-f]{64}$/);
      expect(JSON.stringify(row)).not.toContain(secret);
    }

    const second = await partner.post(`/api/partner/people/${tom}/feed`).set('X-CSRF-Token', partner.csrf).expect(201);
    await request(ctx.waterline.app).get(path1).expect(404);
    const path2 = new URL(second.body.url).pathname;
    await request(ctx.waterline.app).get(path2).expect(200);
    await partner.delete(`/api/partner/people/${tom}/feed`).set('X-CSRF-Token', partner.csrf).expect(204);
    await request(ctx.waterline.app).get(path2).expect(404);

    // Each link made and each stopped is in the audit log, by whom and for whom (never the token).
    const feedIds = stored.map((r) => String(r.id));
    const audit = await ctx.knex('audit_log').where('entity', 'calendar_feed').orderBy('id');
    const coordinator = await idOf(ctx.knex, 'users', { email: account('partner', 'Brightspark Electrical').email });
    const made = audit.filter((a) => a.action === 'create');
    const stopped = audit.filter((a) => a.action === 'delete');
    expect(made.length).toBeGreaterThanOrEqual(2);
    // The first link stopped when the second was made, the second when it was taken away.
    expect(stopped.map((a) => a.entityId)).toEqual(expect.arrayContaining(feedIds));
    expect(stopped.map((a) => a.entityId)).toContain(made.at(-1)!.entityId);
    for (const a of audit) {
      expect(String(a.actorUserId)).toBe(coordinator);
      expect((a.after ?? a.before).person).toBe('Tom Ashworth');
      expect(JSON.stringify(a)).not.toContain(secret);
    }
  });

  it("is only for the firm's own people", async () => {
    await partner
      .post(`/api/partner/people/${await idOf(ctx.knex, 'resources', { name: 'Gareth Pryce' })}/feed`)
      .set('X-CSRF-Token', partner.csrf)
      .expect(404);
  });
});
