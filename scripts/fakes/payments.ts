import http from 'node:http';
import type { AddressInfo } from 'node:net';
import { randomBytes } from 'node:crypto';
import express from 'express';
import Stripe from 'stripe';

/**
 * A local stand-in for the few payment-provider endpoints Waterline's SDK calls (the `stripe`
 * package, pointed here with its host/port/protocol options), on 127.0.0.1:
 *
 * - `POST /v1/checkout/sessions` (form-encoded, as the SDK sends it; `Idempotency-Key` honoured, so
 *   a retried create gives the same session) → a session with `url` on this fake's hosted page;
 * - `GET /v1/checkout/sessions/:id` and `POST /v1/checkout/sessions/:id/expire`;
 * - `GET /pay/:id`: the hosted page, whose "Pay" button completes the session, sends the signed
 *   `checkout.session.completed` event and returns the payer to the session's `success_url`; its
 *   "Pay by bank" button completes it unpaid (the money still on its way), to be settled later with
 *   `settleBank`, which sends `checkout.session.async_payment_succeeded` or `…_failed`.
 *
 * Events go to the app that made the session: `/api/payments/webhook` at the origin of its
 * `success_url` (the stand-in for a webhook endpoint set up in the provider's dashboard), signed
 * with `webhookSecret` the way the SDK's `webhooks.constructEvent` checks (`generateTestHeaderString`).
 * Test helpers: `pay(id)` does what the button does; `redeliver(eventId)` sends an event again with
 * a fresh signature; `deliveries` lists what was sent and how the app answered.
 */
export interface FakePayments {
  /** Base URL of the fake (the SDK's host and port are taken from it). */
  url: string;
  /** The API key the fake accepts (`Authorization: Bearer …`). */
  secretKey: string;
  /** The secret events are signed with. */
  webhookSecret: string;
  sessions: Map<string, FakeSession>;
  deliveries: FakeDelivery[];
  /** Completes a session as the hosted page's button does; resolves once the app answered the event. */
  pay(sessionId: string): Promise<FakeDelivery>;
  /** Completes a session by bank payment, unpaid until `settleBank` (the "Pay by bank" button). */
  payByBank(sessionId: string): Promise<FakeDelivery>;
  /** The bank's word on a bank payment days later: the money arrived, or it did not. */
  settleBank(sessionId: string, outcome: 'succeeded' | 'failed'): Promise<FakeDelivery>;
  /** Sends an event again (same id and body, a fresh signature), as the provider retries. */
  redeliver(eventId: string): Promise<FakeDelivery>;
  stop(): Promise<void>;
}

export interface FakeSession {
  id: string;
  object: 'checkout.session';
  amount_total: number;
  currency: string;
  client_reference_id: string | null;
  customer_email: string | null;
  metadata: Record<string, string>;
  mode: 'payment';
  payment_status: 'unpaid' | 'paid';
  status: 'open' | 'complete' | 'expired';
  payment_intent: string | null;
  success_url: string;
  cancel_url: string | null;
  url: string | null;
  created: number;
  expires_at: number;
  livemode: false;
  line_items_name: string;
}

export interface FakeDelivery {
  eventId: string;
  type: string;
  url: string;
  payload: string;
  signature: string;
  status: number;
  body: string;
}

