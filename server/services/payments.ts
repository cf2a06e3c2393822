import { createHmac, timingSafeEqual } from 'node:crypto';
import type { Knex } from 'knex';
import type { Logger } from 'pino';
import type { Config } from '../config.ts';
import { Job } from '../models/index.ts';
import { findVisible } from './scope.ts';
import type { Actor } from './actor.ts';
import { recordChange } from './audit.ts';
import { enqueueMessage } from './outbox.ts';
import { notifyJobChange } from './board-stream.ts';
import { PaymentProvider, SignatureError, type CheckoutSession, type ProviderEvent } from './payment-provider.ts';
import { BadRequestError, ConflictError, HttpError } from '../errors.ts';
import { localDateOf } from '../../shared/local-dates.ts';
import { depositOf } from '../../shared/money.ts';
import type { JobPayments, PaymentKind, PaymentStatus, PaymentView, SetPrice } from '../../shared/schemas/payments.ts';

/** A job_payments row (camelCase through knex's mapping). */
export interface PaymentRow {
  id: string;
  jobId: string;
  kind: PaymentKind;
  amountPence: number;
  currency: string;
  status: PaymentStatus;
  checkoutSessionId: string | null;
  paymentIntentId: string | null;
  requestedAt: Date;
  requestedBy: string | null;
  paidAt: Date | null;
  closedAt: Date | null;
}

/** The usual deposit when the firm has not set its own: a quarter of the price (our own default, no source). */
export const DEFAULT_DEPOSIT_PERCENT = 25;

const KIND_WORDS: Record<PaymentKind, string> = { deposit: 'Deposit', balance: 'Balance' };

export class PaymentsUnavailableError extends HttpError {
  constructor(detail = 'Payments are not set up on this installation.') {
    super(503, 'payments-unavailable', 'Payments are not set up or not answering', detail);
  }
}

/** The householder's link to a payment: the payment's id and an HMAC of it under the link secret. */
export function paymentToken(secret: string, paymentId: string): string {
  return `${paymentId}.${createHmac('sha256', secret).update(`waterline-payment-link:${paymentId}`).digest('base64url').slice(0, 32)}`;
}

/** The payment id of a good token, or null. */
export function paymentIdOfToken(secret: string, token: string): string | null {
  const m = /^([1-9][0-9]{0,17})\.([\w-]{32})$/.exec(token);
  if (!m) return null;
  const expected = Buffer.from(paymentToken(secret, m[1]!));
  const given = Buffer.from(token);
  return expected.length === given.length && timingSafeEqual(expected, given) ? m[1]! : null;
}

export const paymentLink = (config: Pick<Config, 'PUBLIC_URL' | 'LINK_SECRET'>, paymentId: string) =>
  `${config.PUBLIC_URL}/pay/${paymentToken(config.LINK_SECRET, paymentId)}`;

async function lockJob(
  trx: Knex.Transaction,
  jobId: string,
): Promise<{
  id: string;
  firmId: string;
  reference: string;
  pricePence: number | null;
  orderedOn: string | null;
  customerEmail: string | null;
}> {
  return trx('jobs')
    .where('id', jobId)
    .forUpdate()
    .first('id', 'firm_id', 'reference', 'price_pence', 'ordered_on', 'customer_email');
}

const snapshot = (p: PaymentRow) => ({
  kind: p.kind,
  amountPence: p.amountPence,
  status: p.status,
  checkoutSessionId: p.checkoutSessionId,
  paidAt: p.paidAt,
});

/**
 * Writes a request for money inside the caller's transaction (job row locked, so two requests at
 * once queue behind each other), queues the householder's e-mail and audits it. A second open or
 * paid request of the same kind is refused by the caller; the partial unique indexes refuse it anyway.
 */
async function insertRequest(
  trx: Knex.Transaction,
  actor: Actor,
  jobId: string,
  kind: PaymentKind,
  amountPence: number,
): Promise<PaymentRow> {
  const [row] = (await trx('job_payments')
    .insert({ job_id: jobId, kind, amount_pence: amountPence, requested_by: actor.userId })
    .returning('*')) as PaymentRow[];
  await enqueueMessage(trx, `payment.${row!.id}.request`, 'payment_request', { paymentId: String(row!.id) });
  await recordChange(trx, actor, 'payment', String(row!.id), 'create', null, snapshot(row!));
  return row!;
}

async function livePayment(
  trx: Knex.Transaction | Knex,
  jobId: string,
  kind: PaymentKind,
): Promise<PaymentRow | undefined> {
  return trx('job_payments')
    .where({ job_id: jobId, kind })
    .whereIn('status', ['requested', 'paid'])
    .orderBy('id', 'desc')
    .first() as Promise<PaymentRow | undefined>;
}

