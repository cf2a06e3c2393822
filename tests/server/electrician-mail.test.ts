import request from 'supertest';
import ICAL from 'ical.js';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { account, idOf, signIn, startTestApp, type Agent, type TestContext } from '../helpers/server.ts';
import { pencilIn } from '../helpers/mail.ts';
import { unbookJobs } from '../helpers/demo.ts';
import { composeMessage, type OutboxKind, type OutgoingMail, type OutboxPayload } from '../../server/mail/messages.ts';
import { loadBookingFacts } from '../../server/mail/facts.ts';
import { slotDetails } from '../../server/pages/answers.ts';

// TW-2417 (demo scenario): 56 Church Street, Bingley, householder Freya Lund (07700 900116,
// freya@home.example), installer Tideway Hot Tubs (0113 496 0001). Priya Nair is Brightspark
// Electrical's electrician; Crew Heron is Tideway's own crew.
const SLOT = { startsAt: '2027-08-03T08:00:00Z', endsAt: '2027-08-03T12:00:00Z' }; // BST: 09:00–13:00
const CREW_DAY = { startsAt: '2027-08-03T06:00:00Z', endsAt: '2027-08-03T15:00:00Z' }; // the same local day
const CUSTOMER_PHONE = '07700 900116';

let ctx: TestContext;
let scheduler: Agent;
let partner: Agent;
let slot: string;
let jobId: string;
let tidewayId: string;

// Hand-set figures, so the expected lines are worked by hand: supplies 32 A + 16 A = 48 A;
// 48 A × 230 V = 11 040 W ≈ 11.0 kW (230 V: nominal voltage of IEC 60038, from memory).
const EXPECTED_SUPPLY = [
  'Unit load: 32 A + 16 A = 48 A (2 dedicated supplies), about 11.0 kW at 230 V',
  'Main fuse: 80 A',
  'Earthing: TN-C-S (PME)',
  'Consumer unit: Garage, left of the door',
  'Cable run from the consumer unit to the spa: 14.5 m',
];

async function outboxRow(kind: OutboxKind, bookingId: string): Promise<OutboxPayload> {
  const row = await ctx
    .knex('outbox')
    .where('kind', kind)
    .whereRaw("payload->>'bookingId' = ?", [bookingId])
    .orderBy('id', 'desc')
    .first();
  if (!row) throw new Error(`no ${kind} row for booking ${bookingId}`);
  return row.payload as OutboxPayload;
}

async function compose(kind: OutboxKind, bookingId: string): Promise<OutgoingMail> {
  const mail = await composeMessage({ knex: ctx.knex, config: ctx.config }, kind, await outboxRow(kind, bookingId));
  if ('skip' in mail) throw new Error(`skipped: ${mail.skip}`);
  return mail;
}

/** The invite's VEVENT, read by ical.js (an independent reader of RFC 5545). */
function invite(mail: OutgoingMail): {
  method: string;
  uid: string;
  sequence: number;
  status: string;
  partstat: string;
  start: string;
} {
  if (!mail.ics) throw new Error('no invite');
  const cal = new ICAL.Component(ICAL.parse(mail.ics.content));
  const vevent = cal.getFirstSubcomponent('vevent')!;
  const event = new ICAL.Event(vevent);
  return {
    method: String(cal.getFirstPropertyValue('method')),
    uid: event.uid,
    sequence: event.sequence,
    status: String(vevent.getFirstPropertyValue('status')),
    partstat: String(vevent.getFirstProperty('attendee')?.getParameter('partstat')),
    start: event.startDate.toJSDate().toISOString(),
  };
}

