import { escapeHtml as e, page } from './page.ts';
import { formatPence } from '../../shared/money.ts';
import type { PaymentKind } from '../../shared/schemas/payments.ts';

export interface PaymentFacts {
  amountPence: number;
  kind: PaymentKind;
  firmName: string;
  reference: string;
  paidOn: string | null;
}

const what = (p: PaymentFacts) =>
  `${p.kind === 'deposit' ? 'deposit' : 'balance'} of ${formatPence(p.amountPence)} for job ${e(p.reference)}`;

/** The pages behind a householder's payment link, for whatever state the request is in. */
export function paymentPage(
  state: 'paid' | 'closed' | 'failed' | 'unknown' | 'confirming' | 'unavailable',
  p?: PaymentFacts,
): { status: number; html: string } {
  switch (state) {
    case 'paid':
      return {
        status: 200,
        html: page(
          'Paid, thank you',
          `<p>${e(p!.firmName)} has received the ${what(p!)}${p!.paidOn ? ` (paid on ${e(p!.paidOn)})` : ''}.</p><p>You have nothing more to pay for this request.</p>`,
          'ok',
        ),
      };
    case 'confirming':
      return {
        status: 200,
        html: page(
          'Payment received',
          `<p>Your payment of the ${what(p!)} is on its way. ${e(p!.firmName)} is told as soon as it clears; you need do nothing more.</p>`,
          'ok',
        ),
      };
    case 'failed':
      return {
        status: 410,
        html: page(
          'Your bank payment did not go through',
          `<p>The bank payment of the ${what(p!)} did not go through, so nothing was taken. ${e(p!.firmName)} has been told and will send you a new request.</p>`,
          'warn',
        ),
      };
    case 'closed':
      return {
        status: 410,
        html: page(
          'This request was withdrawn',
          `<p>${e(p!.firmName)} withdrew this request for the ${what(p!)}. Nothing was charged. Please ask them if you expected to pay.</p>`,
          'warn',
        ),
      };
    case 'unavailable':
      return {
        status: 503,
        html: page(
          'The payment page could not be opened',
          '<p>The payment service is not answering just now. Nothing was charged; please try the link again in a few minutes.</p>',
          'warn',
        ),
      };
    default:
      return {
        status: 404,
        html: page(
          'This payment link is not valid',
          '<p>Check that the whole link was copied from the e-mail, or ask the installer to send it again.</p>',
          'refused',
        ),
      };
  }
}