/**
 * Asks the householder for the balance (the handover flow calls this inside its transaction):
 * `amountPence`, or the job's price less the deposit paid. Calling it again while a balance is
 * requested or paid returns that one (`created: false`), so nothing is ever asked for twice.
 * Null when there is nothing to ask for (no price recorded, or nothing left to pay).
 */
export async function requestBalance({
  actor,
  trx,
  jobId,
  amountPence,
}: {
  actor: Actor;
  trx: Knex.Transaction;
  jobId: string;
  amountPence?: number;
}): Promise<{ payment: PaymentRow; created: boolean } | null> {
  await findVisible(Job, actor, jobId, trx, 'job');
  const job = await lockJob(trx, jobId);
  const live = await livePayment(trx, jobId, 'balance');
  if (live) return { payment: live, created: false };
  let amount = amountPence;
  if (amount === undefined) {
    if (!job.pricePence) return null;
    const paid = await trx('job_payments')
      .where({ job_id: jobId, kind: 'deposit', status: 'paid' })
      .sum<{ sum: string | null }[]>('amount_pence as sum');
    amount = job.pricePence - Number(paid[0]?.sum ?? 0);
    if (amount <= 0) return null;
  }
  return { payment: await insertRequest(trx, actor, jobId, 'balance', amount), created: true };
}

/** What a webhook did; each delivery is logged in webhook_events with it. */
export interface WebhookResult {
  outcome: 'applied' | 'ignored' | 'replayed';
  detail: string;
}

/**
 * Deposits and balances: the office asks, the householder pays on the provider's hosted page, and
 * the provider's signed webhook records it. A paid deposit is the order: it sets the job's order
 * date (the firm's local date of the payment) unless an earlier one is recorded, which starts the
 * maker's lead time the engine checks on the delivery.
 */
export class PaymentsService {
  readonly provider: PaymentProvider | null;

  constructor(
    private readonly knex: Knex,
    private readonly config: Config,
    private readonly now: () => number = Date.now,
    private readonly log?: Logger,
  ) {
    this.provider = PaymentProvider.fromConfig(config);
  }

  async summary(actor: Actor, jobId: string): Promise<JobPayments> {
    await findVisible(Job, actor, jobId, undefined, 'job');
    const job = await this.knex('jobs as j')
      .join('firms as f', 'f.id', 'j.firm_id')
      .leftJoin('firm_settings as s', 's.firm_id', 'j.firm_id')
      .where('j.id', jobId)
      .first('j.price_pence', 'j.ordered_on', 'j.customer_email', 'f.time_zone', 's.deposit_percent');
    const rows = (await this.knex('job_payments').where('job_id', jobId).orderBy('id')) as PaymentRow[];
    const percent = job.depositPercent ?? DEFAULT_DEPOSIT_PERCENT;
    const paidPence = rows.filter((r) => r.status === 'paid').reduce((sum, r) => sum + r.amountPence, 0);
    const payments: PaymentView[] = rows.map((r) => ({
      id: String(r.id),
      kind: r.kind,
      amountPence: r.amountPence,
      status: r.status,
      requestedAt: r.requestedAt.toISOString(),
      paidAt: r.paidAt?.toISOString() ?? null,
      paidOn: r.paidAt ? localDateOf(r.paidAt, job.timeZone) : null,
      closedOn: r.closedAt && r.status !== 'paid' ? localDateOf(r.closedAt, job.timeZone) : null,
      link: r.status === 'requested' ? paymentLink(this.config, String(r.id)) : null,
    }));
    return {
      jobId,
      pricePence: job.pricePence ?? null,
      depositPercent: percent,
      suggestedDepositPence: job.pricePence ? depositOf(job.pricePence, percent) : null,
      payments,
      paidPence,
      duePence: job.pricePence ? job.pricePence - paidPence : null,
      orderedOn: job.orderedOn ?? null,
      hasCustomerEmail: Boolean(job.customerEmail),
      providerReady: this.provider !== null,
    };
  }

  /** Sets the job's price; refused, with the price as it stands, when it is no longer `wasPence`. */
  async setPrice(actor: Actor, jobId: string, { pricePence, wasPence }: SetPrice): Promise<JobPayments> {
    await this.knex.transaction(async (trx) => {
      await findVisible(Job, actor, jobId, trx, 'job');
      const job = await lockJob(trx, jobId);
      if ((job.pricePence ?? null) !== wasPence) {
        throw new ConflictError('Someone else changed the price since you loaded it: check it before saving yours.', {
          code: 'stale-version',
          current: { pricePence: job.pricePence ?? null },
        });
      }
      await trx('jobs').where('id', jobId).update({ price_pence: pricePence });
      await recordChange(trx, actor, 'job', jobId, 'update', { pricePence: job.pricePence }, { pricePence });
    });
    return this.summary(actor, jobId);
  }

