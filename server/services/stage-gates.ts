import type { Knex } from 'knex';
import { HttpError } from '../errors.ts';
import { commissioningGapsOf } from './commissioning.ts';
import { certificateGapsOf } from './certificates.ts';

/** A stage that may not be marked done yet: 409 listing, in plain words, what is missing. */
export class StageNotReadyError extends HttpError {
  constructor(
    code: 'commissioning-incomplete' | 'certificate-missing' | 'handover-unsigned',
    title: string,
    stageName: string,
    readonly missing: string[],
  ) {
    super(409, code, title, `'${stageName}' can't be marked done yet. ${missing.join(' ')}`, { missing });
  }
}

/**
 * What a stage needs before its booking may be marked done, asked by the write path's progress step
 * (BookingWork, action `finish`) so every route that marks done meets it:
 * - commissioning: the record complete (every check ticked, readings in range or explained, a photo);
 * - handover: the electrical certificate uploaded, or the office's reason for handing over without it,
 *   on a job with an electrical connection stage; and the householder's signed handover (the page that
 *   signs it also e-mails the pack, asks for the balance and plans the service visits, which a bare
 *   "Done" would skip).
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
