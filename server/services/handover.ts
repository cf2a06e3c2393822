import { randomUUID } from 'node:crypto';
import type { Knex } from 'knex';
import sharp from 'sharp';
import type {
  HandoverView,
  PutServicePlan,
  ServicePlanView,
  SignHandover,
  SignHandoverResult,
} from '../../shared/schemas/handover.ts';
import {
  DEFAULT_SERVICE_PLAN,
  monthName,
  serviceVisitDates,
  type ServicePlan,
  type ServiceVisitDate,
} from '../../shared/service-plan.ts';
import { SERVICE_VISIT_TEMPLATE } from '../../shared/templates/defaults.ts';
import { localDateOf } from '../../shared/local-dates.ts';
import { COMMISSIONING_CHECKS, rangeText, readingChecks } from '../../shared/water-balance.ts';
import { Booking, Job, Stage } from '../models/index.ts';
import { FirmSettings, JobFile } from '../models/job-records.ts';
import { Handover } from '../models/handover.ts';
import { BadRequestError, ConflictError } from '../errors.ts';
import { handoverGaps } from './stage-gates.ts';
import type { ObjectStore } from '../storage/object-store.ts';
import { inspectFile } from '../storage/inspect.ts';
import type { Actor } from './actor.ts';
import { findVisible, scoped } from './scope.ts';
import { recordChange } from './audit.ts';
import { enqueueMessage } from './outbox.ts';
import { handoverEmailFor } from './read-policy.ts';
import { BookingWriter, partyOf, type BookingLimits } from './booking-writes.ts';
import { StorageUnavailableError } from './files.ts';
import { loadCommissioningRecord, waterTargetsForJob } from './commissioning.ts';
import { loadCertificate } from './certificates.ts';
import { requestBalance } from './payments.ts';
import { buildHandoverPack, WATER_CARE_ROUTINE, type PackFacts } from './handover-pack.ts';

const PLAN_SOURCE = 'common practice, no source';
const VERDICT_WORDS: Record<string, string> = {
  'in-range': 'In range',
  low: 'Low',
  high: 'High',
  missing: 'Not taken',
};

/** A signature that is not a picture of a signature: 400 naming the field. */
const badSignature = (message: string) =>
  new BadRequestError(`The signature ${message}.`, [{ field: 'signature', message }]);

/**
 * The signature pad's PNG, checked for what it is (its bytes, not its label), its size, and that
 * something was drawn on it: a blank pad is no signature.
 */
export async function signatureImage(dataUrl: string): Promise<Buffer> {
  const buffer = Buffer.from(dataUrl.slice(dataUrl.indexOf(',') + 1), 'base64');
  const info = await inspectFile(buffer, 'signature.png').catch(() => null);
  if (info?.contentType !== 'image/png') throw badSignature('must be a PNG image from the signature pad');
  try {
    const image = sharp(buffer, { failOn: 'error' });
    const meta = await image.metadata();
    if (!meta.width || !meta.height || meta.width > 4000 || meta.height > 4000)
      throw badSignature('image must be at most 4000 × 4000 pixels');
    const stats = await image.stats();
    const drawn = meta.hasAlpha ? (stats.channels[3]?.max ?? 0) > 0 : stats.channels.some((c) => c.min !== c.max);
    if (!drawn) throw badSignature('is blank: ask the householder to sign');
  } catch (error) {
    if (error instanceof BadRequestError) throw error;
    throw badSignature('could not be read as an image');
  }
  return buffer;
}

/** The firm's service plan: its own, or the default. */
export async function servicePlanOf(
  knex: Knex | Knex.Transaction,
  firmId: string,
): Promise<ServicePlan & { isDefault: boolean; version: number }> {
  const row = await knex('firm_settings').where('firm_id', firmId).first('service_plan');
  const { version = 0, ...stored } = (row?.servicePlan ?? {}) as Partial<ServicePlan> & { version?: number };
  const plan = { ...DEFAULT_SERVICE_PLAN, ...stored };
  const isDefault = (Object.keys(DEFAULT_SERVICE_PLAN) as (keyof ServicePlan)[]).every(
    (k) => plan[k] === DEFAULT_SERVICE_PLAN[k],
  );
  return { ...plan, isDefault, version };
}