  async requestDeposit(actor: Actor, jobId: string, amountPence?: number): Promise<JobPayments> {
    if (!this.provider) throw new PaymentsUnavailableError();
    await this.knex.transaction(async (trx) => {
      await findVisible(Job, actor, jobId, trx, 'job');
      const job = await lockJob(trx, jobId);
      const live = await livePayment(trx, jobId, 'deposit');
      if (live)
        throw new ConflictError(
          live.status === 'paid'
            ? 'The deposit for this job is already paid.'
            : 'A deposit request for this job is already open; cancel it first to ask for a different amount.',
          { code: 'payment-open' },
        );
      let amount = amountPence;
      if (amount === undefined) {
        if (!job.pricePence)
          throw new BadRequestError("Give the deposit amount, or record the job's price first.", [
            { field: 'amountPence', message: 'is needed while the job has no price' },
          ]);
        const settings = await trx('firm_settings').where('firm_id', job.firmId).first('deposit_percent');
        amount = depositOf(job.pricePence, settings?.depositPercent ?? DEFAULT_DEPOSIT_PERCENT);
      }
      if (job.pricePence && amount > job.pricePence)
        throw new BadRequestError("The deposit is more than the job's price.", [
          { field: 'amountPence', message: "must not be more than the job's price" },
        ]);
      await insertRequest(trx, actor, jobId, 'deposit', amount);
    });
    return this.summary(actor, jobId);
  }

  async requestBalanceAsOffice(actor: Actor, jobId: string, amountPence?: number): Promise<JobPayments> {
    if (!this.provider) throw new PaymentsUnavailableError();
    await this.knex.transaction(async (trx) => {
      const result = await requestBalance({ actor, trx, jobId, amountPence });
      if (!result)
        throw new BadRequestError("Nothing is left to ask for: record the job's price, or give the amount.", [
          { field: 'amountPence', message: 'is needed while the job has no price or nothing is due' },
        ]);
      if (!result.created)
        throw new ConflictError(
          result.payment.status === 'paid'
            ? 'The balance for this job is already paid.'
            : 'A balance request for this job is already open.',
          { code: 'payment-open' },
        );
    });
    return this.summary(actor, jobId);
  }

  /** Withdraws an open request; its payment page is closed first, so it cannot be paid afterwards. */
  async cancel(actor: Actor, jobId: string, kind: PaymentKind): Promise<JobPayments> {
    await this.knex.transaction(async (trx) => {
      await findVisible(Job, actor, jobId, trx, 'job');
      await lockJob(trx, jobId);
      const open = (await trx('job_payments')
        .where({ job_id: jobId, kind, status: 'requested' })
        .forUpdate()
        .first()) as PaymentRow | undefined;
      if (!open) throw new ConflictError(`No ${kind} request of this job is open.`);
      if (open.checkoutSessionId) {
        if (!this.provider) throw new PaymentsUnavailableError();
        const closed = await this.callProvider(() => this.provider!.expireSession(open.checkoutSessionId!));
        if (!closed) {
          const session = await this.callProvider(() => this.provider!.retrieveSession(open.checkoutSessionId!));
          if (session.paid) throw new ConflictError('The householder has just paid this request; reload to see it.');
        }
      }
      const [after] = (await trx('job_payments')
        .where('id', open.id)
        .update({ status: 'cancelled', closed_at: new Date(this.now()) })
        .returning('*')) as PaymentRow[];
      await recordChange(trx, actor, 'payment', String(open.id), 'update', snapshot(open), snapshot(after!));
    });
    return this.summary(actor, jobId);
  }

  private async callProvider<T>(call: () => Promise<T>): Promise<T> {
    try {
      return await call();
    } catch (error) {
      this.log?.warn({ err: error instanceof Error ? error.message : String(error) }, 'payment provider call failed');
      throw new PaymentsUnavailableError(
        'The payment provider is not answering. Nothing was charged; try again in a few minutes.',
      );
    }
  }

