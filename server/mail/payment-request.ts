import { renderMail, type MailContent } from './layout.ts';
import type { ComposeDeps, OutboxPayload, OutgoingMail, SkippedMail } from './messages.ts';
import { paymentLink } from '../services/payments.ts';
import { formatPence } from '../../shared/money.ts';

/**
 * The householder's request for a deposit or the balance: the amount, what it is for, and a button
 * to the payment link (our own address, which opens the provider's payment page while the request
 * is open). Skipped once the request was paid or withdrawn, or when the job has no e-mail address
 * (the office copies the link from the job page instead).
 */
export async function composePaymentRequest(
  deps: ComposeDeps,
  payload: OutboxPayload,
): Promise<OutgoingMail | SkippedMail> {
  const row = payload.paymentId
    ? await deps
        .knex('job_payments as p')
        .join('jobs as j', 'j.id', 'p.job_id')
        .join('firms as f', 'f.id', 'j.firm_id')
        .where('p.id', payload.paymentId)
        .first(
          'p.id',
          'p.kind',
          'p.amount_pence',
          'p.status',
          'j.reference',
          'j.customer_name',
          'j.customer_email',
          'j.site_address',
          'j.site_town',
          'f.name as firm_name',
          'f.phone as firm_phone',
        )
    : null;
  if (!row) return { skip: 'the payment request no longer exists' };
  if (row.status !== 'requested') return { skip: `the request is ${row.status}` };
  if (!row.customerEmail) return { skip: 'the job has no customer e-mail' };
  const amount = formatPence(row.amountPence);
  const what = row.kind === 'deposit' ? 'deposit' : 'balance';
  const content: MailContent = {
    preview: `${row.firmName} asks for the ${what} of ${amount} for job ${row.reference}`,
    title: row.kind === 'deposit' ? `Your deposit: ${amount}` : `The balance for your installation: ${amount}`,
    intro: [
      `Hello ${row.customerName},`,
      row.kind === 'deposit'
        ? `${row.firmName} asks for a deposit of ${amount} for your installation (job ${row.reference}). Your unit is ordered from the maker once it is paid, and the maker's lead time counts from then.`
        : `Thank you for choosing ${row.firmName}. The balance of ${amount} for your installation (job ${row.reference}) is now due.`,
    ],
    sections: [
      { heading: 'Amount', lines: [amount] },
      { heading: 'For', lines: [`Job ${row.reference}`, `${row.siteAddress}, ${row.siteTown}`] },
      { heading: 'Questions', lines: [`${row.firmName}${row.firmPhone ? `: ${row.firmPhone}` : ''}`] },
    ],
    buttons: [{ label: `Pay ${amount}`, href: paymentLink(deps.config, String(row.id)) }],
    footer: [
      `Sent by Waterline for ${row.firmName}. The button opens a secure payment page; the link stops working once paid or withdrawn.`,
    ],
  };
  const { html, text } = renderMail(content);
  return {
    to: [row.customerEmail],
    subject: `${row.kind === 'deposit' ? 'Deposit' : 'Balance'} for job ${row.reference}: ${amount}`,
    html,
    text,
  };
}
