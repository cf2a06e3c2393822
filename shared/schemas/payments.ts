import { z } from 'zod';
import { requiredAs } from './common.ts';
import './messages.ts';

/** The most one request may ask for: £100,000 (a swim spa with groundworks stays well below it). Our own ceiling, no source. */
export const MAX_PENCE = 10_000_000;

/** An amount of money in whole pence: a positive integer, never a float of pounds. */
export const Pence = z
  .number({ message: 'must be a whole number of pence, e.g. 50000 for £500.00' })
  .int('must be a whole number of pence, e.g. 50000 for £500.00')
  .positive('must be more than 0')
  .max(MAX_PENCE, `must be at most ${MAX_PENCE} pence (£100,000.00)`);

export const PAYMENT_KINDS = ['deposit', 'balance'] as const;
export type PaymentKind = (typeof PAYMENT_KINDS)[number];
export const PaymentKindParam = z.enum(PAYMENT_KINDS, { message: 'must be deposit or balance' });

export const PAYMENT_STATUSES = ['requested', 'paid', 'cancelled', 'failed'] as const;
export type PaymentStatus = (typeof PAYMENT_STATUSES)[number];

/** Asking the householder for money: the amount, or (left out) what the job's price and the firm's deposit percentage come to. */
export const RequestPayment = z.object({ amountPence: Pence.optional() }).strict();
export type RequestPayment = z.infer<typeof RequestPayment>;

/**
 * The job's agreed price (what the deposit and balance add up to), and the price the change was
 * based on (null: the job had none): a price changed meanwhile by someone else is not overwritten.
 */
export const SetPrice = z
  .object({
    pricePence: Pence,
    wasPence: z
      .number(requiredAs('the price you saw, or null when the job had none'))
      .int('must be a whole number of pence')
      .nullable(),
  })
  .strict();
export type SetPrice = z.infer<typeof SetPrice>;

/** One payment as the office sees it. */
export interface PaymentView {
  id: string;
  kind: PaymentKind;
  amountPence: number;
  status: PaymentStatus;
  requestedAt: string;
  paidAt: string | null;
  /** The local date it was paid on, in the firm's zone. */
  paidOn: string | null;
  /** The local date a request was withdrawn or its bank payment failed, in the firm's zone. */
  closedOn: string | null;
  /** The householder's link, while the request is open. */
  link: string | null;
}

/** What GET /api/jobs/:id/payments returns. */
export interface JobPayments {
  jobId: string;
  pricePence: number | null;
  depositPercent: number;
  /** The deposit the price and the percentage suggest (null without a price). */
  suggestedDepositPence: number | null;
  payments: PaymentView[];
  paidPence: number;
  /** Price less what was paid (null without a price). */
  duePence: number | null;
  orderedOn: string | null;
  hasCustomerEmail: boolean;
  /** False when no payment provider is set up (production without keys). */
  providerReady: boolean;
}
