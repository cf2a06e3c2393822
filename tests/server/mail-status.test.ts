import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { account, idOf, signIn, type Agent } from '../helpers/server.ts';
import { pencilIn, startMailTestApp, waitForMailSettled, waitUntil, type MailTestContext } from '../helpers/mail.ts';
import { unbookJobs } from '../helpers/demo.ts';
import { queueBookingMessage, enqueueMessage } from '../../server/services/outbox.ts';
import { plainReason } from '../../server/services/mail-status.ts';

/**
 * E-mails that did not go, as the office sees them (server/services/mail-status.ts): only the
 * installer firm's own, only to scheduler, manager and owner, in plain words, with a "Send again"
 * that sends the same message exactly once however often it is pressed.
 */

let ctx: MailTestContext;
let scheduler: Agent;
let moorview: Agent;
let tw2417: string;
let mv118: string;
/** Outbox ids: Tideway's failed crane request, its invitation, Moorview's failed one, a long-waiting and a fresh row. */
const row: Record<'failed' | 'invitation' | 'theirs' | 'waiting' | 'fresh', string> = {
  failed: '',
  invitation: '',
  theirs: '',
  waiting: '',
  fresh: '',
};
// RFC 5321 §4.2.3: 550 "mailbox unavailable", the permanent refusal of an unknown address.
const UNKNOWN_ADDRESS =
  "Can't send mail - all recipients were rejected: 550 5.1.1 <bookings@fellside.example>: Recipient address rejected: User unknown";

async function outboxRowOf(
  trx: Parameters<typeof queueBookingMessage>[0],
  bookingId: string,
  kind: 'request' | 'update',
): Promise<string> {
  await queueBookingMessage(trx, { bookingId, kind, version: 1 });
  return String(
    (await trx('outbox').whereRaw("payload->>'bookingId' = ?", [bookingId]).orderBy('id', 'desc').first('id')).id,
  );
}

beforeAll(async () => {
  ctx = await startMailTestApp();
  await unbookJobs(ctx.knex, 'TW-2417', 'TW-2420');
  tw2417 = await idOf(ctx.knex, 'jobs', { reference: 'TW-2417' });
  mv118 = await idOf(ctx.knex, 'jobs', { reference: 'MV-118' });
  const lift = await pencilIn(ctx.knex, {
    job: 'TW-2417',
    stage: 'lift',
    resource: '60 t mobile crane',
    startsAt: '2027-03-10T08:00:00Z',
    endsAt: '2027-03-10T12:00:00Z',
    state: 'sent',
  });
  const other = await pencilIn(ctx.knex, {
    job: 'TW-2420',
    stage: 'lift',
    resource: '60 t mobile crane',
    startsAt: '2027-03-12T08:00:00Z',
    endsAt: '2027-03-12T12:00:00Z',
    state: 'sent',
  });
  const mvStage = await idOf(ctx.knex, 'stages', { job_id: mv118 });
  const mvBooking = String((await ctx.knex('bookings').where('stage_id', mvStage).first('id')).id);
  await ctx.knex.transaction(async (trx) => {
    // As the worker leaves them (workers/mail.ts): a refused address after its tries, and the rest.
    row.failed = await outboxRowOf(trx, lift.id, 'request');
    await trx('outbox')
      .where('id', row.failed)
      .update({
        status: 'failed',
        attempts: 10,
        last_error: UNKNOWN_ADDRESS,
        next_attempt_at: new Date('2026-12-01T09:30:00Z'),
      });
    row.theirs = await outboxRowOf(trx, mvBooking, 'update');
    await trx('outbox').where('id', row.theirs).update({ status: 'failed', attempts: 10, last_error: UNKNOWN_ADDRESS });
    row.waiting = await outboxRowOf(trx, other.id, 'request');
    await trx('outbox')
      .where('id', row.waiting)
      .update({
        status: 'queued',
        created_at: trx.raw("now() - interval '2 hours'"),
        next_attempt_at: trx.raw("now() - interval '2 hours'"),
      });
    const [invite] = await trx('invitations')
      .insert({
        firm_id: await idOf(trx, 'firms', { name: 'Tideway Hot Tubs' }),
        email: 'new.starter@tideway.example',
        role: 'crew',
        expires_at: new Date(Date.now() + 7 * 86_400_000),
      })
      .returning('id');
    await enqueueMessage(trx, `invitation.${invite.id}`, 'invitation', { invitationId: String(invite.id) });
    row.invitation = String((await trx('outbox').where('idempotency_key', `invitation.${invite.id}`).first('id')).id);
    await trx('outbox')
      .where('id', row.invitation)
      .update({ status: 'failed', attempts: 10, last_error: 'connect ECONNREFUSED 127.0.0.1:2525' });
  });
  // Just written and not yet sent: not a problem yet.
  await ctx.knex.transaction(async (trx) => {
    row.fresh = await outboxRowOf(trx, other.id, 'update');
  });
  scheduler = await signIn(ctx, account('scheduler').email);
  moorview = await signIn(ctx, account('scheduler', 'Moorview Spas').email);
});
afterAll(async () => {
  await ctx.close();
});

