import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import ICAL from 'ical.js';
import { account, idOf, signIn, startTestApp, type Agent, type TestContext } from '../helpers/server.ts';
import { pencilIn } from '../helpers/mail.ts';
import { unbookJobs } from '../helpers/demo.ts';
import { composeMessage, questionsTo, type OutboxKind, type OutgoingMail } from '../../server/mail/messages.ts';
import { scanOverdueRequests } from '../../server/services/reminders.ts';
import { S3ObjectStore } from '../../server/storage/object-store.ts';
import { ALL_TICKED, makeHandoverJob, signaturePng } from '../helpers/handover.ts';

const DAY = 86_400_000;

/*
 * The e-mails a day's work sends, made here through the API as people make them: a request to
 * Brightspark's electrician and her confirmation, the slot then moved and withdrawn, another request
 * declined, a third reminded when unanswered and then answered with another time that is refused,
 * a crane confirmed for a lift (the householder hears the day), an invitation and a householder's
 * deposit, and a handover signed on site (the pack, and the householder's service plan). Each is
 * composed as the mail worker composes
 * it: it has someone to go to, a subject, a plain-text part and an HTML part, and none of them says
 * "undefined", "NaN", "null", "Invalid Date" or "[object …]" where a value went missing on the way;
 * a calendar attachment parses as iCalendar (RFC 5545, by ical.js, an independent reader).
 */
let ctx: TestContext;
let scheduler: Agent;
let owner: Agent;
let partner: Agent;
let store: S3ObjectStore;

beforeAll(async () => {
  ctx = await startTestApp();
  store = new S3ObjectStore(ctx.config);
  scheduler = await signIn(ctx, account('scheduler').email);
  owner = await signIn(ctx, account('owner').email);
  partner = await signIn(ctx, account('partner', 'Brightspark Electrical').email);
});
afterAll(async () => {
  store?.close();
  await ctx?.close();
});

const SLIP = /\b(undefined|NaN|null)\b|Invalid Date|\[object \w+\]/;

const send = (agent: Agent, method: 'post' | 'patch' | 'put', path: string, body: object) =>
  agent[method](path).set('X-CSRF-Token', agent.csrf).send(body);
const versionOf = async (id: string) => (await ctx.knex('bookings').where('id', id).first('version')).version as number;

/** Each e-mail as the worker composes it moments after the change that queued it. */
const composed: { where: string; kind: string; mail: OutgoingMail }[] = [];
let seen = '0';
async function composeNew(): Promise<void> {
  const rows = (await ctx.knex('outbox').where('id', '>', seen).orderBy('id').select('id', 'kind', 'payload')) as {
    id: string;
    kind: OutboxKind;
    payload: Record<string, unknown>;
  }[];
  for (const row of rows) {
    seen = String(row.id);
    const mail = await composeMessage({ knex: ctx.knex, config: ctx.config, store }, row.kind, row.payload);
    if ('skip' in mail) throw new Error(`${row.kind} #${row.id} skipped at once: ${mail.skip}`);
    composed.push({ where: `${row.kind} #${row.id}`, kind: row.kind, mail });
  }
}