/**
 * Sets up the service visits a plan asks for after an install's handover: one job per visit
 * (reference `<install>-S<n>`, the install's householder, site and unit), due on the plan's date
 * and promised two weeks either side, each with one unbooked service-visit stage. The board's tray
 * shows them as their window comes near (server/services/board.ts), and they are booked like any job.
 */
export async function createServiceVisits(
  trx: Knex.Transaction,
  actor: Actor,
  install: Job,
  visits: ServiceVisitDate[],
): Promise<{ jobId: string; reference: string; dueOn: string }[]> {
  const out: { jobId: string; reference: string; dueOn: string }[] = [];
  const minutes = SERVICE_VISIT_TEMPLATE.duration.kind === 'fixed' ? SERVICE_VISIT_TEMPLATE.duration.minutes : 120;
  for (const v of visits) {
    const reference = `${install.reference}-S${v.number}`;
    const [row] = await trx('jobs')
      .insert({
        firm_id: install.firmId,
        reference,
        kind: 'service',
        parent_job_id: install.id,
        service_due_on: v.dueOn,
        customer_name: install.customerName,
        customer_phone: install.customerPhone,
        customer_email: install.customerEmail,
        site_address: install.siteAddress,
        site_town: install.siteTown,
        site_postcode: install.sitePostcode,
        access_notes: install.accessNotes,
        unit_id: install.unitId,
        installation_type: install.installationType,
        status: 'planned',
        promised_from: v.promisedFrom,
        promised_to: v.promisedTo,
      })
      .returning('id');
    const jobId = String(row.id);
    await trx('stages').insert({
      job_id: jobId,
      kind: SERVICE_VISIT_TEMPLATE.kind,
      name: SERVICE_VISIT_TEMPLATE.name,
      sequence: 1,
      duration_minutes: minutes,
      requirements: JSON.stringify(SERVICE_VISIT_TEMPLATE.requirements),
      notes: `Service visit ${v.number} after the handover of ${install.reference}, due ${v.dueOn}.`,
    });
    await recordChange(trx, actor, 'job', jobId, 'create', null, {
      reference,
      kind: 'service',
      parentJobId: install.id,
      serviceDueOn: v.dueOn,
    });
    out.push({ jobId, reference, dueOn: v.dueOn });
  }
  return out;
}

/** What the pack says about commissioning and the certificate, from the job's records. */
async function recordsFor(
  trx: Knex.Transaction,
  job: Job,
): Promise<Pick<PackFacts, 'commissioning' | 'certificateLine'>> {
  const record = await loadCommissioningRecord(trx, String(job.id));
  let commissioning: PackFacts['commissioning'] = null;
  if (record) {
    const readings = readingChecks(record, await waterTargetsForJob(trx, String(job.id)));
    const sanitiserName = record.sanitiserKind === 'bromine' ? 'Bromine' : 'Free chlorine';
    commissioning = {
      checks: COMMISSIONING_CHECKS.map((c) => ({ label: c.label, done: record.checks[c.key] })),
      readings: readings.map((r) => ({
        label: r.key === 'sanitiserPpm' ? sanitiserName : r.label,
        value: r.value === null ? '–' : `${r.value}${r.range.unit ? ` ${r.range.unit}` : ''}`,
        range: rangeText(r.range),
        verdict: VERDICT_WORDS[r.verdict] ?? r.verdict,
      })),
      notes: record.notes,
    };
  }
  const { certificate, waiver } = await loadCertificate(trx, String(job.id));
  const from = certificate ? await trx('firms').where('id', certificate.uploadedByFirmId).first('name') : null;
  const certificateLine = certificate
    ? `Electrical installation certificate "${certificate.name}"${from ? `, from ${from.name}` : ''}: attached to the e-mail with this pack.`
    : waiver
      ? `The electrical certificate was not on file at handover (${waiver.reason}); the installer will send it on.`
      : 'The electrical certificate was not on file at handover; the installer will send it on.';
  return { commissioning, certificateLine };
}

