import type { Knex } from 'knex';
import { startOfLocalDay } from '../shared/local-dates.ts';

const HOUR = 3_600_000;

/**
 * Money in the demo (invented prices): the first two of Tideway's ordered jobs paid a quarter of
 * their price as the deposit on the day they were ordered (the order date comes from that payment),
 * and the job just surveyed has its deposit asked for yesterday, not yet paid.
 */
export async function seedDemoPayments(
  trx: Knex.Transaction,
  input: { firmId: string; requestedBy: string; today: number; requestedReference: string },
): Promise<void> {
  const ordered = await trx('jobs')
    .where('firm_id', input.firmId)
    .whereNotNull('ordered_on')
    .orderBy('reference')
    .limit(2)
    .select('id', 'ordered_on');
  const prices = [1_249_500, 985_000];
  for (const [n, job] of ordered.entries()) {
    const price = prices[n]!;
    const paidAt = new Date(startOfLocalDay(job.orderedOn, 'Europe/London') + 10 * HOUR);
    await trx('jobs').where('id', job.id).update({ price_pence: price });
    await trx('job_payments').insert({
      job_id: job.id,
      kind: 'deposit',
      amount_pence: Math.round(price / 4),
      status: 'paid',
      requested_by: input.requestedBy,
      requested_at: new Date(paidAt.getTime() - 26 * HOUR),
      paid_at: paidAt,
      closed_at: paidAt,
      checkout_session_id: `cs_demo_${String(job.id)}`,
      payment_intent_id: `pi_demo_${String(job.id)}`,
    });
  }
  const waiting = await trx('jobs').where({ firm_id: input.firmId, reference: input.requestedReference }).first('id');
  if (!waiting) return;
  await trx('jobs').where('id', waiting.id).update({ price_pence: 1_120_000 });
  await trx('job_payments').insert({
    job_id: waiting.id,
    kind: 'deposit',
    amount_pence: 280_000,
    status: 'requested',
    requested_by: input.requestedBy,
    requested_at: new Date(input.today - 24 * HOUR),
  });
}