beforeAll(async () => {
  ctx = await startTestApp();
  // Outbox rows of earlier runs name booking ids this seeding gives out again.
  await ctx.knex.raw('TRUNCATE outbox, link_uses, link_attempts RESTART IDENTITY');
  scheduler = await signIn(ctx, account('scheduler').email);
  partner = await signIn(ctx, account('partner', 'Brightspark Electrical').email);
  await unbookJobs(ctx.knex, 'TW-2417');
  jobId = await idOf(ctx.knex, 'jobs', { reference: 'TW-2417' });
  tidewayId = await idOf(ctx.knex, 'firms', { name: 'Tideway Hot Tubs' });
  const job = await ctx.knex('jobs').where('id', jobId).first('unit_id');
  await ctx
    .knex('units')
    .where('id', job.unitId)
    .update({ supplies: JSON.stringify([{ amps: 32 }, { amps: 16 }]) });
  await ctx.knex('surveys').where('job_id', jobId).delete();
  await ctx.knex('surveys').insert({
    job_id: jobId,
    access_width_mm: 1200,
    ground_type: 'clay',
    main_fuse_amps: 80,
    earthing_arrangement: 'TN-C-S',
    consumer_unit_distance_m: 14.5,
    consumer_unit_location: 'Garage, left of the door',
  });
  await ctx.knex('resources').where('name', 'Crew Heron').update({ phone: '07700 900555' });
  // Words the office's plan may carry: a partner must never be shown them.
  await ctx
    .knex('stages')
    .where({ job_id: jobId, kind: 'electrical_connect' })
    .update({ notes: "Needs 3 working days' notice" });

  const b = await pencilIn(ctx.knex, { job: 'TW-2417', stage: 'electrical_connect', resource: 'Priya Nair', ...SLOT });
  await scheduler
    .post(`/api/bookings/${b.id}/publish`)
    .set('X-CSRF-Token', scheduler.csrf)
    .send({ version: 1 })
    .expect(200);
  slot = b.id;
  // The installer's own crew on the job that day: the partner's contact on site.
  await pencilIn(ctx.knex, { job: 'TW-2417', stage: 'fill', resource: 'Crew Heron', ...CREW_DAY });
});
afterAll(async () => {
  await ctx.close();
});

