import type { Knex } from 'knex';
import type { ComposeDeps, OutboxPayload, OutgoingMail, SkippedMail } from './messages.ts';
import { renderMail } from './layout.ts';
import { HANDOVER_CHECKLIST, HANDOVER_NOTE, WARRANTY_REMINDER } from '../../shared/handover.ts';
import { monthName } from '../../shared/service-plan.ts';
import { loadCertificate } from '../services/certificates.ts';

interface HandoverMailFacts {
  job: { id: string; reference: string; customerName: string; customerEmail: string | null };
  firm: { name: string; phone: string | null };
  handover: { householderName: string; householderEmail: string | null; packFileId: string | null } | null;
  to: string | null;
}

/** The job, its firm and its handover as they are now (the worker reads as the system, not a user). */
async function loadFacts(knex: Knex, jobId: string): Promise<HandoverMailFacts | null> {
  const row = await knex('jobs as j')
    .join('firms as f', 'f.id', 'j.firm_id')
    .leftJoin('handovers as h', 'h.job_id', 'j.id')
    .where('j.id', jobId)
    .first(
      'j.id',
      'j.reference',
      'j.customer_name',
      'j.customer_email',
      'f.name as firm_name',
      'f.phone as firm_phone',
      'h.id as handover_id',
      'h.householder_name',
      'h.householder_email',
      'h.pack_file_id',
    );
  if (!row) return null;
  const handover = row.handoverId
    ? {
        householderName: row.householderName,
        householderEmail: row.householderEmail,
        packFileId: row.packFileId ? String(row.packFileId) : null,
      }
    : null;
  return {
    job: {
      id: String(row.id),
      reference: row.reference,
      customerName: row.customerName,
      customerEmail: row.customerEmail,
    },
    firm: { name: row.firmName, phone: row.firmPhone },
    handover,
    to: handover?.householderEmail ?? row.customerEmail ?? null,
  };
}

async function attachmentOf(
  deps: ComposeDeps,
  fileId: string,
): Promise<{ filename: string; content: Buffer; contentType: string }> {
  if (!deps.store) throw new Error('no file storage to attach from');
  const file = await deps.knex('job_files').where('id', fileId).first('object_key', 'name', 'content_type');
  if (!file) throw new Error(`job file ${fileId} is gone`);
  return { filename: file.name, content: await deps.store.get(file.objectKey), contentType: file.contentType };
}

/**
 * The householder's handover pack: the PDF (commissioning record, certificate, water care, warranty,
 * who to call, their signature) and the electrician's certificate when it is on file.
 */
export async function composeHandoverPack(
  deps: ComposeDeps,
  payload: OutboxPayload,
): Promise<OutgoingMail | SkippedMail> {
  const f = payload.jobId ? await loadFacts(deps.knex, payload.jobId) : null;
  if (!f?.handover) return { skip: 'the handover no longer exists' };
  if (!f.to) return { skip: 'the job has no customer e-mail' };
  if (!f.handover.packFileId) return { skip: 'the handover has no pack' };
  const attachments = [await attachmentOf(deps, f.handover.packFileId)];
  const { certificate } = await loadCertificate(deps.knex, f.job.id);
  if (certificate) attachments.push(await attachmentOf(deps, certificate.fileId));
  const chemicals = HANDOVER_CHECKLIST.find((i) => i.id === 'chemicals')!;
  const { html, text } = renderMail({
    preview: `Your handover pack from ${f.firm.name}: commissioning record, water care and who to call.`,
    title: 'Your hot tub handover pack',
    intro: [
      `Hello ${f.handover.householderName},`,
      `Thank you for your time at the handover of job ${f.job.reference}. Your pack is attached as a PDF: keep it with your receipt.`,
    ],
    sections: [
      {
        heading: 'In the pack',
        lines: [
          'The commissioning record, with the water readings and their ranges',
          'The electrical certificate (attached too, when the electrician has sent it)',
          'Looking after the water, with the chemical-safety cautions',
          'What we went through with you, and your signature',
        ],
      },
      { heading: 'Register your warranty', lines: [WARRANTY_REMINDER] },
      {
        heading: 'Who to call',
        lines: [
          `${f.firm.name}${f.firm.phone ? `: ${f.firm.phone}` : ''}`,
          'In an emergency switch the spa off at the isolator, then call.',
        ],
      },
    ],
    cautions: { heading: 'Chemical safety', lines: [...chemicals.cautions], footnote: HANDOVER_NOTE },
    footer: [`Sent by Waterline for ${f.firm.name}.`],
  });
  return { to: [f.to], subject: `Your hot tub handover pack (${f.job.reference})`, html, text, attachments };
}

/** The householder hears which months the firm plans to come back for a service. */
export async function composeServicePlanNotice(
  deps: ComposeDeps,
  payload: OutboxPayload,
): Promise<OutgoingMail | SkippedMail> {
  const f = payload.jobId ? await loadFacts(deps.knex, payload.jobId) : null;
  if (!f?.handover) return { skip: 'the handover no longer exists' };
  if (!f.to) return { skip: 'the job has no customer e-mail' };
  const visits = (await deps
    .knex('jobs')
    .where({ parent_job_id: f.job.id, kind: 'service' })
    .whereNot('status', 'cancelled')
    .orderBy('service_due_on')
    .select('reference', 'service_due_on')) as { reference: string; serviceDueOn: string }[];
  if (!visits.length) return { skip: 'no service visits are planned' };
  const { html, text } = renderMail({
    preview: `${f.firm.name} plans to service your hot tub in ${monthName(visits[0]!.serviceDueOn)}.`,
    title: 'Your service visits',
    intro: [
      `Hello ${f.handover.householderName},`,
      `${f.firm.name} looks after the hot tub it installed (job ${f.job.reference}) with regular service visits. These are planned:`,
    ],
    sections: [
      { heading: 'Planned visits', lines: visits.map((v) => `${monthName(v.serviceDueOn)} (${v.reference})`) },
      {
        heading: 'What happens next',
        lines: [`${f.firm.name} will be in touch a few weeks before each visit to agree a day.`],
      },
      { heading: 'Questions', lines: [`${f.firm.name}${f.firm.phone ? `: ${f.firm.phone}` : ''}`] },
    ],
    footer: [`Sent by Waterline for ${f.firm.name}.`],
  });
  return { to: [f.to], subject: `Your service visits (${f.job.reference})`, html, text };
}