const longDate = (date: string) =>
  new Intl.DateTimeFormat('en-GB', { timeZone: 'UTC', weekday: 'long', day: 'numeric', month: 'long', year: 'numeric' })
    .format(new Date(`${date}T12:00:00Z`))
    .replace(',', '');

/**
 * The handover with the householder: the checklist they went through, their signature, the pack
 * e-mailed to them, the handover stage marked done through the guarded write path (so the gates on
 * Done apply), the balance asked for, and the service visits of the firm's plan set up.
 */
export class HandoverService {
  private readonly writer: BookingWriter;

  constructor(
    private readonly knex: Knex,
    private readonly store: ObjectStore,
    private readonly now: () => number = Date.now,
    limits?: BookingLimits,
    private readonly log: { error: (o: object, m: string) => void } = console,
  ) {
    this.writer = new BookingWriter(knex, now, limits);
  }

  async get(actor: Actor, jobId: string): Promise<HandoverView> {
    const job = await findVisible(Job, actor, jobId, undefined, 'job');
    const unit = job.unitId ? await this.knex('units').where('id', job.unitId).first('model') : null;
    const stage = await scoped(Stage, actor).where({ 'stages.job_id': jobId, 'stages.kind': 'handover' }).first();
    const booked = stage
      ? await scoped(Booking, actor)
          .where('bookings.stage_id', stage.id)
          .whereNot('bookings.state', 'declined')
          .resultSize()
      : 0;
    const handover = await scoped(Handover, actor).where('handovers.job_id', jobId).first();
    let signed: HandoverView['signed'] = null;
    if (handover) {
      const by = handover.signedByUser
        ? await this.knex('users').where('id', handover.signedByUser).first('name')
        : null;
      // The visits this handover planned, read through the install the reader may see: crew are not
      // booked on them (yet), but may tell the householder the months.
      const visits = (await this.knex('jobs')
        .where({ parent_job_id: jobId, kind: 'service' })
        .orderBy('service_due_on')
        .select('id', 'reference', 'service_due_on')) as { id: string; reference: string; serviceDueOn: string }[];
      const outbox = handover.packOutboxId
        ? await this.knex('outbox').where('id', handover.packOutboxId).first('status')
        : null;
      signed = {
        signedAt: handover.signedAt.toISOString(),
        householderName: handover.householderName,
        signedBy: by?.name ?? null,
        serviceVisits: visits.map((v) => ({
          jobId: String(v.id),
          reference: v.reference,
          dueOn: String(v.serviceDueOn),
        })),
        packEmailed: outbox?.status === 'sent',
      };
    }
    const email = handoverEmailFor(actor, job.customerEmail);
    return {
      job: {
        id: String(job.id),
        reference: job.reference,
        customerName: job.customerName,
        siteTown: job.siteTown,
        unitName: unit?.model ?? null,
        kind: job.kind,
      },
      householderEmail: email.email,
      householderEmailHint: email.hint,
      stageBooked: booked > 0,
      // Once signed there is nothing left to ask for.
      notReady: handover ? [] : await handoverGaps(this.knex, jobId),
      signed,
    };
  }

  /** The job, when the reader may see it (404 otherwise). */
  async visible(actor: Actor, jobId: string): Promise<Job> {
    return findVisible(Job, actor, jobId, undefined, 'job');
  }

