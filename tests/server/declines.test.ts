import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { account, idOf, signIn, startTestApp, type Agent, type TestContext } from '../helpers/server.ts';
import { makeJob } from '../helpers/flows.ts';
import { composeMessage, type OutgoingMail } from '../../server/mail/messages.ts';
import type { BoardData } from '../../shared/board-data.ts';
import { REASON_LABEL } from '../../shared/schemas/answers.ts';
import { TEXT_MESSAGES } from '../../shared/schemas/common.ts';
import { answerReasonFor } from '../../server/services/read-policy.ts';

/**
 * A decline is work for the scheduler: the booking stays on the board as declined (with when and
 * how the partner said no), the installer's schedulers get an e-mail through the outbox, and the
 * stage can be booked again (dropped again, or the request sent again). The partner may say why, in
 * their own words: the installer whose booking it is reads it on the board, the job page and the
 * e-mail (always as text), nobody else does.
 */

let ctx: TestContext;
let scheduler: Agent;
let partner: Agent;
let stageId: string;
let jobId: string;
let priya: string;
let bookingId: string;
/** What the partner types with the decline in the app: spaces trimmed, markup kept as text. */
const APP_REASON = 'Not free that day — <b>wedding</b>';

const send = (agent: Agent, path: string, body: object) => agent.post(path).set('X-CSRF-Token', agent.csrf).send(body);
/** A booking's version now, as a partner's page would have loaded it. */
const slotVersion = async (id: string): Promise<number> =>
  (await ctx.knex('bookings').where('id', id).first('version')).version as number;
const boardWeek = async (): Promise<BoardData> =>
  (await scheduler.get('/api/board').query({ from: '2026-10-11T23:00:00Z', to: '2026-10-19T00:00:00Z' }).expect(200))
    .body;

beforeAll(async () => {
  ctx = await startTestApp();
  // Outbox rows and used links of earlier runs name booking ids this run gives out again.
  await ctx.knex.raw('TRUNCATE outbox, link_uses, link_attempts RESTART IDENTITY');
  scheduler = await signIn(ctx, account('scheduler').email);
  partner = await signIn(ctx, account('partner', 'Brightspark Electrical').email);
  // A job of the test's own: only the electrician's connection.
  const job = await makeJob(ctx.knex, {
    reference: 'FX-2417',
    stages: [{ kind: 'electrical_connect', name: 'Connect and certify', minutes: 240, needs: { electrician: 1 } }],
    links: [],
  });
  jobId = job.jobId;
  stageId = job.stage.electrical_connect!;
  priya = await idOf(ctx.knex, 'resources', { name: 'Priya Nair' });
  // Tuesday 13 October 2026, 08:00 in London (BST), asked of Brightspark's electrician.
  const booked = await send(scheduler, '/api/bookings', {
    stageId,
    resourceId: priya,
    startsAt: '2026-10-13T07:00:00Z',
  }).expect(201);
  bookingId = booked.body.bookings[0].id;
  await send(scheduler, `/api/bookings/${bookingId}/publish`, { version: 1 }).expect(200);
  const answer = await send(partner, `/api/partner/slots/${bookingId}/answer`, {
    version: await slotVersion(bookingId),
    action: 'decline',
    reason: `  ${APP_REASON}  `,
  }).expect(200);
  expect(answer.body.result).toBe('declined');
});
afterAll(async () => {
  await ctx.close();
});

