import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import request from 'supertest';
import { TEST_TODAY, account, idOf, signIn, type Agent } from '../helpers/server.ts';
import { Booking } from '../../server/models/index.ts';
import { actorFor } from '../../server/services/session.ts';
import { BookingsService } from '../../server/services/bookings.ts';
import {
  answerLinks,
  calendarOf,
  pencilIn,
  startMailTestApp,
  waitForMailSettled,
  waitUntil,
  type MailTestContext,
  type TestPipeline,
} from '../helpers/mail.ts';
import { unbookJobs } from '../helpers/demo.ts';
import { scanOverdueRequests } from '../../server/services/reminders.ts';

let ctx: MailTestContext;
let scheduler: Agent;
let lift: { id: string; version: number };
let pipeline: TestPipeline;
/** The answer links of the last request or update sent to the crane firm for `lift`. */
let liftLinks: ReturnType<typeof answerLinks>;
// This app's PUBLIC_URL host is the domain of its UIDs and Message-IDs (RFC 5545 §3.8.4.7, RFC 5322 §3.6.4).
const HOST = 'plan.tideway.example';

// TW-2417 is a job of the demo scenario (in-ground, householder Freya Lund, 56 Church Street, Bingley),
// booked here from nothing, as TW-2420 is.
const SLOT = { startsAt: '2027-03-10T08:00:00.000Z', endsAt: '2027-03-10T12:00:00.000Z' }; // GMT: 08:00–12:00 local

beforeAll(async () => {
  ctx = await startMailTestApp({ PUBLIC_URL: `http://${HOST}` });
  pipeline = ctx.startPipeline();
  scheduler = await signIn(ctx, account('scheduler').email);
  await unbookJobs(ctx.knex, 'TW-2417', 'TW-2420');
  lift = await pencilIn(ctx.knex, { job: 'TW-2417', stage: 'lift', resource: '60 t mobile crane', ...SLOT });
});
afterAll(async () => {
  await ctx.close();
});

const toFellside = (m: { to: string[] }) => m.to.includes('bookings@fellside.example');

describe('publishing a crane booking', () => {
  it('sends one request e-mail with the slot, the cautions, three links and an invite', async () => {
    const res = await scheduler
      .post(`/api/bookings/${lift.id}/publish`)
      .set('X-CSRF-Token', scheduler.csrf)
      .send({ version: 1 })
      .expect(200);
    expect(res.body).toMatchObject({ id: lift.id, state: 'sent', version: 2, overdue: false, answer: null });
    const outbox = await ctx.knex('outbox').where('kind', 'booking_request');
    expect(outbox).toHaveLength(1);
    expect(outbox[0].payload).toEqual({ bookingId: lift.id, version: 2, resourceId: expect.any(String) });

    const [mail] = await ctx.inbox.waitFor(toFellside);
    expect(mail!.to).toEqual(['bookings@fellside.example', 'fiona.fell@fellside.example']);
    expect(mail!.subject).toBe('Booking request: Crane lift into pit, Bingley, Wed 10 Mar 2027');
    for (const body of [mail!.text, mail!.html]) {
      expect(body).toContain('Wednesday 10 March 2027');
      expect(body).toContain('08:00–12:00');
      expect(body).toContain('56 Church Street');
      expect(body).toContain('Tideway Hot Tubs: 0113 496 0001');
      expect(body).toMatch(/lift plan made by a competent person/);
      expect(body).toMatch(/exclusion zone/);
      expect(body).toMatch(/wind exceeds/);
      expect(body).toMatch(/Nobody stands or walks under a suspended load/);
      expect(body).toContain('Follow local codes and licensed practice');
      expect(body).toContain('Outrigger mats');
      // The partner needs the site, not the householder's contact details.
      expect(body).not.toContain('07700 900116');
      expect(body).not.toContain('freya@home.example');
    }
    const links = answerLinks(mail!);
    liftLinks = links;
    expect(links.confirm).toMatch(/^\/answer\/[\w-]+\.[\w-]+\.[\w-]+$/);
    expect(new Set([links.confirm, links.decline, links.propose]).size).toBe(3);
    expect(mail!.html).toContain(`http://${HOST}${links.confirm}`);
    expect(mail!.messageId).toBe(`<${outbox[0].idempotencyKey}@${HOST}>`);

    const ics = calendarOf(mail!);
    expect(ics.method).toBe('REQUEST'); // RFC 5546 §3.2.2 via the METHOD property, RFC 5545 §3.7.2
    expect(ics.uid).toBe(`booking-${lift.id}@${HOST}`); // RFC 5545 §3.8.4.7 UID: one per booking, kept across versions
    expect(ics.sequence).toBe(2); // RFC 5545 §3.8.7.4 SEQUENCE: the booking version
    expect(ics.start.toISOString()).toBe(SLOT.startsAt); // RFC 5545 §3.8.2.4 DTSTART
    expect(ics.end.toISOString()).toBe(SLOT.endsAt); // RFC 5545 §3.8.2.2 DTEND
    await waitUntil(
      async () => (await ctx.knex('outbox').where('id', outbox[0].id).first()).status === 'sent',
      5000,
      'outbox row sent',
    );
  });

  it('refuses to publish an own-firm resource (there is nobody to ask)', async () => {
    const own = await pencilIn(ctx.knex, {
      job: 'TW-2417',
      stage: 'fill',
      resource: 'Crew Otter',
      startsAt: '2027-03-12T08:00:00Z',
      endsAt: '2027-03-12T11:00:00Z',
    });
    const res = await scheduler
      .post(`/api/bookings/${own.id}/publish`)
      .set('X-CSRF-Token', scheduler.csrf)
      .send({ version: 1 })
      .expect(422);
    expect(res.body.code).toBe('own-resource');
  });
});