  async sign(actor: Actor, jobId: string, input: SignHandover): Promise<SignHandoverResult> {
    const job = await findVisible(Job, actor, jobId, undefined, 'job');
    if (job.kind === 'service')
      throw new ConflictError('A service visit has no handover: it is marked done on My work.', {
        code: 'not-an-install',
      });
    const stage = await scoped(Stage, actor).where({ 'stages.job_id': jobId, 'stages.kind': 'handover' }).first();
    if (!stage)
      throw new ConflictError(`Job ${job.reference} has no handover stage: plan the job first.`, {
        code: 'no-handover-stage',
      });
    const signature = await signatureImage(input.signature);
    const to = input.householderEmail ?? job.customerEmail;
    if (!to)
      throw new BadRequestError('The job has no e-mail for the householder: type the address the pack should go to.', [
        { field: 'householderEmail', message: 'is required: the job has no e-mail' },
      ]);
    const stored: string[] = [];
    try {
      const outcome = await this.writer.run(
        { actor, party: partyOf(actor) },
        { stageIds: [String(stage.id)] },
        async (w) => {
          const trx = w.trx;
          const earlier = await Handover.query(trx).where('job_id', jobId).first();
          if (earlier)
            throw new ConflictError(
              `Job ${job.reference} was already handed over on ${earlier.signedAt.toISOString().slice(0, 10)}.`,
              { code: 'already-handed-over' },
            );
          const bookings = await scoped(Booking, actor, trx)
            .where('bookings.stage_id', stage.id)
            .whereNot('bookings.state', 'declined')
            .orderBy('bookings.id');
          if (!bookings.length)
            throw new ConflictError(`The handover of ${job.reference} is not booked: book it on the board first.`, {
              code: 'handover-not-booked',
            });

          const signedAt = new Date(this.now());
          const firm = await trx('firms').where('id', job.firmId).first('name', 'phone', 'email', 'time_zone');
          const handedOverOn = localDateOf(signedAt.getTime(), firm.timeZone);
          const plan = await servicePlanOf(trx, String(job.firmId));
          const dates = serviceVisitDates(handedOverOn, plan);
          const unit = job.unitId ? await trx('units').where('id', job.unitId).first('model', 'maker') : null;
          const signer = await trx('users').where('id', actor.userId).first('name');
          const pdf = await buildHandoverPack({
            firm: { name: firm.name, phone: firm.phone, email: firm.email },
            job,
            unit: unit ?? null,
            handedOverOn: longDate(handedOverOn),
            householderName: input.householderName,
            handedOverBy: signer?.name ?? null,
            ...(await recordsFor(trx, job)),
            waterCare: WATER_CARE_ROUTINE,
            serviceVisits: dates.map((d) => ({
              reference: `${job.reference}-S${d.number}`,
              month: monthName(d.dueOn),
            })),
            signaturePng: signature,
          });
          const signatureFile = await this.keep(
            trx,
            actor,
            job,
            { name: `Handover signature ${job.reference}.png`, body: signature, contentType: 'image/png', ext: 'png' },
            stored,
          );
          const packFile = await this.keep(
            trx,
            actor,
            job,
            { name: `Handover pack ${job.reference}.pdf`, body: pdf, contentType: 'application/pdf', ext: 'pdf' },
            stored,
          );
          const handover = await Handover.query(trx).insertAndFetch({
            jobId,
            checklist: input.checklist,
            householderName: input.householderName,
            householderEmail: input.householderEmail ?? null,
            signatureFileId: signatureFile,
            packFileId: packFile,
            signedAt,
            signedByUser: actor.userId,
          } as Partial<Handover>);
          const key = `handover.${jobId}.pack`;
          await enqueueMessage(trx, key, 'handover_pack', { jobId });
          const outbox = await trx('outbox').where('idempotency_key', key).first('id');
          await Handover.query(trx)
            .patch({ packOutboxId: outbox?.id ?? null } as Partial<Handover>)
            .where('id', handover.id);
          await recordChange(trx, actor, 'handover', String(handover.id), 'create', null, {
            jobId,
            householderName: input.householderName,
            checklist: input.checklist,
            signedAt,
          });

          // The handover stage is done: through the write path, whose gates on Done apply.
          for (const b of bookings) {
            if (b.state === 'done') continue;
            if (b.state !== 'on_site') await w.apply({ action: 'arrive', bookingId: String(b.id) });
            await w.apply({ action: 'finish', bookingId: String(b.id) });
          }
          await Job.query(trx)
            .patch({ status: 'handed_over', version: trx.raw('version + 1') } as never)
            .where('id', jobId);
          await recordChange(trx, actor, 'job', jobId, 'update', { status: job.status }, { status: 'handed_over' });

          const serviceVisits = await createServiceVisits(trx, actor, job, dates);
          if (serviceVisits.length)
            await enqueueMessage(trx, `handover.${jobId}.service-plan`, 'service_plan_notice', { jobId });
          // The balance is asked for once the job is handed over (null: no price recorded, or nothing left to pay).
          const balance = await requestBalance({ actor, trx, jobId });
          const balanceRequested = balance !== null;
          return { signedAt: signedAt.toISOString(), packFileId: packFile, serviceVisits, balanceRequested };
        },
      );
      return outcome.result;
    } catch (error) {
      await this.removeQuietly(stored);
      throw error;
    }
  }