const id = (prefix: string) => `${prefix}_${randomBytes(12).toString('hex')}`;
const esc = (s: unknown) => String(s ?? '').replace(/[&<>"']/g, (c) => `&#${c.charCodeAt(0)};`);
const pounds = (pence: number) => `£${(pence / 100).toFixed(2)}`;

/** The provider's error shape, as the SDK reads it. */
function fail(res: express.Response, status: number, message: string, param?: string) {
  res.status(status).json({
    error: {
      type: status === 401 ? 'authentication_error' : 'invalid_request_error',
      message,
      ...(param ? { param } : {}),
    },
  });
}

export async function startFakePayments(port: number, options: { now?: () => number } = {}): Promise<FakePayments> {
  const now = options.now ?? Date.now;
  const secretKey = `sk_test_local_${randomBytes(12).toString('hex')}`;
  const webhookSecret = `whsec_local_${randomBytes(24).toString('hex')}`;
  const sessions = new Map<string, FakeSession>();
  const byIdempotencyKey = new Map<string, string>();
  const events = new Map<string, { type: string; payload: string; url: string }>();
  const deliveries: FakeDelivery[] = [];
  let base = '';

  const app = express();
  app.use('/v1', express.urlencoded({ extended: true, limit: '64kb' }));
  app.use('/v1', (req, res, next) => {
    if (req.get('authorization') !== `Bearer ${secretKey}`) {
      fail(res, 401, 'Invalid API Key provided.');
      return;
    }
    next();
  });

  const send = async (eventId: string): Promise<FakeDelivery> => {
    const event = events.get(eventId);
    if (!event) throw new Error(`no event ${eventId}`);
    const signature = Stripe.webhooks.generateTestHeaderString({ payload: event.payload, secret: webhookSecret });
    let status = 0;
    let body = '';
    try {
      const res = await fetch(event.url, {
        method: 'POST',
        headers: { 'content-type': 'application/json; charset=utf-8', 'stripe-signature': signature },
        body: event.payload,
      });
      status = res.status;
      body = await res.text();
    } catch (error) {
      body = String(error);
    }
    const delivery = { eventId, type: event.type, url: event.url, payload: event.payload, signature, status, body };
    deliveries.push(delivery);
    return delivery;
  };

  /** Sends a signed event about a session, as the provider does. */
  const tell = (type: string, session: FakeSession): Promise<FakeDelivery> => {
    const eventId = id('evt');
    const payload = JSON.stringify(
      {
        id: eventId,
        object: 'event',
        api_version: null,
        created: Math.floor(now() / 1000),
        livemode: false,
        pending_webhooks: 1,
        request: { id: null, idempotency_key: null },
        type,
        data: { object: { ...session } },
      },
      null,
      2,
    );
    events.set(eventId, { type, payload, url: new URL('/api/payments/webhook', session.success_url).href });
    return send(eventId);
  };

  /** The payer finishes on the page: by card (paid at once) or by bank (paid once the bank settles). */
  const complete = (session: FakeSession, by: 'card' | 'bank' = 'card'): Promise<FakeDelivery> => {
    if (session.status !== 'open') throw new Error(`session ${session.id} is ${session.status}`);
    session.status = 'complete';
    session.payment_status = by === 'card' ? 'paid' : 'unpaid';
    session.payment_intent = id('pi');
    session.url = null;
    return tell('checkout.session.completed', session);
  };

  const settleBank = (session: FakeSession, outcome: 'succeeded' | 'failed'): Promise<FakeDelivery> => {
    if (session.status !== 'complete' || session.payment_status !== 'unpaid')
      throw new Error(`session ${session.id} has no bank payment waiting`);
    if (outcome === 'succeeded') session.payment_status = 'paid';
    return tell(`checkout.session.async_payment_${outcome}`, session);
  };

  app.post('/v1/checkout/sessions', (req, res) => {
    const key = req.get('idempotency-key');
    const earlier = key ? sessions.get(byIdempotencyKey.get(key) ?? '') : undefined;
    if (earlier) {
      res.json(earlier);
      return;
    }
    const body = req.body as Record<string, unknown>;
    const items = Array.isArray(body.line_items)
      ? (body.line_items as {
          price_data?: { currency?: string; unit_amount?: string; product_data?: { name?: string } };
          quantity?: string;
        }[])
      : [];
    const item = items[0];
    const amount = Number(item?.price_data?.unit_amount);
    if (body.mode !== 'payment') {
      fail(res, 400, 'This fake takes mode=payment only.', 'mode');
      return;
    }
    if (items.length !== 1 || Number(item?.quantity) !== 1) {
      fail(res, 400, 'This fake takes one line item of quantity 1.', 'line_items');
      return;
    }
    if (!Number.isInteger(amount) || amount < 30) {
      fail(
        res,
        400,
        'unit_amount must be a whole number of the smallest unit, at least 30.',
        'line_items[0][price_data][unit_amount]',
      );
      return;
    }
    if (typeof item?.price_data?.currency !== 'string') {
      fail(res, 400, 'Missing currency.', 'line_items[0][price_data][currency]');
      return;
    }
    let successUrl: URL;
    try {
      successUrl = new URL(String(body.success_url));
    } catch {
      fail(res, 400, 'Not a valid URL.', 'success_url');
      return;
    }
    const created = Math.floor(now() / 1000);
    const sessionId = id('cs_test');
    const session: FakeSession = {
      id: sessionId,
      object: 'checkout.session',
      amount_total: amount,
      currency: item.price_data.currency,
      client_reference_id: typeof body.client_reference_id === 'string' ? body.client_reference_id : null,
      customer_email: typeof body.customer_email === 'string' ? body.customer_email : null,
      metadata: (body.metadata && typeof body.metadata === 'object' ? body.metadata : {}) as Record<string, string>,
      mode: 'payment',
      payment_status: 'unpaid',
      status: 'open',
      payment_intent: null,
      success_url: successUrl.href,
      cancel_url: typeof body.cancel_url === 'string' ? body.cancel_url : null,
      url: `${base}/pay/${sessionId}`,
      created,
      expires_at: Number(body.expires_at) || created + 24 * 3600,
      livemode: false,
      line_items_name: String(item.price_data.product_data?.name ?? 'Payment'),
    };
    sessions.set(sessionId, session);
    if (key) byIdempotencyKey.set(key, sessionId);
    res.json(session);
  });
  app.get('/v1/checkout/sessions/:id', (req, res) => {
    const session = sessions.get(req.params.id);
    if (!session) {
      fail(res, 404, `No such checkout.session: '${req.params.id}'`, 'session');
      return;
    }
    res.json(session);
  });
  app.post('/v1/checkout/sessions/:id/expire', (req, res) => {
    const session = sessions.get(req.params.id);
    if (!session) {
      fail(res, 404, `No such checkout.session: '${req.params.id}'`, 'session');
      return;
    }
    if (session.status !== 'open') {
      fail(res, 400, `Only open sessions can be expired; this one is ${session.status}.`);
      return;
    }
    session.status = 'expired';
    session.url = null;
    res.json(session);
  });

  // The hosted page: what the householder sees, with a Pay button (no card details: it is a fake).
  app.get('/pay/:id', (req, res) => {
    const session = sessions.get(req.params.id);
    if (!session) {
      res.status(404).type('text/plain').send('No such payment page.');
      return;
    }
    const open = session.status === 'open';
    res.type('html')
      .send(`<!doctype html><html lang="en"><head><meta charset="utf-8"><meta name="viewport" content="width=device-width, initial-scale=1">
<title>Local payment page</title></head><body style="font-family:system-ui,sans-serif;max-width:30rem;margin:2rem auto;padding:0 1rem">
<p style="background:#fff6e0;padding:.5rem">Local stand-in for the payment provider: no money moves.</p>
<h1>${esc(session.line_items_name)}</h1><p style="font-size:1.4rem">${esc(pounds(session.amount_total))}</p>
${
  open
    ? `<form method="post" action="/pay/${esc(session.id)}"><button type="submit" style="font-size:1.2rem;padding:.8rem 2rem">Pay</button>
<button type="submit" name="by" value="bank" style="font-size:1.2rem;padding:.8rem 2rem">Pay by bank (clears in a few days)</button></form>`
    : `<p>This payment is ${esc(session.status === 'complete' ? 'already paid' : 'no longer open')}.</p>`
}
</body></html>`);
  });
  app.post('/pay/:id', express.urlencoded({ extended: false, limit: '1kb' }), async (req, res) => {
    const session = sessions.get(req.params.id);
    if (!session) {
      res.status(404).type('text/plain').send('No such payment page.');
      return;
    }
    if (session.status === 'open')
      await complete(session, (req.body as { by?: string } | undefined)?.by === 'bank' ? 'bank' : 'card');
    res.redirect(303, session.success_url);
  });

  const server = http.createServer(app);
  await new Promise<void>((resolve) => server.listen(port, '127.0.0.1', resolve));
  base = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;
  return {
    url: base,
    secretKey,
    webhookSecret,
    sessions,
    deliveries,
    async pay(sessionId) {
      const session = sessions.get(sessionId);
      if (!session) throw new Error(`no session ${sessionId}`);
      return complete(session);
    },
    async payByBank(sessionId) {
      const session = sessions.get(sessionId);
      if (!session) throw new Error(`no session ${sessionId}`);
      return complete(session, 'bank');
    },
    async settleBank(sessionId, outcome) {
      const session = sessions.get(sessionId);
      if (!session) throw new Error(`no session ${sessionId}`);
      return settleBank(session, outcome);
    },
    redeliver: send,
    stop: () =>
      new Promise((resolve) => {
        server.closeAllConnections();
        server.close(() => resolve());
      }),
  };
}