/** A scheduler's move through the guarded write path, as the board's PATCH makes it. */
async function moveAsScheduler(id: string, startsAt: string, endsAt: string): Promise<Booking> {
  const actor = await actorFor(
    ctx.knex,
    await idOf(ctx.knex, 'users', { email: account('scheduler').email }),
    undefined,
  );
  const current = (await Booking.query(ctx.knex).findById(id))!;
  await new BookingsService(ctx.knex, () => TEST_TODAY.getTime()).update(actor!, id, {
    version: current.version,
    startsAt,
    endsAt,
  });
  return (await Booking.query(ctx.knex).findById(id))!;
}

describe('moving a booking already sent', () => {
  it('sends an update with the same UID and a higher SEQUENCE, and the booking waits for a new answer', async () => {
    await ctx.inbox.clear();
    const after = await moveAsScheduler(lift.id, '2027-03-11T08:00:00Z', '2027-03-11T12:00:00Z');
    expect(after).toMatchObject({ version: 3, state: 'sent' });
    const [mail] = await ctx.inbox.waitFor(toFellside);
    expect(mail!.subject).toMatch(/^Booking changed: Crane lift into pit, Bingley, Thu 11 Mar 2027/);
    liftLinks = answerLinks(mail!);
    const ics = calendarOf(mail!);
    expect(ics).toMatchObject({ method: 'REQUEST', uid: `booking-${lift.id}@${HOST}`, sequence: 3 }); // §3.8.7.4: increases
    expect(ics.start.toISOString()).toBe('2027-03-11T08:00:00.000Z');
  });

  it('tells the householder when a confirmed lift day moves', async () => {
    // The crane firm confirms through the link in the update, as a partner does.
    await request(ctx.waterline.app).post(liftLinks.confirm).type('form').send({}).expect(200);
    expect((await ctx.knex('bookings').where('id', lift.id).first()).state).toBe('confirmed');
    await waitForMailSettled(ctx, pipeline);
    await ctx.inbox.clear();
    await moveAsScheduler(lift.id, '2027-03-09T08:00:00Z', '2027-03-09T12:00:00Z');
    const [customer] = await ctx.inbox.waitFor((m) => m.to.includes('freya@home.example'));
    expect(customer!.subject).toBe('Change to your lift day: Tue 9 Mar 2027');
    expect(customer!.text).toContain('Tuesday 9 March 2027');
    expect(customer!.text).toMatch(/Clear the access route/);
    expect(customer!.text).toMatch(/Parking: keep room at the kerb for the lorry \(and the crane/);
    expect(customer!.text).toMatch(/Power ready/);
    const [partner] = await ctx.inbox.waitFor((m) => toFellside(m) && m.subject.startsWith('Booking changed'));
    expect(calendarOf(partner!).sequence).toBe(5);
    expect((await ctx.knex('bookings').where('id', lift.id).first()).state).toBe('sent');
  });
});

describe('a move through the board API (PATCH /api/bookings/:id)', () => {
  it('queues the update in the same transaction as the move', async () => {
    await ctx.inbox.clear();
    const b = await pencilIn(ctx.knex, {
      job: 'TW-2423',
      stage: 'lift',
      resource: '25 t city crane',
      startsAt: '2027-03-22T08:00:00Z',
      endsAt: '2027-03-22T12:00:00Z',
    });
    await scheduler
      .post(`/api/bookings/${b.id}/publish`)
      .set('X-CSRF-Token', scheduler.csrf)
      .send({ version: 1 })
      .expect(200);
    await ctx.inbox.waitFor((m) => m.subject.startsWith('Booking request') && m.subject.includes('22 Mar 2027'));
    const res = await scheduler
      .patch(`/api/bookings/${b.id}`)
      .set('X-CSRF-Token', scheduler.csrf)
      .send({ version: 2, startsAt: '2027-03-23T08:00:00Z', endsAt: '2027-03-23T12:00:00Z' });
    expect(res.status).toBe(200);
    expect(res.body.bookings[0]).toMatchObject({ version: 3, state: 'sent' });
    const [mail] = await ctx.inbox.waitFor(
      (m) => m.subject.startsWith('Booking changed') && m.subject.includes('23 Mar 2027'),
    );
    expect(calendarOf(mail!)).toMatchObject({ uid: `booking-${b.id}@${HOST}`, sequence: 3 });
  });
});

describe('cancelling a sent booking', () => {
  it('sends METHOD:CANCEL for the same UID and puts the booking back to pencilled', async () => {
    await ctx.inbox.clear();
    const res = await scheduler
      .post(`/api/bookings/${lift.id}/cancel`)
      .set('X-CSRF-Token', scheduler.csrf)
      .send({ version: 5 })
      .expect(200);
    expect(res.body).toMatchObject({ state: 'pencilled', version: 6 });
    const [mail] = await ctx.inbox.waitFor(toFellside);
    expect(mail!.subject).toMatch(/^Booking cancelled: Crane lift into pit/);
    const ics = calendarOf(mail!);
    expect(ics).toMatchObject({
      method: 'CANCEL',
      uid: `booking-${lift.id}@${HOST}`,
      sequence: 6,
      status: 'CANCELLED',
    }); // RFC 5546 §3.2.5
    expect(mail!.text).not.toMatch(/Confirm:/);
  });

  it('sends a cancellation when a sent booking is taken off the board altogether', async () => {
    await ctx.inbox.clear();
    const sparky = await pencilIn(ctx.knex, {
      job: 'TW-2417',
      stage: 'electrical_connect',
      resource: 'Gareth Pryce',
      startsAt: '2027-03-16T09:00:00Z',
      endsAt: '2027-03-16T13:00:00Z',
    });
    await scheduler
      .post(`/api/bookings/${sparky.id}/publish`)
      .set('X-CSRF-Token', scheduler.csrf)
      .send({ version: 1 })
      .expect(200);
    await ctx.inbox.waitFor((m) => m.subject.startsWith('Booking request: Connect and certify'));
    await scheduler.delete(`/api/bookings/${sparky.id}?version=2`).set('X-CSRF-Token', scheduler.csrf).expect(204);
    const [mail] = await ctx.inbox.waitFor((m) => m.subject.startsWith('Booking cancelled: Connect and certify'));
    expect(mail!.to).toEqual(['bookings@northgate.example']);
    expect(calendarOf(mail!)).toMatchObject({ method: 'CANCEL', uid: `booking-${sparky.id}@${HOST}`, sequence: 3 });
  });
});

describe('when the mail server refuses for a while', () => {
  it('retries with back-off and delivers the message once', async () => {
    await ctx.inbox.clear();
    await ctx.inbox.failNext(2);
    const b = await pencilIn(ctx.knex, {
      job: 'TW-2420',
      stage: 'lift',
      resource: '25 t city crane',
      startsAt: '2027-04-06T08:00:00Z',
      endsAt: '2027-04-06T12:00:00Z',
    });
    await scheduler
      .post(`/api/bookings/${b.id}/publish`)
      .set('X-CSRF-Token', scheduler.csrf)
      .send({ version: 1 })
      .expect(200);
    const mails = await ctx.inbox.waitFor(toFellside, 1, 20_000);
    expect(mails).toHaveLength(1);
    const row = await ctx
      .knex('outbox')
      .where('kind', 'booking_request')
      .whereRaw("payload->>'bookingId' = ?", [b.id])
      .first();
    await waitUntil(async () => (await ctx.knex('outbox').where('id', row.id).first()).status === 'sent', 5000, 'sent');
    expect((await ctx.knex('outbox').where('id', row.id).first()).attempts).toBeGreaterThanOrEqual(3);
    await waitForMailSettled(ctx, pipeline);
    expect((await ctx.inbox.list()).filter(toFellside)).toHaveLength(1);
  });
});

describe('a request nobody answers', () => {
  it('is flagged overdue after REMINDER_HOURS and gets exactly one reminder per version', async () => {
    await ctx.inbox.clear();
    const b = await pencilIn(ctx.knex, {
      job: 'TW-2422',
      stage: 'lift',
      resource: '60 t mobile crane',
      startsAt: '2027-04-07T08:00:00Z',
      endsAt: '2027-04-07T12:00:00Z',
    });
    await scheduler
      .post(`/api/bookings/${b.id}/publish`)
      .set('X-CSRF-Token', scheduler.csrf)
      .send({ version: 1 })
      .expect(200);
    await ctx.inbox.waitFor(
      (m) => m.subject.startsWith('Booking request: Crane lift into pit') && m.subject.includes('7 Apr 2027'),
    );
    const sentAt = (await ctx.knex('booking_requests').where({ booking_id: b.id, booking_version: 2 }).first())
      .requestedAt as Date;
    // REMINDER_HOURS defaults to 48 (config.ts); 47 hours on nothing is due, 49 hours on it is.
    expect(
      await scanOverdueRequests(ctx.knex, {
        now: new Date(sentAt.getTime() + 47 * 3_600_000),
        reminderHours: ctx.config.REMINDER_HOURS,
      }),
    ).toBe(0);
    expect((await scheduler.get(`/api/bookings/${b.id}`).expect(200)).body.overdue).toBe(false);
    expect(
      await scanOverdueRequests(ctx.knex, { now: new Date(sentAt.getTime() + 49 * 3_600_000), reminderHours: 48 }),
    ).toBeGreaterThanOrEqual(1);
    expect(
      (await ctx.knex('booking_requests').where({ booking_id: b.id, booking_version: 2 }).first()).overdueAt,
    ).toBeInstanceOf(Date);
    expect(
      await scanOverdueRequests(ctx.knex, { now: new Date(sentAt.getTime() + 99 * 3_600_000), reminderHours: 48 }),
    ).toBe(0);
    expect((await scheduler.get(`/api/bookings/${b.id}`).expect(200)).body.overdue).toBe(true);
    const reminders = await ctx.inbox.waitFor(
      (m) => m.subject.startsWith('Reminder, please answer: Crane lift into pit') && m.subject.includes('7 Apr 2027'),
    );
    expect(reminders).toHaveLength(1);
    expect(calendarOf(reminders[0]!).sequence).toBe(2);
  });
});