  /** One file of the handover: bytes to storage, its row in the transaction (removed again if that rolls back). */
  private async keep(
    trx: Knex.Transaction,
    actor: Actor,
    job: Job,
    file: { name: string; body: Buffer; contentType: string; ext: string },
    stored: string[],
  ): Promise<string> {
    const objectKey = `jobs/${job.id}/${randomUUID()}.${file.ext}`;
    try {
      await this.store.put(objectKey, file.body, file.contentType);
    } catch (err) {
      this.log.error({ err }, 'object storage refused a handover file');
      throw new StorageUnavailableError();
    }
    stored.push(objectKey);
    const row = await JobFile.query(trx).insertAndFetch({
      jobId: job.id,
      objectKey,
      thumbnailKey: null,
      name: file.name,
      contentType: file.contentType,
      sizeBytes: file.body.length,
      uploadedBy: actor.userId,
    } as Partial<JobFile>);
    await recordChange(trx, actor, 'job_file', String(row.id), 'create', null, { ...row });
    return String(row.id);
  }

  private async removeQuietly(keys: string[]): Promise<void> {
    for (const key of keys) {
      try {
        await this.store.delete(key);
      } catch (err) {
        this.log.error({ err, key }, 'could not remove a handover file after a failed handover');
      }
    }
  }

  async servicePlan(actor: Actor): Promise<ServicePlanView> {
    const { isDefault, ...plan } = await servicePlanOf(this.knex, actor.firmId);
    return { ...plan, isDefault, source: PLAN_SOURCE };
  }

  /**
   * Replaces the firm's service plan. The plan keeps its own count of saves (in the stored plan,
   * apart from the quantity settings' version): a save based on an older count is refused with the
   * plan as it stands, so two owners editing at once can't overwrite each other unseen.
   */
  async putServicePlan(actor: Actor, input: PutServicePlan): Promise<ServicePlanView> {
    const { version, ...plan } = input;
    await this.knex.transaction(async (trx) => {
      // The firm's settings row, made first when it has none, then locked: two first saves at once
      // meet at the lock like any others (version 0 keeps the quantity form's own count untouched).
      const created = await trx('firm_settings')
        .insert({ firm_id: actor.firmId, version: 0 })
        .onConflict('firm_id')
        .ignore()
        .returning('firm_id');
      await scoped(FirmSettings, actor, trx).first().forUpdate();
      const was = await servicePlanOf(trx, actor.firmId);
      if (was.version !== version) {
        throw new ConflictError('Someone else changed the service plan since you loaded it: reload to see theirs.', {
          code: 'stale-version',
          current: { ...was, source: PLAN_SOURCE },
        });
      }
      await trx('firm_settings')
        .where('firm_id', actor.firmId)
        .update({ service_plan: JSON.stringify({ ...plan, version: version + 1 }), updated_at: new Date() });
      const isNew = created.length > 0;
      await recordChange(
        trx,
        actor,
        'firm_settings',
        actor.firmId,
        isNew ? 'create' : 'update',
        isNew ? null : { servicePlan: was },
        { servicePlan: { ...plan, version: version + 1 } },
      );
    });
    return this.servicePlan(actor);
  }
}
