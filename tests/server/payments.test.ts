import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import net from 'node:net';
import type { Server } from 'node:http';
import request from 'supertest';
import { account, idOf, signIn, startTestApp, type Agent, type TestContext } from '../helpers/server.ts';
import { backToEnquiry } from '../helpers/demo.ts';
import { startFakePayments, type FakePayments } from '../../scripts/fakes/payments.ts';
import { requestBalance } from '../../server/services/payments.ts';
import type { Actor } from '../../server/services/actor.ts';
import { composeMessage } from '../../server/mail/messages.ts';

/**
 * Deposits and balances end to end: the office asks, the app makes the checkout session through
 * the provider's SDK on the local fake, the householder pays on the fake's page, and the fake's
 * signed webhook reaches the app listening on loopback. The fake's clock says the money arrived on
 * Monday 1 June 2026, 10:00 BST (the test's today).
 */
let ctx: TestContext;
let fake: FakePayments;
let server: Server;
let scheduler: Agent;
let job: string;
let other: string;
const PAID_AT = Date.parse('2026-06-01T09:00:00Z');

async function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const s = net.createServer();
    s.once('error', reject);
    s.listen(0, '127.0.0.1', () => {
      const { port } = s.address() as net.AddressInfo;
      s.close(() => resolve(port));
    });
  });
}

beforeAll(async () => {
  fake = await startFakePayments(0, { now: () => PAID_AT });
  const port = await freePort();
  ctx = await startTestApp({
    PUBLIC_URL: `http://127.0.0.1:${port}`,
    FAKE_PAYMENTS_URL: fake.url,
    FAKE_PAYMENTS_SECRET_KEY: fake.secretKey,
    FAKE_PAYMENTS_WEBHOOK_SECRET: fake.webhookSecret,
  });
  server = await new Promise((resolve) => {
    const s = ctx.waterline.app.listen(port, '127.0.0.1', () => resolve(s));
  });
  scheduler = await signIn(ctx, account('scheduler').email);
  // TW-2418 back to an enquiry, for an invented swim spa whose maker needs 35 working days from the order.
  await backToEnquiry(ctx.knex, 'TW-2418');
  job = await idOf(ctx.knex, 'jobs', { reference: 'TW-2418' });
  other = await idOf(ctx.knex, 'jobs', { reference: 'TW-2419' });
  const tideway = await idOf(ctx.knex, 'firms', { name: 'Tideway Hot Tubs' });
  const [unit] = await ctx
    .knex('units')
    .insert({
      firm_id: tideway,
      model: 'Tarn 5 swim spa',
      maker: 'Harbourline Works',
      length_mm: 5000,
      width_mm: 2300,
      height_mm: 1500,
      dry_weight_kg: 1900,
      filled_weight_kg: 10500,
      water_litres: 8500,
      supplies: JSON.stringify([{ amps: 32 }, { amps: 32 }]),
      maker_lead_days: 35,
    })
    .returning('id');
  await ctx.knex('jobs').where('id', job).update({ unit_id: unit.id, installation_type: 'slab' });
  await post(`/api/jobs/${job}/plan`).expect(201);
});
afterAll(async () => {
  server?.closeAllConnections();
  await new Promise((r) => server?.close(r));
  await ctx?.close();
  await fake?.stop();
});

const post = (path: string, body: object = {}, agent: Agent = scheduler) =>
  agent.post(path).set('X-CSRF-Token', agent.csrf).send(body);
const put = (path: string, body: object, agent: Agent = scheduler) =>
  agent.put(path).set('X-CSRF-Token', agent.csrf).send(body);
const paymentsOf = (jobId: string) => ctx.knex('job_payments').where('job_id', jobId).orderBy('id');
const count = async (table: string, where: Record<string, unknown>) =>
  Number((await ctx.knex(table).where(where).count<{ count: string }[]>('* as count'))[0]!.count);