describe('a declined booking', () => {
  it('stays on the board as declined, saying when and how the partner declined', async () => {
    const board = await boardWeek();
    const b = board.bookings.find((x) => x.id === bookingId);
    expect(b).toMatchObject({
      state: 'declined',
      version: 3,
      resourceId: priya,
      stageId,
      start: Date.parse('2026-10-13T07:00:00Z'),
    });
    expect(b!.declined).toEqual({ at: expect.any(Number), via: 'app', reason: APP_REASON });
  });

  it("keeps the partner's reason with the answer and in the decline's audit row", async () => {
    expect(
      await ctx.knex('booking_answers').where({ booking_id: bookingId, action: 'decline' }).pluck('reason'),
    ).toEqual([APP_REASON]);
    const audit = await ctx
      .knex('audit_log')
      .where({ entity: 'booking', entity_id: bookingId })
      .orderBy('id', 'desc')
      .first('after');
    expect(audit.after).toMatchObject({ action: 'decline', state: 'declined', version: 3, reason: APP_REASON });
  });

  it('shows the reason on the job page beside the decline', async () => {
    const res = await scheduler.get(`/api/jobs/${jobId}/stages`).expect(200);
    expect(res.body.items[0].bookings).toEqual([
      expect.objectContaining({ id: bookingId, state: 'declined', declineReason: APP_REASON }),
    ]);
  });

  it("queues an e-mail to the installer's scheduler in the decline's own transaction", async () => {
    const rows = await ctx.knex('outbox').where({ kind: 'booking_declined' });
    expect(rows.map((r) => ({ key: r.idempotencyKey, payload: r.payload }))).toEqual([
      { key: `booking.${bookingId}.v3.declined`, payload: { bookingId, version: 3 } },
    ]);
    const mail = (await composeMessage(
      { knex: ctx.knex, config: ctx.config },
      'booking_declined',
      rows[0].payload,
    )) as OutgoingMail;
    // Tideway's one scheduler; the owner and manager are not the ones who rebook.
    expect(mail.to).toEqual(['sam.okafor@tideway.example']);
    expect(mail.subject).toBe('Declined: Connect and certify, FX-2417, Tue 13 Oct 2026');
    expect(mail.text).toContain('Brightspark Electrical declined Connect and certify for job FX-2417');
    expect(mail.text).toContain('Tuesday 13 October 2026');
    expect(mail.text).toContain('on their Waterline page');
    expect(mail.html).toContain(`${ctx.config.PUBLIC_URL}/board?date=2026-10-13&amp;job=${jobId}`);
    // The partner's words as they typed them, and in the HTML as text: the <b> never becomes markup.
    expect(mail.text).toContain(`“${APP_REASON}”`);
    expect(mail.html).toContain('Not free that day — &lt;b&gt;wedding&lt;/b&gt;');
    expect(mail.html).not.toContain('<b>wedding');
  });

  it('can be sent again (declined → sent): the partner gets a new request, and a second decline tells the scheduler again', async () => {
    const again = await send(scheduler, `/api/bookings/${bookingId}/publish`, { version: 3 }).expect(200);
    expect(again.body).toMatchObject({ state: 'sent', version: 4 });
    expect(
      await ctx
        .knex('outbox')
        .where({ kind: 'booking_request' })
        .whereRaw("payload->>'bookingId' = ?", [bookingId])
        .pluck('payload'),
    ).toEqual([expect.objectContaining({ version: 2 }), expect.objectContaining({ version: 4 })]);
    // The first decline's e-mail is now out of date: the worker skips it rather than tell of a settled decline.
    const stale = await composeMessage({ knex: ctx.knex, config: ctx.config }, 'booking_declined', {
      bookingId,
      version: 3,
    });
    expect(stale).toMatchObject({ skip: expect.stringMatching(/already dealt with/) });

    await send(partner, `/api/partner/slots/${bookingId}/answer`, {
      version: await slotVersion(bookingId),
      action: 'decline',
    }).expect(200);
    expect(await ctx.knex('outbox').where({ kind: 'booking_declined' }).pluck('idempotency_key')).toEqual([
      `booking.${bookingId}.v3.declined`,
      `booking.${bookingId}.v5.declined`,
    ]);
    // No reason this time: the board says so rather than repeat the first decline's.
    expect((await boardWeek()).bookings.find((x) => x.id === bookingId)!.declined).toEqual({
      at: expect.any(Number),
      via: 'app',
      reason: null,
    });
  });

  it('is rebooked by dropping the stage on the same person again: the same booking, pencilled at the new time', async () => {
    const res = await send(scheduler, '/api/bookings', {
      stageId,
      resourceId: priya,
      startsAt: '2026-10-14T07:00:00Z',
    }).expect(201);
    expect(res.body.bookings).toEqual([
      expect.objectContaining({ id: bookingId, state: 'pencilled', version: 6, startsAt: '2026-10-14T07:00:00.000Z' }),
    ]);
    const b = (await boardWeek()).bookings.find((x) => x.id === bookingId);
    expect(b).toMatchObject({ state: 'pencilled' });
    expect(b!.declined).toBeUndefined();
  });
});