describe('undelivered e-mails', () => {
  it("lists the firm's failed and long-waiting e-mails, who to, what about and why, in plain words", async () => {
    const res = await scheduler.get('/api/mail/undelivered').expect(200);
    expect(res.body.total).toBe(3);
    expect(res.body.waitingAfterMinutes).toBe(30);
    const byId = new Map((res.body.items as { id: string }[]).map((i) => [i.id, i]));
    expect([...byId.keys()].sort()).toEqual([row.failed, row.waiting, row.invitation].sort());
    expect(byId.get(row.failed)).toEqual({
      id: row.failed,
      state: 'failed',
      kind: 'booking_request',
      jobId: tw2417,
      jobReference: 'TW-2417',
      attempts: 10,
      to: 'Fellside Crane Hire (bookings@fellside.example, fiona.fell@fellside.example)',
      about: 'Booking request: Crane lift into pit, Bingley, Wed 10 Mar 2027',
      createdAt: expect.any(String),
      lastTriedAt: '2026-12-01T09:30:00.000Z',
      reason:
        'The receiving mail server refused the address: it may be misspelt or no longer in use. Check it and send again.',
      detail: UNKNOWN_ADDRESS,
    });
    expect(byId.get(row.waiting)).toMatchObject({
      state: 'waiting',
      jobReference: 'TW-2420',
      reason: expect.stringMatching(/^It has not been sent yet/),
    });
    expect(byId.get(row.invitation)).toMatchObject({
      state: 'failed',
      kind: 'invitation',
      jobId: null,
      to: 'new.starter@tideway.example',
      about: 'Tideway Hot Tubs invited you to Waterline',
      reason:
        'Our mail server could not be reached. Nothing is wrong with the address; send it again once mail is working.',
    });
    // One job's e-mails for its page.
    const one = await scheduler.get(`/api/mail/undelivered?jobId=${tw2417}`).expect(200);
    expect(one.body.items.map((i: { id: string }) => i.id)).toEqual([row.failed]);
  });

  it('shows each firm only its own', async () => {
    const theirs = await moorview.get('/api/mail/undelivered').expect(200);
    expect(theirs.body.items.map((i: { id: string }) => i.id)).toEqual([row.theirs]);
    expect(JSON.stringify(theirs.body)).not.toMatch(/TW-24|Tideway|new\.starter/);
    await scheduler.get(`/api/mail/undelivered?jobId=${mv118}`).expect(404);
    const refused = await scheduler
      .post('/api/mail/send-again')
      .set('X-CSRF-Token', scheduler.csrf)
      .send({ id: row.theirs })
      .expect(404);
    expect(refused.headers['content-type']).toMatch(/application\/problem\+json/);
    expect((await ctx.knex('outbox').where('id', row.theirs).first()).status).toBe('failed');
  });

  it('is for the office roles that plan: crew, partners and viewers are refused', async () => {
    for (const role of ['owner', 'manager'] as const) {
      const agent = await signIn(ctx, account(role).email);
      expect((await agent.get('/api/mail/undelivered').expect(200)).body.total).toBe(3);
    }
    for (const who of [
      account('crew'),
      account('viewer'),
      account('partner', 'Fellside Crane Hire'),
      account('partner', 'Brightspark Electrical'),
    ]) {
      const agent = await signIn(ctx, who.email);
      await agent.get('/api/mail/undelivered').expect(403);
      await agent.post('/api/mail/send-again').set('X-CSRF-Token', agent.csrf).send({ id: row.failed }).expect(403);
    }
    expect((await ctx.knex('outbox').where('id', row.failed).first()).status).toBe('failed');
  });

  it('refuses an id that is not one, naming the field', async () => {
    for (const id of ['abc', '1\u0000', '-1', 12, '99999999999999999999']) {
      const res = await scheduler
        .post('/api/mail/send-again')
        .set('X-CSRF-Token', scheduler.csrf)
        .send({ id })
        .expect(400);
      expect(res.body.errors).toEqual([{ field: 'id', message: expect.any(String) }]);
    }
    await scheduler
      .post('/api/mail/send-again')
      .set('X-CSRF-Token', scheduler.csrf)
      .send({ id: '999999999' })
      .expect(404);
  });
});

