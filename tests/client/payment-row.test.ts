import { describe, expect, it } from 'vitest';
import PaymentRow from '@/components/job-detail/PaymentRow.vue';
import type { PaymentView } from '@shared/schemas/payments';
import { renderHtml } from './render';

// 1 June 2026 is a Monday (the tests' today).
const deposit = (over: Partial<PaymentView>): PaymentView => ({
  id: '7',
  kind: 'deposit',
  amountPence: 40_000,
  status: 'requested',
  requestedAt: '2026-06-01T09:00:00Z',
  paidAt: null,
  paidOn: null,
  closedOn: null,
  link: null,
  ...over,
});
const row = (current: PaymentView) =>
  renderHtml(PaymentRow, { kind: 'deposit', current, suggestedPence: 40_000, canWrite: true, busy: false });

describe("a payment's line on the job page", () => {
  it('says a bank payment failed, on which day, and offers to ask again', async () => {
    const html = await row(deposit({ status: 'failed', closedOn: '2026-06-04' }));
    expect(html).toContain('Bank payment failed Thu 4 Jun 2026: ask again');
    expect(html).toContain('Ask for the deposit');
  });

  it('says a withdrawn request was withdrawn (not that it waits to be paid)', async () => {
    const html = await row(deposit({ status: 'cancelled', closedOn: '2026-06-02' }));
    expect(html).toContain('Withdrawn Tue 2 Jun 2026');
    expect(html).not.toContain('not paid yet');
  });

  it('an open request waits to be paid, with its link to copy and no second request', async () => {
    const html = await row(deposit({ link: 'http://127.0.0.1/pay/7.x' }));
    expect(html).toContain('Asked for, not paid yet');
    expect(html).toContain('Copy the payment link');
    expect(html).not.toContain('Ask for the deposit');
  });
});