  /**
   * The householder opened the link: where to send them. An open request gets its provider
   * session (made now, or the one made before while it is still open; the row is locked meanwhile,
   * so two opens at once share one session); a paid one, withdrawn one or unknown link gets a page.
   */
  async openLink(token: string): Promise<
    | { redirect: string }
    | {
        state: 'paid' | 'closed' | 'failed' | 'unknown' | 'confirming';
        payment?: {
          amountPence: number;
          kind: PaymentKind;
          firmName: string;
          reference: string;
          paidOn: string | null;
        };
      }
  > {
    const paymentId = paymentIdOfToken(this.config.LINK_SECRET, token);
    if (!paymentId) return { state: 'unknown' };
    return this.knex.transaction(async (trx) => {
      const row = (await trx('job_payments as p')
        .join('jobs as j', 'j.id', 'p.job_id')
        .join('firms as f', 'f.id', 'j.firm_id')
        .where('p.id', paymentId)
        .forUpdate('p')
        .first('p.*', 'j.reference', 'j.customer_email', 'f.name as firm_name', 'f.time_zone')) as
        | (PaymentRow & { reference: string; customerEmail: string | null; firmName: string; timeZone: string })
        | undefined;
      if (!row) return { state: 'unknown' as const };
      const payment = {
        amountPence: row.amountPence,
        kind: row.kind,
        firmName: row.firmName,
        reference: row.reference,
        paidOn: row.paidAt ? localDateOf(row.paidAt, row.timeZone) : null,
      };
      if (row.status === 'paid') return { state: 'paid' as const, payment };
      if (row.status === 'failed') return { state: 'failed' as const, payment };
      if (row.status !== 'requested') return { state: 'closed' as const, payment };
      if (!this.provider) throw new PaymentsUnavailableError();
      let session: CheckoutSession | null = row.checkoutSessionId
        ? await this.callProvider(() => this.provider!.retrieveSession(row.checkoutSessionId!))
        : null;
      // Paid, or finished with the money still on its way (a bank payment): never a second page to pay on.
      if (session?.paid || session?.status === 'complete') return { state: 'confirming' as const, payment };
      if (!session || session.status !== 'open' || !session.url) {
        const previous = row.checkoutSessionId ?? 'none';
        session = await this.callProvider(() =>
          this.provider!.createSession({
            amountPence: row.amountPence,
            description: `${KIND_WORDS[row.kind]} for job ${row.reference}, ${row.firmName}`,
            reference: row.reference,
            paymentId,
            email: row.customerEmail,
            returnUrl: paymentLink(this.config, paymentId),
            idempotencyKey: `waterline-payment-${paymentId}-after-${previous}`,
          }),
        );
        await trx('job_payments').where('id', paymentId).update({ checkout_session_id: session.id });
      }
      return { redirect: session.url! };
    });
  }

  /**
   * A webhook delivery from the provider. The signature is checked first (SignatureError → 400,
   * logged as refused); then the event id is recorded once, so a replay changes nothing (200).
   */
  async handleWebhook(rawBody: Buffer, signature: string | undefined): Promise<WebhookResult> {
    if (!this.provider) throw new PaymentsUnavailableError();
    let event: ProviderEvent;
    try {
      event = this.provider.verifyEvent(rawBody, signature);
    } catch (error) {
      if (!(error instanceof SignatureError)) throw error;
      await this.knex('webhook_events').insert({
        outcome: 'refused',
        detail: `signature: ${error.message}`.slice(0, 300),
        received_at: new Date(this.now()),
      });
      this.log?.warn({ reason: error.message }, 'payment webhook refused: bad signature');
      throw new HttpError(
        400,
        'bad-signature',
        'The webhook signature is not valid',
        'Refused and logged; nothing changed.',
      );
    }
    return this.knex.transaction(async (trx) => {
      const [logged] = await trx('webhook_events')
        .insert({
          provider_event_id: event.id,
          type: event.type,
          outcome: 'ignored',
          received_at: new Date(this.now()),
        })
        .onConflict('provider_event_id')
        .ignore()
        .returning('id');
      if (!logged) return { outcome: 'replayed' as const, detail: 'this event was received before' };
      const result = await this.apply(trx, event);
      await trx('webhook_events')
        .where('id', logged.id)
        .update({ outcome: result.outcome, detail: result.detail, payment_id: result.paymentId ?? null });
      if (result.outcome !== 'applied')
        this.log?.info({ eventId: event.id, type: event.type, detail: result.detail }, 'payment webhook ignored');
      return { outcome: result.outcome, detail: result.detail };
    });
  }