describe('Send again', () => {
  it('sends the same e-mail exactly once, however many clicks arrive at once, with a fresh count of tries', async () => {
    const key = (await ctx.knex('outbox').where('id', row.failed).first('idempotency_key')).idempotencyKey as string;
    const clicks = await Promise.all(
      [1, 2, 3].map(() =>
        scheduler.post('/api/mail/send-again').set('X-CSRF-Token', scheduler.csrf).send({ id: row.failed }),
      ),
    );
    expect(clicks.map((c) => c.status)).toEqual([200, 200, 200]);
    expect(clicks.filter((c) => c.body.requeued === true)).toHaveLength(1);
    expect(clicks.map((c) => c.body.status)).toEqual(['pending', 'pending', 'pending']);
    expect(await ctx.knex('outbox').where('id', row.failed).first('status', 'attempts')).toEqual({
      status: 'pending',
      attempts: 0,
    });
    // One row in the audit log, for the click that sent it again: who, and from what.
    const audit = await ctx.knex('audit_log').where({ entity: 'outbox', entity_id: row.failed });
    expect(audit).toHaveLength(1);
    expect(audit[0]).toMatchObject({
      action: 'update',
      actorUserId: await idOf(ctx.knex, 'users', { email: account('scheduler').email }),
      before: { status: 'failed' },
      after: { status: 'pending', attempts: 0 },
    });

    // The address is fine now: the relay and the worker send it.
    const pipeline = ctx.startPipeline();
    await waitUntil(
      async () => (await ctx.knex('outbox').where('id', row.failed).first()).status === 'sent',
      15_000,
      'the row to be sent',
    );
    await waitForMailSettled(ctx, pipeline);
    const mails = (await ctx.inbox.list()).filter((m) => m.headers['x-waterline-message'] === key);
    expect(mails).toHaveLength(1);
    expect(mails[0]!.subject).toBe('Booking request: Crane lift into pit, Bingley, Wed 10 Mar 2027');

    // Gone from the list; a late click changes nothing and says it went.
    const after = await scheduler.get('/api/mail/undelivered').expect(200);
    expect(after.body.items.map((i: { id: string }) => i.id)).not.toContain(row.failed);
    const late = await scheduler
      .post('/api/mail/send-again')
      .set('X-CSRF-Token', scheduler.csrf)
      .send({ id: row.failed })
      .expect(200);
    expect(late.body).toEqual({ id: row.failed, status: 'sent', requeued: false });
    await waitForMailSettled(ctx, pipeline);
    expect((await ctx.inbox.list()).filter((m) => m.headers['x-waterline-message'] === key)).toHaveLength(1);
  }, 40_000);
});

describe('plain reasons', () => {
  it('word each kind of failure without leaving the code alone', () => {
    expect(plainReason('failed', 'Message failed: 451 4.7.1 Try again later')).toBe(
      'The receiving mail server kept asking us to try again later, and we ran out of tries.',
    );
    expect(plainReason('failed', 'Message failed: 552 5.2.2 Mailbox full')).toBe(
      "The recipient's mailbox is full. Send it again later, or call them.",
    );
    expect(plainReason('failed', 'not sent: the job has no customer e-mail')).toMatch(
      /^The job has no e-mail address for the householder/,
    );
    expect(plainReason('failed', 'Greeting never received')).toMatch(/^Our mail server could not be reached/);
    expect(plainReason('waiting', null)).toMatch(/^It has not been sent yet/);
  });
});