/** Opens the householder's link as a browser would, then presses Pay on the fake's page. */
async function payThroughLink(link: string): Promise<{ sessionId: string; eventId: string }> {
  const opened = await request(ctx.waterline.app).get(new URL(link).pathname).expect(303);
  const page = String(opened.headers.location);
  expect(page.startsWith(`${fake.url}/pay/cs_test_`)).toBe(true);
  const before = fake.deliveries.length;
  const paid = await fetch(page, { method: 'POST', redirect: 'manual' });
  expect(paid.status).toBe(303);
  expect(paid.headers.get('location')).toBe(link);
  const delivery = fake.deliveries[before]!;
  expect({ status: delivery.status, body: JSON.parse(delivery.body) }).toEqual({
    status: 200,
    body: { outcome: 'applied', detail: expect.stringMatching(/paid$/) },
  });
  return { sessionId: page.split('/').pop()!, eventId: delivery.eventId };
}

describe('a deposit paid through the provider', () => {
  let eventId = '';

  it("is asked for from the price and the firm's 25 %, e-mailed to the householder, with a link to copy", async () => {
    await put(`/api/jobs/${job}/price`, { pricePence: 1_000_000, wasPence: null }).expect(200);
    const res = await post(`/api/jobs/${job}/payments/deposit`).expect(201);
    expect(res.body.payments).toHaveLength(1);
    expect(res.body.payments[0]).toMatchObject({
      kind: 'deposit',
      amountPence: 250_000,
      status: 'requested',
      paidAt: null,
    });
    expect(res.body.payments[0].link).toMatch(
      new RegExp(`^http://127\\.0\\.0\\.1:\\d+/pay/${res.body.payments[0].id}\\.[\\w-]{32}$`),
    );
    expect(res.body).toMatchObject({ pricePence: 1_000_000, paidPence: 0, duePence: 1_000_000, orderedOn: null });
    const mail = await ctx.knex('outbox').where('kind', 'payment_request').first('payload');
    expect(mail.payload).toEqual({ paymentId: res.body.payments[0].id });
    const composed = await composeMessage({ knex: ctx.knex, config: ctx.config }, 'payment_request', mail.payload);
    expect(composed).toMatchObject({
      to: [(await ctx.knex('jobs').where('id', job).first('customer_email')).customerEmail],
      subject: 'Deposit for job TW-2418: £2,500.00',
    });
    expect((composed as { text: string }).text).toContain(res.body.payments[0].link);
  });

  it('sets the order date when the signed webhook says it was paid, and audits it', async () => {
    const link = (await scheduler.get(`/api/jobs/${job}/payments`).expect(200)).body.payments[0].link as string;
    ({ eventId } = await payThroughLink(link));
    const [payment] = await paymentsOf(job);
    expect(payment).toMatchObject({ status: 'paid', amountPence: 250_000, paidAt: new Date(PAID_AT) });
    expect(payment.paymentIntentId).toMatch(/^pi_/);
    expect((await ctx.knex('jobs').where('id', job).first('ordered_on')).orderedOn).toBe('2026-06-01');
    const audit = await ctx
      .knex('audit_log')
      .where({ entity: 'job', entity_id: job })
      .whereRaw("jsonb_exists(after, 'orderedOn')")
      .select('before', 'after', 'actor_user_id');
    expect(audit).toEqual([
      {
        before: { orderedOn: null },
        after: { orderedOn: '2026-06-01', because: `deposit ${payment.id} paid` },
        actorUserId: null,
      },
    ]);
    const summary = (await scheduler.get(`/api/jobs/${job}/payments`).expect(200)).body;
    expect(summary).toMatchObject({ paidPence: 250_000, duePence: 750_000, orderedOn: '2026-06-01' });
    expect(summary.payments[0]).toMatchObject({ status: 'paid', paidOn: '2026-06-01', link: null });
    // The link now says it is paid, and makes no new payment page.
    const sessions = fake.sessions.size;
    const again = await request(ctx.waterline.app).get(new URL(link).pathname).expect(200);
    expect(again.text).toContain('Paid, thank you');
    expect(fake.sessions.size).toBe(sessions);
  });

  it("has the engine refuse a delivery before the maker's 35 working days from that order date (422), and take one after", async () => {
    const delivery = String((await ctx.knex('stages').where({ job_id: job, kind: 'delivery' }).first('id')).id);
    const lorry = await idOf(ctx.knex, 'resources', { name: '18 t lorry with loader crane' });
    // Fri 17 July 2026 14:00 BST: 34 working days after Mon 1 June, a day short (same figures as the stage-notice test).
    const early = await post('/api/bookings', {
      stageId: delivery,
      resourceId: lorry,
      startsAt: '2026-07-17T13:00:00Z',
    }).expect(422);
    expect(
      early.body.violations
        .filter((v: { kind: string }) => v.kind === 'lead_time')
        .map((v: { message: string }) => v.message),
    ).toEqual([
      "'Delivery' needs 35 working days' notice from the order date (the maker's lead time): the earliest start is Mon 20 Jul 08:00",
    ]);
    const later = await post('/api/bookings', {
      stageId: delivery,
      resourceId: lorry,
      startsAt: '2026-09-07T08:00:00Z',
    });
    expect(later.status, JSON.stringify(later.body)).toBe(201);
  });

  it('has no second effect when the same event comes again', async () => {
    const audits = await count('audit_log', { entity: 'payment' });
    const replay = await fake.redeliver(eventId);
    expect({ status: replay.status, body: JSON.parse(replay.body) }).toEqual({
      status: 200,
      body: { outcome: 'replayed', detail: 'this event was received before' },
    });
    expect((await paymentsOf(job)).map((p) => p.status)).toEqual(['paid']);
    expect(await count('audit_log', { entity: 'payment' })).toBe(audits);
    expect(await count('webhook_events', { provider_event_id: eventId })).toBe(1);
  });

  it('refuses a webhook whose signature does not match (400 problem+json), logs it, and changes nothing', async () => {
    const sent = fake.deliveries.find((d) => d.eventId === eventId)!;
    const forged = sent.payload.replace('"id": "evt_', '"id": "evt_forged');
    const res = await request(ctx.waterline.app)
      .post('/api/payments/webhook')
      .set('content-type', 'application/json')
      .set('stripe-signature', sent.signature)
      .send(forged);
    expect(res.status).toBe(400);
    expect(res.headers['content-type']).toMatch(/application\/problem\+json/);
    expect(res.body.type).toMatch(/\/problems\/bad-signature$/);
    const unsigned = await request(ctx.waterline.app)
      .post('/api/payments/webhook')
      .set('content-type', 'application/json')
      .send(sent.payload);
    expect(unsigned.status).toBe(400);
    const refused = await ctx.knex('webhook_events').where('outcome', 'refused').select('provider_event_id', 'detail');
    expect(refused).toHaveLength(2);
    expect(refused.every((r) => r.providerEventId === null && /^signature: /.test(r.detail))).toBe(true);
    expect(await count('webhook_events', { outcome: 'applied' })).toBe(1);
  });

  it('refuses a second deposit once one is paid (409)', async () => {
    const res = await post(`/api/jobs/${job}/payments/deposit`, { amountPence: 1000 }).expect(409);
    expect(res.body.detail).toBe('The deposit for this job is already paid.');
  });

  it('asks for the balance at handover: the price less the deposit, once', async () => {
    const sam = await idOf(ctx.knex, 'users', { email: account('scheduler').email });
    const actor: Actor = {
      userId: sam,
      firmId: await idOf(ctx.knex, 'firms', { name: 'Tideway Hot Tubs' }),
      firmKind: 'installer',
      role: 'scheduler',
    };
    const first = await ctx.knex.transaction((trx) => requestBalance({ actor, trx, jobId: job }));
    expect(first).toMatchObject({
      created: true,
      payment: { kind: 'balance', amountPence: 750_000, status: 'requested' },
    });
    const second = await ctx.knex.transaction((trx) => requestBalance({ actor, trx, jobId: job }));
    expect(second).toMatchObject({ created: false, payment: { id: first!.payment.id } });
    expect((await paymentsOf(job)).map((p) => `${p.kind}:${p.status}`)).toEqual(['deposit:paid', 'balance:requested']);
    await post(`/api/jobs/${job}/payments/balance`).expect(409);
  });
});

