import type { Knex } from 'knex';
import { HttpError } from '../errors.ts';
import { commissioningGapsOf } from './commissioning.ts';
import { certificateGapsOf } from './certificates.ts';

/** A stage that may not be marked done yet: 409 listing, in plain words, what is missing. */
export class StageNotReadyError extends HttpError {
  constructor(
    code: 'commissioning-incomplete' | 'commissioning-not-done' | 'certificate-missing' | 'handover-unsigned',
    title: string,
    stageName: string,
    readonly missing: string[],
  ) {
    super(409, code, title, `'${stageName}' can't be marked done yet. ${missing.join(' ')}`, { missing });
  }
}

const COMMISSION_NOT_DONE =
  'Commissioning is not marked done yet: the spa is handed over working, so finish the commissioning record and mark Commission done first.';

/**
 * Whether every commission stage of a job is done: booked, and each of its standing bookings
 * marked done (whose own gate asked for a complete record). A job without one needs none.
 */
async function commissioningDone(trx: Knex | Knex.Transaction, jobId: string): Promise<boolean> {
  const stages = await trx('stages as s')
    .leftJoin('bookings as b', function standing() {
      this.on('b.stage_id', 's.id').andOnVal('b.state', '<>', 'declined');
    })
    .where({ 's.job_id': jobId, 's.kind': 'commission' })
    .groupBy('s.id')
    .select(
      's.id',
      trx.raw('count(b.id)::int as booked'),
      trx.raw("count(*) filter (where b.state = 'done')::int as done"),
    );
  return stages.every((s: { booked: number; done: number }) => s.booked > 0 && s.done === s.booked);
}

/**
 * What a job still needs before the householder signs its handover, in plain words (empty when
 * ready): its commissioning done, and the electrical certificate (or the office's reason to hand
 * over without it). The handover page shows the same list before anyone signs, so a householder is
 * never asked to sign for a handover the gate then refuses.
 */
export async function handoverGaps(trx: Knex | Knex.Transaction, jobId: string): Promise<string[]> {
  return [
    ...((await commissioningDone(trx, jobId)) ? [] : [COMMISSION_NOT_DONE]),
    ...(await certificateGapsOf(trx, jobId)),
  ];
}

/**
 * What a stage needs before its booking may be marked done, asked by the write path's progress step
 * (BookingWork, action `finish`) so every route that marks done meets it:
 * - commissioning: the record complete (every check ticked, readings in range or explained, a photo);
 * - handover: the job's commissioning done (the spa is handed over working); the electrical
 *   certificate uploaded, or the office's reason for handing over without it, on a job with an
 *   electrical connection stage; and the householder's signed handover (the page that signs it also
 *   e-mails the pack, asks for the balance and plans the service visits, which a bare "Done" would skip).
 */
export async function checkStageFinish(trx: Knex.Transaction, stageId: string): Promise<void> {
  const stage = await trx('stages').where('id', stageId).first('kind', 'name', 'job_id');
  if (!stage) return;
  const jobId = String(stage.jobId);
  if (stage.kind === 'commission') {
    const missing = await commissioningGapsOf(trx, jobId);
    if (missing.length)
      throw new StageNotReadyError('commissioning-incomplete', 'Commissioning is not complete', stage.name, missing);
  }
  if (stage.kind === 'handover') {
    if (!(await commissioningDone(trx, jobId)))
      throw new StageNotReadyError('commissioning-not-done', 'Commissioning is not done', stage.name, [
        COMMISSION_NOT_DONE,
      ]);
    const missing = await certificateGapsOf(trx, jobId);
    if (missing.length)
      throw new StageNotReadyError('certificate-missing', 'The electrical certificate is missing', stage.name, missing);
    const signed = await trx('handovers').where('job_id', jobId).first('id');
    if (!signed) {
      throw new StageNotReadyError('handover-unsigned', 'The householder has not signed the handover', stage.name, [
        'The householder has not signed the handover: open Hand over on the phone, go through the checklist with them and ask them to sign.',
      ]);
    }
  }
}