describe("the electrician's request", () => {
  it("gives the unit's load in A and kW, the supply from the survey and the crew on site, and no office notes", async () => {
    const mail = await compose('booking_request', slot);
    expect(mail.to).toContain('priya.nair@brightspark.example');
    for (const body of [mail.text, mail.html]) {
      for (const line of EXPECTED_SUPPLY) expect(body).toContain(line);
      expect(body).toContain('On site that day, Crew Heron: 07700 900555');
      expect(body).toContain('Installer office, Tideway Hot Tubs: 0113 496 0001');
      expect(body).not.toMatch(/working days'? notice/);
      // The installer has not switched sharing on: no householder's name or phone, never their e-mail.
      expect(body).not.toContain(CUSTOMER_PHONE);
      expect(body).not.toContain('Freya Lund');
      expect(body).not.toContain('freya@home.example');
    }
  });

  it("adds the householder's name and phone only once the installer shares them with partners", async () => {
    await ctx
      .knex('firm_settings')
      .insert({ firm_id: tidewayId, share_customer_contact_with_partners: true })
      .onConflict('firm_id')
      .merge(['share_customer_contact_with_partners']);
    try {
      const mail = await compose('booking_request', slot);
      expect(mail.text).toContain(`Customer, Freya Lund: ${CUSTOMER_PHONE}`);
      expect(mail.text).not.toContain('freya@home.example');
    } finally {
      await ctx
        .knex('firm_settings')
        .where('firm_id', tidewayId)
        .update({ share_customer_contact_with_partners: false });
    }
  });

  it('invites as TENTATIVE while the request waits for an answer (RFC 5545 §3.8.1.11)', async () => {
    const ics = invite(await compose('booking_request', slot));
    expect(ics).toEqual({
      method: 'REQUEST',
      uid: `booking-${slot}@127.0.0.1`,
      sequence: 2,
      status: 'TENTATIVE',
      partstat: 'NEEDS-ACTION',
      start: '2027-08-03T08:00:00.000Z',
    });
  });

  it('shows the same facts on the answer page behind the e-mailed link', async () => {
    const mail = await compose('booking_request', slot);
    const confirm = /^Confirm:\n(\S+)$/m.exec(mail.text)![1]!;
    const page = await request(ctx.waterline.app).get(new URL(confirm).pathname).expect(200);
    for (const line of EXPECTED_SUPPLY) expect(page.text).toContain(line);
    expect(page.text).toContain('On site that day, Crew Heron: <a href="tel:07700900555">07700 900555</a>');
    expect(page.text).not.toMatch(/working days&#39; notice|working days' notice/);
    expect(page.text).not.toContain(CUSTOMER_PHONE);
  });
});

describe("the electrician's slot list", () => {
  it("carries the supply lines and the read policy's contacts", async () => {
    const res = await partner.get('/api/partner/slots?from=2027-08-01T00:00:00Z').expect(200);
    const mine = (
      res.body.items as { id: string; supply: string[] | null; contacts: unknown[]; unit: string | null }[]
    ).find((i) => i.id === slot)!;
    expect(mine.supply).toEqual(EXPECTED_SUPPLY);
    expect(mine.contacts).toEqual([
      { name: 'Crew Heron', phone: '07700 900555', role: 'On site that day' },
      { name: 'Tideway Hot Tubs', phone: '0113 496 0001', role: 'Installer office' },
    ]);
    expect(mine.unit).toMatch(/ mm, \d+ kg dry$/);
  });
});

describe('a crane firm', () => {
  it("is not sent the house's electrical supply, and is told which way the unit faces", async () => {
    const lift = await pencilIn(ctx.knex, {
      job: 'TW-2417',
      stage: 'lift',
      resource: '60 t mobile crane',
      startsAt: '2027-07-20T08:00:00Z',
      endsAt: '2027-07-20T12:00:00Z',
    });
    const sent = await scheduler
      .post(`/api/bookings/${lift.id}/publish`)
      .set('X-CSRF-Token', scheduler.csrf)
      .send({ version: 1 });
    expect(sent.status, JSON.stringify(sent.body)).toBe(200);
    const mail = await compose('booking_request', lift.id);
    expect(mail.text).toContain('Installer office, Tideway Hot Tubs: 0113 496 0001');
    expect(mail.text).not.toContain('ELECTRICAL SUPPLY');
    expect(mail.text).not.toContain('Main fuse');
    expect(mail.text).not.toContain('Unit load');
    // Which way the in-ground unit faces: not settled on this survey, so the crane firm is told so…
    expect(mail.text).toContain(
      "Which way the unit faces is not settled: agree it with the householder before it goes in (it can't be turned in the pit)",
    );
    // …and once it is, the way it faces (the electrician's connection is never told either).
    await ctx.knex('surveys').where('job_id', jobId).update({ unit_facing: 'Controls towards the house' });
    try {
      const again = await compose('booking_request', lift.id);
      for (const body of [again.text, again.html]) expect(body).toContain('Unit faces: Controls towards the house');
      // The answer page behind the e-mailed link says the same, through the same read policy.
      const facts = await loadBookingFacts(ctx.knex, lift.id);
      expect(slotDetails(facts!)).toContain(
        '<dt>Which way it faces</dt><dd>Unit faces: Controls towards the house</dd>',
      );
      const electrician = await compose('booking_request', slot);
      expect(electrician.text).not.toMatch(/Unit faces|Which way the unit faces/);
    } finally {
      await ctx.knex('surveys').where('job_id', jobId).update({ unit_facing: null });
    }
  });
});

describe('once the electrician confirms', () => {
  it('sends an updated invite: the same UID, a higher SEQUENCE, CONFIRMED and accepted', async () => {
    await partner
      .post(`/api/partner/slots/${slot}/answer`)
      .set('X-CSRF-Token', partner.csrf)
      .send({ version: (await ctx.knex('bookings').where('id', slot).first('version')).version, action: 'confirm' })
      .expect(200);
    const mail = await compose('booking_confirmed', slot);
    expect(mail.subject).toBe('Confirmed: Connect and certify, Bingley, Tue 3 Aug 2027');
    for (const line of EXPECTED_SUPPLY) expect(mail.text).toContain(line);
    expect(invite(mail)).toEqual({
      method: 'REQUEST',
      uid: `booking-${slot}@127.0.0.1`,
      sequence: 3,
      status: 'CONFIRMED',
      partstat: 'ACCEPTED',
      start: '2027-08-03T08:00:00.000Z',
    });
    // The request of the version before is superseded, so no tentative invite goes out after this one.
    const stale = await composeMessage({ knex: ctx.knex, config: ctx.config }, 'booking_request', {
      bookingId: slot,
      version: 2,
    });
    expect(stale).toEqual({ skip: 'superseded by version 3' });
  });
});