  private async apply(
    trx: Knex.Transaction,
    event: ProviderEvent,
  ): Promise<{ outcome: 'applied' | 'ignored'; detail: string; paymentId?: string }> {
    const session = event.session;
    if (!session) return { outcome: 'ignored', detail: `not about a checkout session (${event.type})` };
    const found = (await trx('job_payments').where('checkout_session_id', session.id).first('id', 'job_id')) as
      { id: string; jobId: string } | undefined;
    if (!found) return { outcome: 'ignored', detail: 'no payment of ours has this session' };
    // The job first, then the payment: the same order as the office's requests, so they never wait on each other in a circle.
    const job = await lockJob(trx, String(found.jobId));
    const payment = (await trx('job_payments').where('id', found.id).forUpdate().first()) as PaymentRow;
    const paymentId = String(payment.id);
    if (event.type === 'checkout.session.expired') {
      if (payment.status === 'requested' && payment.checkoutSessionId === session.id) {
        // The link stays good: the next open makes a new session.
        await trx('job_payments').where('id', paymentId).update({ checkout_session_id: null });
        return { outcome: 'applied', detail: 'session expired; the link will open a new one', paymentId };
      }
      return { outcome: 'ignored', detail: 'session expired after the payment was closed', paymentId };
    }
    if (event.type === 'checkout.session.async_payment_failed')
      return this.bankPaymentFailed(trx, job, payment, session);
    if (event.type !== 'checkout.session.completed' && event.type !== 'checkout.session.async_payment_succeeded')
      return { outcome: 'ignored', detail: `not handled (${event.type})`, paymentId };
    if (!session.paid) return { outcome: 'ignored', detail: 'completed but not paid yet', paymentId };
    if (payment.status === 'paid') return { outcome: 'ignored', detail: 'already recorded as paid', paymentId };
    if (session.amountPence !== payment.amountPence || session.currency !== 'gbp') {
      this.log?.error({ paymentId, session: session.id }, 'payment webhook amount differs from the request');
      return {
        outcome: 'ignored',
        detail: `amount ${session.amountPence} ${session.currency} differs from the request (${payment.amountPence} gbp)`,
        paymentId,
      };
    }
    if (payment.status !== 'requested') {
      this.log?.error({ paymentId, session: session.id }, 'money arrived for a withdrawn request: refund it');
      return { outcome: 'ignored', detail: `paid after the request was ${payment.status}: refund due`, paymentId };
    }
    const paidAt = new Date(event.createdAt);
    const [after] = (await trx('job_payments')
      .where('id', paymentId)
      .update({ status: 'paid', paid_at: paidAt, payment_intent_id: session.paymentIntentId, closed_at: paidAt })
      .returning('*')) as PaymentRow[];
    await recordChange(
      trx,
      null,
      'payment',
      paymentId,
      'update',
      snapshot(payment),
      snapshot(after!),
      String(job.firmId),
    );
    if (payment.kind === 'deposit') {
      const firm = await trx('firms').where('id', job.firmId).first('time_zone');
      const paidOn = localDateOf(paidAt, firm.timeZone);
      if (!job.orderedOn || job.orderedOn > paidOn) {
        await trx('jobs').where('id', job.id).update({ ordered_on: paidOn });
        await recordChange(
          trx,
          null,
          'job',
          String(job.id),
          'update',
          { orderedOn: job.orderedOn },
          { orderedOn: paidOn, because: `deposit ${paymentId} paid` },
          String(job.firmId),
        );
        await notifyJobChange(trx, String(job.id));
      }
    }
    return { outcome: 'applied', detail: `${payment.kind} paid`, paymentId };
  }

  /**
   * A bank payment the householder started on the link did not go through (days later, the
   * provider says so). The request closes as failed, so the office sees it on the job and can ask
   * again (a fresh e-mail and link); the board hears of the change. Only the request's own session
   * counts: a late word about an old session changes nothing.
   */
  private async bankPaymentFailed(
    trx: Knex.Transaction,
    job: { id: string; firmId: string },
    payment: PaymentRow,
    session: CheckoutSession,
  ): Promise<{ outcome: 'applied' | 'ignored'; detail: string; paymentId: string }> {
    const paymentId = String(payment.id);
    if (payment.status !== 'requested' || payment.checkoutSessionId !== session.id)
      return { outcome: 'ignored', detail: `bank payment failed, but the request is ${payment.status}`, paymentId };
    const [after] = (await trx('job_payments')
      .where('id', paymentId)
      .update({ status: 'failed', closed_at: new Date(this.now()) })
      .returning('*')) as PaymentRow[];
    await recordChange(
      trx,
      null,
      'payment',
      paymentId,
      'update',
      snapshot(payment),
      snapshot(after!),
      String(job.firmId),
    );
    await notifyJobChange(trx, String(job.id));
    return { outcome: 'applied', detail: `${payment.kind} bank payment failed; ask again`, paymentId };
  }
}
