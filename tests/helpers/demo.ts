import type { Knex } from 'knex';

/**
 * The demo scenario plans every job but the newest few (seeds/demo.ts). A test that books a job's
 * stages at dates of its own starts by taking that job's bookings off, so its stages wait in the
 * tray as a new job's would. Their requests and answers go with them.
 *
 * @example
 * await unbookJobs(ctx.knex, 'TW-2417', 'TW-2421')
 */
export async function unbookJobs(knex: Knex, ...references: string[]): Promise<void> {
  await knex('bookings')
    .whereIn(
      'stage_id',
      knex('stages').join('jobs', 'jobs.id', 'stages.job_id').whereIn('jobs.reference', references).select('stages.id'),
    )
    .delete();
}

/**
 * Takes a demo job back to an enquiry: nothing booked, no survey on file.
 *
 * @example
 * await backToEnquiry(ctx.knex, 'TW-2421')
 */
export async function backToEnquiry(knex: Knex, reference: string): Promise<void> {
  await unbookJobs(knex, reference);
  const job = knex('jobs').where('reference', reference).select('id');
  await knex('surveys').whereIn('job_id', job).delete();
  await knex('jobs').where('reference', reference).update({ status: 'enquiry', ordered_on: null });
}