describe('requests the office cannot make', () => {
  it('a second deposit request while one is open: 409, also when two arrive at once', async () => {
    const [a, b] = await Promise.all([
      post(`/api/jobs/${other}/payments/deposit`, { amountPence: 50_000 }),
      post(`/api/jobs/${other}/payments/deposit`, { amountPence: 50_000 }),
    ]);
    expect([a.status, b.status].sort()).toEqual([201, 409]);
    expect((a.status === 409 ? a : b).body.detail).toMatch(/already open/);
    expect((await paymentsOf(other)).map((p) => p.status)).toEqual(['requested']);
    // Withdrawn, it may be asked for again (the open session, if any, is closed first).
    await post(`/api/jobs/${other}/payments/deposit/cancel`).expect(200);
    await post(`/api/jobs/${other}/payments/deposit`, { amountPence: 60_000 }).expect(201);
    expect((await paymentsOf(other)).map((p) => `${p.status}:${p.amountPence}`)).toEqual([
      'cancelled:50000',
      'requested:60000',
    ]);
  });

  it('a price changed meanwhile is never overwritten: two at once, one wins; the other gets 409 with the price as it stands', async () => {
    const was = (await scheduler.get(`/api/jobs/${other}/payments`).expect(200)).body.pricePence;
    const [a, b] = await Promise.all([
      put(`/api/jobs/${other}/price`, { pricePence: 1_100_000, wasPence: was }),
      put(`/api/jobs/${other}/price`, { pricePence: 1_250_000, wasPence: was }),
    ]);
    expect([a.status, b.status].sort()).toEqual([200, 409]);
    const [won, lost] = a.status === 200 ? [a, b] : [b, a];
    expect(lost.body).toMatchObject({
      code: 'stale-version',
      detail: 'Someone else changed the price since you loaded it: check it before saving yours.',
      current: { pricePence: won.body.pricePence },
    });
    expect((await scheduler.get(`/api/jobs/${other}/payments`).expect(200)).body.pricePence).toBe(won.body.pricePence);
    // From the price now shown, the change goes through.
    await put(`/api/jobs/${other}/price`, { pricePence: 1_200_000, wasPence: won.body.pricePence }).expect(200);
  });

  it('amounts must be whole positive pence: 400 naming amountPence', async () => {
    for (const amountPence of [12.5, 0, -100, '5000', 10_000_001, null]) {
      const res = await post(`/api/jobs/${job}/payments/balance`, { amountPence });
      expect(res.status, JSON.stringify(amountPence)).toBe(400);
      expect(res.body.errors.map((e: { field: string }) => e.field)).toEqual(['amountPence']);
    }
    const price = await put(`/api/jobs/${job}/price`, { pricePence: 99.99 }).expect(400);
    expect(price.body.errors).toEqual([
      { field: 'pricePence', message: 'must be a whole number of pence, e.g. 50000 for £500.00' },
      { field: 'wasPence', message: 'is required: the price you saw, or null when the job had none' },
    ]);
  });

  it("another firm's job: 404, never data", async () => {
    const mv = await idOf(ctx.knex, 'jobs', { reference: 'MV-118' });
    await scheduler.get(`/api/jobs/${mv}/payments`).expect(404);
    await post(`/api/jobs/${mv}/payments/deposit`, { amountPence: 100 }).expect(404);
    await put(`/api/jobs/${mv}/price`, { pricePence: 100, wasPence: null }).expect(404);
    expect(await paymentsOf(mv)).toEqual([]);
  });

  it('crew and partners never see or ask for money (403)', async () => {
    for (const who of [account('crew'), account('partner', 'Brightspark Electrical')]) {
      const agent = await signIn(ctx, who.email);
      await agent.get(`/api/jobs/${job}/payments`).expect(403);
      await post(`/api/jobs/${other}/payments/deposit`, { amountPence: 100 }, agent).expect(403);
    }
    const viewer = await signIn(ctx, account('viewer').email);
    await viewer.get(`/api/jobs/${job}/payments`).expect(200);
    await post(`/api/jobs/${other}/payments/deposit/cancel`, {}, viewer).expect(403);
  });

  it('a link with a wrong signature opens nothing', async () => {
    const [open] = await paymentsOf(other).where('status', 'requested');
    const sessions = fake.sessions.size;
    const res = await request(ctx.waterline.app)
      .get(`/pay/${open.id}.${'A'.repeat(32)}`)
      .expect(404);
    expect(res.text).toContain('This payment link is not valid');
    expect(fake.sessions.size).toBe(sessions);
  });
});