describe("the e-mails of a day's work", () => {
  it('each has someone to go to, a subject, both parts and no value gone missing', async () => {
    await unbookJobs(ctx.knex, 'TW-2415');
    // Asked of Priya Nair, confirmed by her firm, moved an hour, then withdrawn.
    const asked = await pencilIn(ctx.knex, {
      job: 'TW-2415',
      stage: 'electrical_connect',
      resource: 'Priya Nair',
      startsAt: '2027-08-17T08:00:00Z',
      endsAt: '2027-08-17T12:00:00Z',
    });
    const published = await send(scheduler, 'post', `/api/bookings/${asked.id}/publish`, { version: asked.version });
    expect(published.status, JSON.stringify(published.body)).toBe(200);
    await composeNew();
    const confirmed = await send(partner, 'post', `/api/partner/slots/${asked.id}/answer`, {
      version: await versionOf(asked.id),
      action: 'confirm',
    });
    expect(confirmed.status, JSON.stringify(confirmed.body)).toBe(200);
    await composeNew();
    const moved = await send(scheduler, 'patch', `/api/bookings/${asked.id}`, {
      version: await versionOf(asked.id),
      startsAt: '2027-08-17T09:00:00Z',
      endsAt: '2027-08-17T13:00:00Z',
    });
    expect(moved.status, JSON.stringify(moved.body)).toBe(200);
    await composeNew();
    const withdrawn = await send(scheduler, 'post', `/api/bookings/${asked.id}/cancel`, {
      version: await versionOf(asked.id),
    });
    expect(withdrawn.status, JSON.stringify(withdrawn.body)).toBe(200);
    await composeNew();
    // Asked of Tom Ashworth, declined with a reason.
    const other = await pencilIn(ctx.knex, {
      job: 'TW-2415',
      stage: 'electrical_first_fix',
      resource: 'Tom Ashworth',
      startsAt: '2027-08-10T08:00:00Z',
      endsAt: '2027-08-10T12:00:00Z',
    });
    await send(scheduler, 'post', `/api/bookings/${other.id}/publish`, { version: other.version }).expect(200);
    await composeNew();
    const declined = await send(partner, 'post', `/api/partner/slots/${other.id}/answer`, {
      version: await versionOf(other.id),
      action: 'decline',
      reason: 'Away on a course that week',
    });
    expect(declined.status, JSON.stringify(declined.body)).toBe(200);
    await composeNew();
    // Asked of Tom again for the connection; his firm proposes another time, which is refused.
    const third = await pencilIn(ctx.knex, {
      job: 'TW-2415',
      stage: 'electrical_connect',
      resource: 'Tom Ashworth',
      startsAt: '2027-08-24T08:00:00Z',
      endsAt: '2027-08-24T12:00:00Z',
    });
    await send(scheduler, 'post', `/api/bookings/${third.id}/publish`, { version: third.version }).expect(200);
    await composeNew();
    // Not answered in time: the reminder scan (run as if a day later) reminds the electrician.
    expect(await scanOverdueRequests(ctx.knex, { now: new Date(Date.now() + DAY), reminderHours: 1 })).toBeGreaterThan(
      0,
    );
    await composeNew();
    const proposed = await send(partner, 'post', `/api/partner/slots/${third.id}/answer`, {
      version: await versionOf(third.id),
      action: 'propose',
      proposedStart: '2027-08-25T08:00:00Z',
      proposedEnd: '2027-08-25T12:00:00Z',
      reason: 'Wednesday suits the wholesaler delivery',
    });
    expect(proposed.status, JSON.stringify(proposed.body)).toBe(200);
    await composeNew();
    const refused = await send(scheduler, 'post', `/api/bookings/${third.id}/proposal/refuse`, {
      version: await versionOf(third.id),
    });
    expect(refused.status, JSON.stringify(refused.body)).toBe(200);
    await composeNew();
    // A crane asked for TW-2421's lift and confirmed by Fellside: the householder hears the lift day.
    await unbookJobs(ctx.knex, 'TW-2421');
    const lift = await pencilIn(ctx.knex, {
      job: 'TW-2421',
      stage: 'lift',
      resource: '25 t city crane',
      startsAt: '2027-09-07T08:00:00Z',
      endsAt: '2027-09-07T11:00:00Z',
    });
    const craneAsked = await send(scheduler, 'post', `/api/bookings/${lift.id}/publish`, { version: lift.version });
    expect(craneAsked.status, JSON.stringify(craneAsked.body)).toBe(200);
    await composeNew();
    const fellside = await signIn(ctx, account('partner', 'Fellside Crane Hire').email);
    const craneSaid = await send(fellside, 'post', `/api/partner/slots/${lift.id}/answer`, {
      version: await versionOf(lift.id),
      action: 'confirm',
    });
    expect(craneSaid.status, JSON.stringify(craneSaid.body)).toBe(200);
    await composeNew();
    // A new fitter invited; the householder asked for a deposit.
    await send(owner, 'post', '/api/firm/invitations', { email: 'new.hand@tideway.example', role: 'crew' }).expect(201);
    await composeNew();
    const job = await idOf(ctx.knex, 'jobs', { reference: 'TW-2415' });
    const { pricePence } = await ctx.knex('jobs').where('id', job).first('price_pence');
    await send(owner, 'put', `/api/jobs/${job}/price`, { pricePence: 1_450_000, wasPence: pricePence }).expect(200);
    const deposit = await send(owner, 'post', `/api/jobs/${job}/payments/deposit`, { amountPence: 290_000 });
    expect(deposit.status, JSON.stringify(deposit.body)).toBe(201);
    await composeNew();
    // Connor Reid hands an install over this afternoon: the householder gets the pack, then the
    // dates of the service visits the firm's plan books ahead.
    const handedOver = await makeHandoverJob(ctx.knex, {
      reference: 'MW-301',
      startsAt: '2026-06-01T16:00:00Z',
      store,
    });
    const crew = await signIn(ctx, account('crew').email);
    const signed = await send(crew, 'post', `/api/jobs/${handedOver.jobId}/handover`, {
      checklist: { ...ALL_TICKED },
      householderName: 'Ruth Calder',
      householderEmail: 'ruth@calder.example',
      signature: await signaturePng(),
    });
    expect(signed.status, JSON.stringify(signed.body)).toBe(201);
    await composeNew();

    const slips: string[] = [];
    for (const { where, mail } of composed) {
      const m = mail;
      if (m.to.length === 0 || m.to.some((a) => !/^[^@\s]+@[^@\s]+$/.test(a))) slips.push(`${where}: to ${m.to}`);
      if (m.subject.trim() === '') slips.push(`${where}: no subject`);
      if (m.text.trim() === '' || m.html.trim() === '') slips.push(`${where}: a part is empty`);
      for (const [part, body] of [
        ['subject', m.subject],
        ['text', m.text],
        ['html', m.html],
      ] as const) {
        const found = SLIP.exec(body);
        if (found)
          slips.push(
            `${where}: its ${part} says "${found[0]}" (…${body.slice(Math.max(0, found.index - 60), found.index + 20)}…)`,
          );
      }
      for (const a of m.attachments ?? []) {
        if (a.content.length === 0 || SLIP.test(a.filename)) slips.push(`${where}: attachment "${a.filename}"`);
      }
      if (m.ics) {
        const cal = new ICAL.Component(ICAL.parse(m.ics.content));
        if (cal.getFirstPropertyValue('method') !== m.ics.method) slips.push(`${where}: calendar method`);
        const found = SLIP.exec(m.ics.content);
        if (found) slips.push(`${where}: its calendar says "${found[0]}"`);
      }
    }
    // Each kind a day's work sends, composed at its moment.
    expect(new Set(composed.map((c) => c.kind))).toEqual(
      new Set([
        'booking_request',
        'booking_reminder',
        'booking_confirmed',
        'customer_notice',
        'booking_update',
        'booking_cancel',
        'booking_declined',
        'proposal_refused',
        'invitation',
        'payment_request',
        'handover_pack',
        'service_plan_notice',
      ]),
    );
    expect(slips).toEqual([]);
  });
});

describe('whom an e-mail says to ask', () => {
  it('is the installer with its phone, its e-mail where it keeps no phone, and never a name with nothing after its colon', () => {
    const installer = { id: '1', name: 'Tideway Hot Tubs', timeZone: 'Europe/London' };
    expect(questionsTo({ installer: { ...installer, phone: '0113 496 0001', email: 'office@tideway.example' } })).toBe(
      'Tideway Hot Tubs: 0113 496 0001',
    );
    expect(questionsTo({ installer: { ...installer, phone: null, email: 'office@tideway.example' } })).toBe(
      'Tideway Hot Tubs: office@tideway.example',
    );
    expect(questionsTo({ installer: { ...installer, phone: null, email: null } })).toBe('Tideway Hot Tubs');
  });
});