describe("a partner's reason", () => {
  let linkJobId: string;
  let linkBooking: string;
  let declinePath: string;
  const LINK_REASON = '<b>Site flooded</b> & closed';
  const formPost = (path: string, form: Record<string, string>) => scheduler.post(path).type('form').send(form);

  beforeAll(async () => {
    const job = await makeJob(ctx.knex, {
      reference: 'FX-2418',
      stages: [{ kind: 'electrical_connect', name: 'Connect and certify', minutes: 240, needs: { electrician: 1 } }],
      links: [],
    });
    linkJobId = job.jobId;
    // Thursday 15 October 2026, 08:00 in London, asked of the same electrician.
    const booked = await send(scheduler, '/api/bookings', {
      stageId: job.stage.electrical_connect!,
      resourceId: priya,
      startsAt: '2026-10-15T07:00:00Z',
    }).expect(201);
    linkBooking = booked.body.bookings[0].id;
    await send(scheduler, `/api/bookings/${linkBooking}/publish`, { version: 1 }).expect(200);
    const request = (await composeMessage({ knex: ctx.knex, config: ctx.config }, 'booking_request', {
      bookingId: linkBooking,
      version: 2,
    })) as OutgoingMail;
    declinePath = new URL(/^Decline:\n(\S+)$/m.exec(request.text)![1]!).pathname;
  });

  it('is refused in the app when too long or holding a control character: 400 naming the field', async () => {
    const long = await send(partner, `/api/partner/slots/${linkBooking}/answer`, {
      version: await slotVersion(linkBooking),
      action: 'decline',
      reason: 'x'.repeat(600),
    }).expect(400);
    expect(long.headers['content-type']).toMatch(/^application\/problem\+json/);
    expect(long.body.errors).toEqual([{ field: 'reason', message: 'must be at most 500 characters' }]);
    const nul = await send(partner, `/api/partner/slots/${linkBooking}/answer`, {
      version: await slotVersion(linkBooking),
      action: 'decline',
      reason: 'Not free\u0000',
    }).expect(400);
    expect(nul.body.errors).toEqual([{ field: 'reason', message: TEXT_MESSAGES.control }]);
    expect((await ctx.knex('bookings').where('id', linkBooking).first('state')).state).toBe('sent');
  });

  it('may come with a proposal too, kept with it', async () => {
    await send(partner, `/api/partner/slots/${linkBooking}/answer`, {
      version: await slotVersion(linkBooking),
      action: 'propose',
      proposedStart: '2026-10-16T07:00:00Z',
      proposedEnd: '2026-10-16T11:00:00Z',
      reason: 'Friday suits us better',
    }).expect(200);
    expect(
      await ctx.knex('booking_answers').where({ booking_id: linkBooking, action: 'propose' }).pluck('reason'),
    ).toEqual(['Friday suits us better']);
  });

  it("is asked on the link's decline page, with quick choices, and refused there when bad (the link stays good)", async () => {
    const page = await scheduler.get(declinePath).expect(200);
    expect(page.text).toContain(REASON_LABEL);
    for (const [i, choice] of ['Not free that day', 'Too short notice', 'Job not for us'].entries()) {
      expect(page.text).toContain(`<input type="radio" name="choice" id="choice-${i}" value="${choice}"`);
    }
    const long = await formPost(declinePath, { reason: 'y'.repeat(600) }).expect(400);
    expect(long.headers['content-type']).toMatch(/^application\/problem\+json/);
    expect(long.body.errors).toEqual([{ field: 'reason', message: 'must be at most 500 characters' }]);
    const nul = await formPost(declinePath, { reason: 'closed\u0000' }).expect(400);
    expect(nul.body.errors).toEqual([{ field: 'reason', message: TEXT_MESSAGES.control }]);
    const odd = await formPost(declinePath, { choice: 'Because', reason: '' }).expect(400);
    expect(odd.body.errors).toEqual([
      { field: 'choice', message: expect.stringMatching(/^must be one of: Not free that day/) },
    ]);
    expect(await ctx.knex('link_uses').where('subject_id', linkBooking).count('* as n').first()).toEqual({ n: '0' });
  });

  it('given by link reaches the board and the e-mail as text', async () => {
    const done = await formPost(declinePath, { choice: 'Too short notice', reason: ` ${LINK_REASON} ` }).expect(200);
    expect(done.text).toContain('Thank you: the slot is declined');
    const reason = `Too short notice — ${LINK_REASON}`;
    const b = (await boardWeek()).bookings.find((x) => x.id === linkBooking);
    expect(b).toMatchObject({ state: 'declined', declined: { at: expect.any(Number), via: 'link', reason } });
    const row = await ctx
      .knex('outbox')
      .where({ kind: 'booking_declined' })
      .whereRaw("payload->>'bookingId' = ?", [linkBooking])
      .first('payload');
    const mail = (await composeMessage(
      { knex: ctx.knex, config: ctx.config },
      'booking_declined',
      row.payload,
    )) as OutgoingMail;
    expect(mail.text).toContain('Declined from the e-mailed request');
    expect(mail.text).toContain(`“${reason}”`);
    expect(mail.html).toContain('Too short notice — &lt;b&gt;Site flooded&lt;/b&gt; &amp; closed');
    expect(mail.html).not.toContain('<b>Site flooded');
  });

  it("is not read by another installer's scheduler", async () => {
    const other = await signIn(ctx, account('scheduler', 'Moorview Spas').email);
    const board = await other
      .get('/api/board')
      .query({ from: '2026-10-11T23:00:00Z', to: '2026-10-19T00:00:00Z' })
      .expect(200);
    const text = JSON.stringify(board.body);
    expect(text).not.toContain('Site flooded');
    expect(text).not.toContain('wedding');
    await other.get(`/api/bookings/${linkBooking}`).expect(404);
    await other.get(`/api/jobs/${linkJobId}/stages`).expect(404);
    // The read policy itself: the reason is for the installer whose booking it is, whoever else asks.
    const tideway = await idOf(ctx.knex, 'firms', { name: 'Tideway Hot Tubs' });
    const moorview = await idOf(ctx.knex, 'firms', { name: 'Moorview Spas' });
    const reader = (firmId: string) => ({
      userId: '1',
      firmId,
      firmKind: 'installer' as const,
      role: 'scheduler' as const,
    });
    expect([
      answerReasonFor(reader(tideway), tideway, 'Too short notice'),
      answerReasonFor(reader(moorview), tideway, 'Too short notice'),
    ]).toEqual(['Too short notice', null]);
  });
});
