import type { Knex } from 'knex';
import PDFDocument from 'pdfkit';
import sharp from 'sharp';
import { idOf } from './server.ts';
import type { ObjectStore } from '../../server/storage/object-store.ts';

/** A small PDF standing in for the electrician's certificate (an invented certificate number). */
export function certificatePdf(text = 'Electrical installation certificate EIC-7731'): Promise<Buffer> {
  const doc = new PDFDocument({ size: 'A4' });
  const chunks: Buffer[] = [];
  doc.on('data', (c: Buffer) => chunks.push(c));
  const done = new Promise<Buffer>((resolve) => doc.on('end', () => resolve(Buffer.concat(chunks))));
  doc.text(text);
  doc.end();
  return done;
}

/** A signature as the pad sends it: a transparent PNG with a dark stroke across it (or nothing, `blank`). */
export async function signaturePng(blank = false): Promise<string> {
  const stroke = blank
    ? ''
    : '<path d="M20 70 C 60 10, 100 110, 140 50 S 220 30, 260 80" stroke="#1d2730" stroke-width="4" fill="none"/>';
  const png = await sharp(
    Buffer.from(`<svg xmlns="http://www.w3.org/2000/svg" width="300" height="120">${stroke}</svg>`),
  )
    .png()
    .toBuffer();
  return `data:image/png;base64,${png.toString('base64')}`;
}

export interface HandoverFixture {
  jobId: string;
  stage: Record<string, string>;
  handoverBookingId: string;
}

/**
 * A Tideway install ready for its handover (invented householder and site): the connection and
 * commissioning done, a complete commissioning record (pH 7.4, alkalinity 100 ppm, free chlorine
 * 3.5 ppm, one photo), and the handover (and, unless `commissionDone` is false, the commission)
 * booked on Connor Reid's own row at `startsAt`. With `store`, the electrician's certificate is on file.
 */
export async function makeHandoverJob(
  knex: Knex,
  input: { reference: string; startsAt: string; store?: ObjectStore; commissionDone?: boolean; record?: boolean },
): Promise<HandoverFixture> {
  const firmId = await idOf(knex, 'firms', { name: 'Tideway Hot Tubs' });
  const [job] = await knex('jobs')
    .insert({
      firm_id: firmId,
      reference: input.reference,
      customer_name: 'Ruth Calder',
      customer_phone: '07700 900612',
      customer_email: 'ruth@calder.example',
      site_address: '14 Mill Lane',
      site_town: 'Otley',
      site_postcode: 'LS21 1AA',
      installation_type: 'slab',
      status: 'in_progress',
      unit_id: await idOf(knex, 'units', { model: 'Brook 4' }),
    })
    .returning('id');
  const jobId = String(job.id);
  const stage: Record<string, string> = {};
  const kinds: [string, string, number, string][] = [
    ['electrical_connect', 'Connect and certify', 240, 'electrician'],
    ['commission', 'Commission', 180, 'install_crew'],
    ['handover', 'Handover', 60, 'install_crew'],
  ];
  for (const [n, [kind, name, minutes, need]] of kinds.entries()) {
    const [row] = await knex('stages')
      .insert({
        job_id: jobId,
        kind,
        name,
        sequence: n + 1,
        duration_minutes: minutes,
        requirements: JSON.stringify([{ kind: need, count: 1 }]),
      })
      .returning('id');
    stage[kind] = String(row.id);
  }
  const connor = await idOf(knex, 'resources', { name: 'Connor Reid' });
  const start = Date.parse(input.startsAt);
  const at = (minutes: number) => new Date(start + minutes * 60_000).toISOString();
  if (input.commissionDone !== false) {
    await knex('bookings').insert({
      stage_id: stage.commission,
      resource_id: connor,
      starts_at: at(-240),
      ends_at: at(-60),
      state: 'done',
    });
  } else {
    await knex('bookings').insert({
      stage_id: stage.commission,
      resource_id: connor,
      starts_at: at(-240),
      ends_at: at(-60),
      state: 'confirmed',
    });
  }
  const [handover] = await knex('bookings')
    .insert({ stage_id: stage.handover, resource_id: connor, starts_at: at(0), ends_at: at(60), state: 'confirmed' })
    .returning('id');
  if (input.record !== false) {
    await knex('commissioning_records').insert({
      job_id: jobId,
      pumps_primed: true,
      pumps_tested: true,
      heater_working: true,
      lights_working: true,
      no_leaks: true,
      ph: 7.4,
      total_alkalinity_ppm: 100,
      sanitiser_ppm: 3.5,
      sanitiser_kind: 'chlorine',
      completed_at: new Date(start - 3_600_000),
    });
  }
  if (input.store) {
    const pdf = await certificatePdf();
    const key = `jobs/${jobId}/certificate-${Date.now()}.pdf`;
    await input.store.put(key, pdf, 'application/pdf');
    const [file] = await knex('job_files')
      .insert({
        job_id: jobId,
        object_key: key,
        name: 'EIC-7731.pdf',
        content_type: 'application/pdf',
        size_bytes: pdf.length,
      })
      .returning('id');
    await knex('electrical_certificates').insert({
      job_id: jobId,
      file_id: file.id,
      uploaded_by_firm_id: await idOf(knex, 'firms', { name: 'Brightspark Electrical' }),
    });
  }
  return { jobId, stage, handoverBookingId: String(handover.id) };
}

/** Every item of the handover checklist gone through. */
export const ALL_TICKED = {
  controls: true,
  cover: true,
  water_care: true,
  chemicals: true,
  electrics: true,
  who_to_call: true,
} as const;