describe('a deposit paid by bank, which clears days later or not at all', () => {
  /** Asks for a deposit on `reference` and has the householder pay it by bank on the fake's page. */
  async function bankPaid(reference: string): Promise<{ jobId: string; sessionId: string; link: string }> {
    const jobId = await idOf(ctx.knex, 'jobs', { reference });
    const asked = await post(`/api/jobs/${jobId}/payments/deposit`, { amountPence: 40_000 }).expect(201);
    const link = asked.body.payments.at(-1).link as string;
    const page = String((await request(ctx.waterline.app).get(new URL(link).pathname).expect(303)).headers.location);
    const sessionId = page.split('/').pop()!;
    const before = fake.deliveries.length;
    const done = await fetch(page, {
      method: 'POST',
      redirect: 'manual',
      headers: { 'content-type': 'application/x-www-form-urlencoded' },
      body: 'by=bank',
    });
    expect(done.status).toBe(303);
    expect(JSON.parse(fake.deliveries[before]!.body)).toEqual({
      outcome: 'ignored',
      detail: 'completed but not paid yet',
    });
    // The householder's link says the money is on its way, not that it arrived.
    const waiting = await request(ctx.waterline.app).get(new URL(link).pathname).expect(200);
    expect(waiting.text).toContain('is on its way');
    return { jobId, sessionId, link };
  }

  it('a failed bank payment closes the request as failed, audited, the link says so, and the office may ask again', async () => {
    const { jobId, sessionId, link } = await bankPaid('TW-2420');
    expect((await paymentsOf(jobId)).map((p) => p.status)).toEqual(['requested']);
    const orderedOn = (await ctx.knex('jobs').where('id', jobId).first('ordered_on')).orderedOn;
    const audits = await count('audit_log', { entity: 'payment' });
    const failed = await fake.settleBank(sessionId, 'failed');
    expect({ status: failed.status, body: JSON.parse(failed.body) }).toEqual({
      status: 200,
      body: { outcome: 'applied', detail: 'deposit bank payment failed; ask again' },
    });
    const summary = (await scheduler.get(`/api/jobs/${jobId}/payments`).expect(200)).body;
    expect(summary.payments).toEqual([
      expect.objectContaining({ status: 'failed', closedOn: '2026-06-01', paidOn: null, link: null }),
    ]);
    expect(summary).toMatchObject({ paidPence: 0, orderedOn });
    expect(await count('audit_log', { entity: 'payment' })).toBe(audits + 1);
    const page = await request(ctx.waterline.app).get(new URL(link).pathname).expect(410);
    expect(page.text).toContain('Your bank payment did not go through');
    // The same word again changes nothing; a new request goes out.
    const replay = await fake.redeliver(failed.eventId);
    expect(JSON.parse(replay.body).outcome).toBe('replayed');
    await post(`/api/jobs/${jobId}/payments/deposit`, { amountPence: 40_000 }).expect(201);
    expect((await paymentsOf(jobId)).map((p) => p.status)).toEqual(['failed', 'requested']);
  });

  it('a bank payment that clears is paid on the day the bank said so, and sets the order date', async () => {
    const { jobId, sessionId } = await bankPaid('TW-2421');
    const cleared = await fake.settleBank(sessionId, 'succeeded');
    expect(JSON.parse(cleared.body)).toEqual({ outcome: 'applied', detail: 'deposit paid' });
    expect((await paymentsOf(jobId)).map((p) => `${p.status}:${p.amountPence}`)).toEqual(['paid:40000']);
    expect((await ctx.knex('jobs').where('id', jobId).first('ordered_on')).orderedOn).toBe('2026-06-01');
  });
});

