import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { account, idOf, signIn, startTestApp, type Agent, type TestContext } from '../helpers/server.ts';
import { makeJob } from '../helpers/flows.ts';
import { composeMessage, type OutgoingMail } from '../../server/mail/messages.ts';
import type { BoardData } from '../../shared/board-data.ts';

/**
 * A decline is work for the scheduler: the booking stays on the board as declined (with when and
 * how the partner said no), the installer's schedulers get an e-mail through the outbox, and the
 * stage can be booked again (dropped again, or the request sent again).
 */

let ctx: TestContext;
let scheduler: Agent;
let partner: Agent;
let stageId: string;
let jobId: string;
let priya: string;
let bookingId: string;

const send = (agent: Agent, path: string, body: object) => agent.post(path).set('X-CSRF-Token', agent.csrf).send(body);
const boardWeek = async (): Promise<BoardData> => (await scheduler.get('/api/board').query({ from: '2026-10-11T23:00:00Z', to: '2026-10-19T00:00:00Z' }).expect(200)).body;

beforeAll(async () => {
  ctx = await startTestApp();
  await ctx.knex.raw('TRUNCATE outbox RESTART IDENTITY');
  scheduler = await signIn(ctx, account('scheduler').email);
  partner = await signIn(ctx, account('partner', 'Brightspark Electrical').email);
  // A job of the test's own: only the electrician's connection.
  const job = await makeJob(ctx.knex, { reference: 'FX-2417', stages: [{ kind: 'electrical_connect', name: 'Connect and certify', minutes: 240, needs: { electrician: 1 } }], links: [] });
  jobId = job.jobId;
  stageId = job.stage.electrical_connect!;
  priya = await idOf(ctx.knex, 'resources', { name: 'Priya Nair' });
  // Tuesday 13 October 2026, 08:00 in London (BST), asked of Brightspark's electrician.
  const booked = await send(scheduler, '/api/bookings', { stageId, resourceId: priya, startsAt: '2026-10-13T07:00:00Z' }).expect(201);
  bookingId = booked.body.bookings[0].id;
  await send(scheduler, `/api/bookings/${bookingId}/publish`, { version: 1 }).expect(200);
  const answer = await send(partner, `/api/partner/slots/${bookingId}/answer`, { action: 'decline' }).expect(200);
  expect(answer.body.result).toBe('declined');
});
afterAll(async () => { await ctx.close(); });

describe('a declined booking', () => {
  it('stays on the board as declined, saying when and how the partner declined', async () => {
    const board = await boardWeek();
    const b = board.bookings.find((x) => x.id === bookingId);
    expect(b).toMatchObject({ state: 'declined', version: 3, resourceId: priya, stageId, start: Date.parse('2026-10-13T07:00:00Z') });
    expect(b!.declined).toEqual({ at: expect.any(Number), via: 'app' });
  });

  it("queues an e-mail to the installer's scheduler in the decline's own transaction", async () => {
    const rows = await ctx.knex('outbox').where({ kind: 'booking_declined' });
    expect(rows.map((r) => ({ key: r.idempotencyKey, payload: r.payload }))).toEqual([
      { key: `booking.${bookingId}.v3.declined`, payload: { bookingId, version: 3 } },
    ]);
    const mail = await composeMessage({ knex: ctx.knex, config: ctx.config }, 'booking_declined', rows[0].payload) as OutgoingMail;
    // Tideway's one scheduler; the owner and manager are not the ones who rebook.
    expect(mail.to).toEqual(['sam.okafor@tideway.example']);
    expect(mail.subject).toBe('Declined: Connect and certify, FX-2417, Tue 13 Oct 2026');
    expect(mail.text).toContain('Brightspark Electrical declined Connect and certify for job FX-2417');
    expect(mail.text).toContain('Tuesday 13 October 2026');
    expect(mail.text).toContain('on their Waterline page');
    expect(mail.html).toContain(`${ctx.config.PUBLIC_URL}/board?date=2026-10-13&amp;job=${jobId}`);
  });

  it('can be sent again (declined → sent): the partner gets a new request, and a second decline tells the scheduler again', async () => {
    const again = await send(scheduler, `/api/bookings/${bookingId}/publish`, { version: 3 }).expect(200);
    expect(again.body).toMatchObject({ state: 'sent', version: 4 });
    expect(await ctx.knex('outbox').where({ kind: 'booking_request' }).whereRaw("payload->>'bookingId' = ?", [bookingId]).pluck('payload'))
      .toEqual([expect.objectContaining({ version: 2 }), expect.objectContaining({ version: 4 })]);
    // The first decline's e-mail is now out of date: the worker skips it rather than tell of a settled decline.
    const stale = await composeMessage({ knex: ctx.knex, config: ctx.config }, 'booking_declined', { bookingId, version: 3 });
    expect(stale).toMatchObject({ skip: expect.stringMatching(/already dealt with/) });

    await send(partner, `/api/partner/slots/${bookingId}/answer`, { action: 'decline' }).expect(200);
    expect(await ctx.knex('outbox').where({ kind: 'booking_declined' }).pluck('idempotency_key'))
      .toEqual([`booking.${bookingId}.v3.declined`, `booking.${bookingId}.v5.declined`]);
  });

  it('is rebooked by dropping the stage on the same person again: the same booking, pencilled at the new time', async () => {
    const res = await send(scheduler, '/api/bookings', { stageId, resourceId: priya, startsAt: '2026-10-14T07:00:00Z' }).expect(201);
    expect(res.body.bookings).toEqual([expect.objectContaining({ id: bookingId, state: 'pencilled', version: 6, startsAt: '2026-10-14T07:00:00.000Z' })]);
    const b = (await boardWeek()).bookings.find((x) => x.id === bookingId);
    expect(b).toMatchObject({ state: 'pencilled' });
    expect(b!.declined).toBeUndefined();
  });
});
