import Stripe from 'stripe';
import type { Config } from '../config.ts';

/** A checkout session as Waterline uses it. */
export interface CheckoutSession {
  id: string;
  url: string | null;
  status: 'open' | 'complete' | 'expired';
  paid: boolean;
  paymentIntentId: string | null;
  amountPence: number | null;
  currency: string | null;
}

/** A verified webhook event: its id, type and created time (epoch ms), and the session it is about. */
export interface ProviderEvent {
  id: string;
  type: string;
  createdAt: number;
  session: CheckoutSession | null;
}

export class SignatureError extends Error {}

const sessionOf = (s: Stripe.Checkout.Session): CheckoutSession => ({
  id: s.id,
  url: s.url ?? null,
  status: (s.status ?? 'open') as CheckoutSession['status'],
  paid: s.payment_status === 'paid',
  paymentIntentId: typeof s.payment_intent === 'string' ? s.payment_intent : (s.payment_intent?.id ?? null),
  amountPence: s.amount_total ?? null,
  currency: s.currency ?? null,
});

/**
 * The payment provider through its SDK (the `stripe` package): hosted checkout sessions, their
 * status, and signed webhooks. With PAYMENT_SECRET_KEY and PAYMENT_WEBHOOK_SECRET it talks to the
 * provider; with neither (outside production) to the local fake whose address and secrets the
 * stack passes in FAKE_PAYMENTS_* (scripts/fakes/payments.ts), through the SDK's host, port and
 * protocol options. Null when neither is there: payments are not set up.
 */
export class PaymentProvider {
  private constructor(
    private readonly sdk: Stripe,
    private readonly webhookSecret: string,
  ) {}

  static fromConfig(
    config: Pick<
      Config,
      | 'NODE_ENV'
      | 'PAYMENT_SECRET_KEY'
      | 'PAYMENT_WEBHOOK_SECRET'
      | 'FAKE_PAYMENTS_URL'
      | 'FAKE_PAYMENTS_SECRET_KEY'
      | 'FAKE_PAYMENTS_WEBHOOK_SECRET'
    >,
  ): PaymentProvider | null {
    if (config.PAYMENT_SECRET_KEY && config.PAYMENT_WEBHOOK_SECRET) {
      return new PaymentProvider(
        new Stripe(config.PAYMENT_SECRET_KEY, { maxNetworkRetries: 2, timeout: 15_000 }),
        config.PAYMENT_WEBHOOK_SECRET,
      );
    }
    if (
      config.NODE_ENV === 'production' ||
      !config.FAKE_PAYMENTS_URL ||
      !config.FAKE_PAYMENTS_SECRET_KEY ||
      !config.FAKE_PAYMENTS_WEBHOOK_SECRET
    )
      return null;
    const fake = new URL(config.FAKE_PAYMENTS_URL);
    const sdk = new Stripe(config.FAKE_PAYMENTS_SECRET_KEY, {
      host: fake.hostname,
      port: fake.port,
      protocol: fake.protocol === 'https:' ? 'https' : 'http',
      maxNetworkRetries: 1,
      timeout: 5_000,
      telemetry: false,
    });
    return new PaymentProvider(sdk, config.FAKE_PAYMENTS_WEBHOOK_SECRET);
  }

  /** A hosted payment page for one amount; `idempotencyKey` makes a retried create return the same session. */
  async createSession(input: {
    amountPence: number;
    description: string;
    reference: string;
    paymentId: string;
    email: string | null;
    returnUrl: string;
    idempotencyKey: string;
  }): Promise<CheckoutSession> {
    const session = await this.sdk.checkout.sessions.create(
      {
        mode: 'payment',
        line_items: [
          {
            quantity: 1,
            price_data: { currency: 'gbp', unit_amount: input.amountPence, product_data: { name: input.description } },
          },
        ],
        client_reference_id: input.paymentId,
        metadata: { paymentId: input.paymentId, jobReference: input.reference },
        ...(input.email ? { customer_email: input.email } : {}),
        success_url: input.returnUrl,
        cancel_url: input.returnUrl,
      },
      { idempotencyKey: input.idempotencyKey },
    );
    return sessionOf(session);
  }

  async retrieveSession(id: string): Promise<CheckoutSession> {
    return sessionOf(await this.sdk.checkout.sessions.retrieve(id));
  }

  /** Closes an open session so it can no longer be paid; false when it was already paid or closed. */
  async expireSession(id: string): Promise<boolean> {
    try {
      await this.sdk.checkout.sessions.expire(id);
      return true;
    } catch (error) {
      if (error instanceof Stripe.errors.StripeInvalidRequestError) return false;
      throw error;
    }
  }

  /** The event a webhook delivery carries, once its signature and age check out (SignatureError otherwise). */
  verifyEvent(rawBody: Buffer, signature: string | undefined): ProviderEvent {
    let event: Stripe.Event;
    try {
      event = this.sdk.webhooks.constructEvent(rawBody, signature ?? '', this.webhookSecret);
    } catch (error) {
      throw new SignatureError(error instanceof Error ? error.message.slice(0, 200) : 'signature not valid');
    }
    const object = event.data?.object as { object?: string } | undefined;
    return {
      id: event.id,
      type: event.type,
      createdAt: event.created * 1000,
      session: object?.object === 'checkout.session' ? sessionOf(object as Stripe.Checkout.Session) : null,
    };
  }
}