describe("the firm's own deposit percentage", () => {
  it('the owner sets it on the firm settings; the next deposit is asked for from it', async () => {
    const owner = await signIn(ctx, account('owner').email);
    for (const depositPercent of [0, 101, 12.5, '30']) {
      const res = await put('/api/firm/settings', { depositPercent, depositPercentWas: 25 }, owner).expect(400);
      expect(res.body.errors).toEqual([
        { field: 'depositPercent', message: 'must be a whole percentage from 1 to 100' },
      ]);
    }
    await put('/api/firm/settings', { depositPercent: 30, depositPercentWas: 25 }).expect(403);
    expect((await put('/api/firm/settings', { depositPercent: 30 }, owner).expect(400)).body.errors).toEqual([
      {
        field: 'depositPercentWas',
        message: 'is required when changing the deposit percentage: the percentage you loaded',
      },
    ]);
    expect(
      (await put('/api/firm/settings', { depositPercent: 30, depositPercentWas: 25 }, owner).expect(200)).body
        .depositPercent,
    ).toBe(30);
    try {
      // A Tideway job nobody has asked money for yet.
      const { id: jobId } = await ctx
        .knex('jobs')
        .where('reference', 'like', 'TW-%')
        .whereNotExists(ctx.knex('job_payments').whereRaw('job_payments.job_id = jobs.id'))
        .orderBy('reference')
        .first('id');
      await put(`/api/jobs/${jobId}/price`, { pricePence: 820_000, wasPence: null }).expect(200);
      const asked = (await post(`/api/jobs/${jobId}/payments/deposit`).expect(201)).body;
      // 30 % of £8,200.00 = £2,460.00.
      expect(asked).toMatchObject({ depositPercent: 30, suggestedDepositPence: 246_000 });
      expect(asked.payments.at(-1)).toMatchObject({ kind: 'deposit', amountPence: 246_000 });
      const audit = await ctx
        .knex('audit_log')
        .where({ entity: 'firm_settings' })
        .orderBy('id', 'desc')
        .first('before', 'after');
      // Tideway had no settings of its own: the first save makes them.
      expect([audit.before, audit.after.depositPercent]).toEqual([null, 30]);
      // Crew read the firm's settings (quantities, cure) but never money.
      const crew = await signIn(ctx, account('crew').email);
      expect((await crew.get('/api/firm/settings').expect(200)).body).not.toHaveProperty('depositPercent');
    } finally {
      await put('/api/firm/settings', { depositPercent: 25, depositPercentWas: 30 }, owner).expect(200);
    }
  });

  it('a save based on a percentage someone else has changed since is refused, not typed over theirs', async () => {
    const owner = await signIn(ctx, account('owner').email);
    // Two tabs load 25 %; the first saves 30 %.
    await put('/api/firm/settings', { depositPercent: 30, depositPercentWas: 25 }, owner).expect(200);
    try {
      const stale = await put('/api/firm/settings', { depositPercent: 20, depositPercentWas: 25 }, owner).expect(409);
      expect(stale.body).toMatchObject({
        code: 'stale-version',
        field: 'depositPercentWas',
        detail: 'Someone else set the deposit to 30 % since you loaded it: reload to see it before changing it.',
        current: { depositPercent: 30 },
      });
      expect((await owner.get('/api/firm/settings').expect(200)).body.depositPercent).toBe(30);
      // Saving what it already is changes nothing and is no conflict.
      await put('/api/firm/settings', { depositPercent: 30, depositPercentWas: 25 }, owner).expect(200);
    } finally {
      await put('/api/firm/settings', { depositPercent: 25, depositPercentWas: 30 }, owner).expect(200);
    }
  });
});
