import { randomUUID } from 'node:crypto';
import type { Knex } from 'knex';
import { SignJWT, jwtVerify, errors as joseErrors } from 'jose';
import type { CertificateView, PutCertificateWaiver } from '../../shared/schemas/commissioning.ts';
import { Booking, Job } from '../models/index.ts';
import { ElectricalCertificate } from '../models/handover-records.ts';
import { ConflictError, NotFoundError, UnprocessableError } from '../errors.ts';
import type { Actor } from './actor.ts';
import { findVisible, scoped } from './scope.ts';
import { certificateForPartner, isOffice, readsHandoverRecords } from './read-policy.ts';
import { recordChange } from './audit.ts';
import { LinkError } from './links.ts';
import type { FilesService, Upload } from './files.ts';

type Db = Knex | Knex.Transaction;

/** The stage kind whose partner electrician certifies the connection. */
export const CERTIFIED_STAGE_KIND = 'electrical_connect';
/** Booking states in which the electrician may upload: the work is agreed, under way or done. */
export const CERTIFYING_STATES = ['confirmed', 'on_site', 'done'] as const;
/** How long after the booking ends its certificate link stays good. */
export const CERTIFICATE_LINK_DAYS = 30;

/** A job's certificate and the office's waiver, as the handover reads them. */
export interface StoredCertificate {
  certificate: { fileId: string; name: string; storageKey: string; uploadedByFirmId: string; uploadedAt: Date } | null;
  waiver: { reason: string; by: string | null; at: Date } | null;
}

/**
 * The electrical certificate of a job (file id, name, storage key, which firm uploaded it) or null,
 * and the office's waiver or null. No reader's scope: callers have already decided the job is theirs.
 */
export async function loadCertificate(trx: Db, jobId: string): Promise<StoredCertificate> {
  const row = await trx('electrical_certificates as c')
    .join('job_files as f', 'f.id', 'c.file_id')
    .where('c.job_id', jobId)
    .first('c.file_id', 'f.name', 'f.object_key', 'c.uploaded_by_firm_id', 'c.uploaded_at');
  const job = await trx('jobs')
    .where('id', jobId)
    .first('certificate_waiver_reason', 'certificate_waived_by', 'certificate_waived_at');
  return {
    certificate: row
      ? {
          fileId: String(row.fileId),
          name: row.name,
          storageKey: row.objectKey,
          uploadedByFirmId: String(row.uploadedByFirmId),
          uploadedAt: row.uploadedAt,
        }
      : null,
    waiver: job?.certificateWaiverReason
      ? {
          reason: job.certificateWaiverReason,
          by: job.certificateWaivedBy === null ? null : String(job.certificateWaivedBy),
          at: job.certificateWaivedAt,
        }
      : null,
  };
}

/**
 * What stops a job being handed over for want of its certificate (empty when nothing does): a job
 * with an electrical connection stage needs the electrician's certificate or the office's reason.
 */
export async function certificateGapsOf(trx: Db, jobId: string): Promise<string[]> {
  const connects = await trx('stages').where({ job_id: jobId, kind: CERTIFIED_STAGE_KIND }).first('id');
  if (!connects) return [];
  const { certificate, waiver } = await loadCertificate(trx, jobId);
  if (certificate || waiver) return [];
  return [
    'No electrical certificate: the electrician uploads it from their slot or the link in their e-mail, or the office records why the job may be handed over without it.',
  ];
}

/** Claims of a certificate link: the booking and the partner firm whose booking it was when the link was made. */
export interface CertificateClaims {
  bookingId: string;
  firmId: string;
}

const ISSUER = 'waterline';
const AUDIENCE = 'certificate';

/**
 * Signed links for uploading a certificate without signing in (the answer page offers one once
 * the slot is confirmed). A link names the booking and the partner firm; it is good until
 * {@link CERTIFICATE_LINK_DAYS} days after the booking ends, and only while that firm still holds
 * the booking. It may be used more than once (a corrected certificate replaces the first).
 */
export class CertificateLinks {
  private readonly key: Uint8Array;
  constructor(secret: string) {
    this.key = new TextEncoder().encode(secret);
  }

  sign(claims: CertificateClaims, expiresAt: Date): Promise<string> {
    return new SignJWT({ bid: claims.bookingId, fid: claims.firmId })
      .setProtectedHeader({ alg: 'HS256' })
      .setIssuer(ISSUER)
      .setAudience(AUDIENCE)
      .setJti(randomUUID())
      .setIssuedAt()
      .setExpirationTime(Math.floor(expiresAt.getTime() / 1000))
      .sign(this.key);
  }

  async verify(token: string, now: Date): Promise<CertificateClaims> {
    try {
      const { payload } = await jwtVerify(token, this.key, {
        issuer: ISSUER,
        audience: AUDIENCE,
        algorithms: ['HS256'],
        currentDate: now,
      });
      const { bid, fid } = payload as { bid?: unknown; fid?: unknown };
      if (typeof bid !== 'string' || typeof fid !== 'string' || !/^\d{1,18}$/.test(bid) || !/^\d{1,18}$/.test(fid))
        throw new LinkError('tampered');
      return { bookingId: bid, firmId: fid };
    } catch (error) {
      if (error instanceof LinkError) throw error;
      if (error instanceof joseErrors.JWTExpired) throw new LinkError('expired');
      if (error instanceof joseErrors.JWTClaimValidationFailed && error.claim === 'aud')
        throw new LinkError('wrong-purpose');
      throw new LinkError('tampered');
    }
  }
}

/** The certificate link's expiry for a booking ending at `endsAt`. */
export function certificateLinkExpiry(endsAt: Date, now: Date): Date {
  return new Date(Math.max(endsAt.getTime() + CERTIFICATE_LINK_DAYS * 86_400_000, now.getTime() + 72 * 3_600_000));
}

const PDF_ONLY = { accept: ['application/pdf'] as const, acceptText: 'The certificate must be a PDF.' };

/**
 * Electrical certificates: the partner electrician uploads the PDF for their own connection (from
 * Our slots or a certificate link) through the job files' upload path; the installer reads it on
 * the job page; the office may record why a job is handed over without one.
 */
export class CertificatesService {
  constructor(
    private readonly knex: Knex,
    private readonly files: FilesService,
    private readonly now: () => number = Date.now,
  ) {}

  /** The certificate and waiver as the installer's office or crew read them. */
  async get(actor: Actor, jobId: string): Promise<CertificateView> {
    if (!readsHandoverRecords(actor)) throw new NotFoundError('job');
    await findVisible(Job, actor, jobId, undefined, 'job');
    const row = (await scoped(ElectricalCertificate, actor)
      .where('electrical_certificates.job_id', jobId)
      .join('firms as f', 'f.id', 'electrical_certificates.uploaded_by_firm_id')
      .select('electrical_certificates.file_id', 'electrical_certificates.uploaded_at', 'f.name as firm_name')
      .first()) as unknown as { fileId: string; uploadedAt: Date; firmName: string } | undefined;
    const file = row ? (await this.files.list(actor, jobId)).find((f) => f.id === String(row.fileId)) : undefined;
    const { waiver } = await loadCertificate(this.knex, jobId);
    const by = waiver?.by ? await this.knex('users').where('id', waiver.by).first('name') : null;
    return {
      jobId,
      certificate:
        row && file
          ? {
              fileId: file.id,
              name: file.name,
              uploadedAt: row.uploadedAt.toISOString(),
              uploadedByFirm: row.firmName,
              url: file.url,
            }
          : null,
      waiver: waiver ? { reason: waiver.reason, by: by?.name ?? null, at: waiver.at.toISOString() } : null,
    };
  }

  /** The office records (or with null takes back) why the job may be handed over without the certificate. */
  async waive(actor: Actor, jobId: string, input: PutCertificateWaiver): Promise<CertificateView> {
    await this.knex.transaction(async (trx) => {
      // The job's row queues its own saves; FOR NO KEY UPDATE lets writes that only point at it go on.
      const job = await scoped(Job, actor, trx).findById(jobId).forNoKeyUpdate();
      if (!job || !isOffice(actor)) throw new NotFoundError('job');
      const before = await loadCertificate(trx, jobId);
      const was = before.waiver?.reason ?? null;
      // A reason someone else recorded, changed or took back since the page loaded is not replaced
      // unseen, unless it is already what this save asks for.
      if (input.reasonWas !== was && input.reason !== was) {
        throw new ConflictError(
          was === null
            ? 'Someone else took the reason back since you loaded the page: reload to see it.'
            : `Someone else recorded a reason since you loaded the page ("${was}"): reload to see it.`,
          { code: 'stale-version', field: 'reasonWas', current: was },
        );
      }
      const patch = input.reason
        ? {
            certificate_waiver_reason: input.reason,
            certificate_waived_by: actor.userId,
            certificate_waived_at: new Date(this.now()),
          }
        : { certificate_waiver_reason: null, certificate_waived_by: null, certificate_waived_at: null };
      await trx('jobs').where('id', jobId).update(patch);
      await recordChange(
        trx,
        actor,
        'certificate_waiver',
        jobId,
        input.reason ? (before.waiver ? 'update' : 'create') : 'delete',
        before.waiver,
        input.reason ? { reason: input.reason } : null,
      );
    });
    return this.get(actor, jobId);
  }

  /**
   * The booking a certificate is for, if `firmId` may certify it: the partner firm whose resource
   * holds the electrical connection booking now, confirmed, under way or done. Anything else is
   * "no such slot" (404) or, for a slot that is not an electrical connection or not yet agreed, 422.
   */
  private async certifiable(
    trx: Db,
    bookingId: string,
    firmId: string,
  ): Promise<{ jobId: string; installerFirmId: string }> {
    const row = await trx('bookings as b')
      .join('resources as r', 'r.id', 'b.resource_id')
      .join('stages as s', 's.id', 'b.stage_id')
      .join('jobs as j', 'j.id', 's.job_id')
      .where('b.id', bookingId)
      .first('b.state', 'r.firm_id', 's.kind', 's.job_id', 'j.firm_id as installer_firm_id');
    // A pencilled or declined booking is not the partner's to know of: the same 404 as another firm's.
    if (!row || String(row.firmId) !== String(firmId) || ['pencilled', 'declined'].includes(row.state))
      throw new NotFoundError('slot');
    if (row.kind !== CERTIFIED_STAGE_KIND)
      throw new UnprocessableError('Only an electrical connection slot takes an electrical certificate.', {
        code: 'not-a-connection',
      });
    if (!(CERTIFYING_STATES as readonly string[]).includes(row.state)) {
      throw new UnprocessableError('The certificate can be uploaded once the slot is confirmed.', {
        code: 'not-confirmed',
      });
    }
    return { jobId: String(row.jobId), installerFirmId: String(row.installerFirmId) };
  }

  /** Keeps the PDF as a job file and makes it the job's certificate (a new one replaces the old). */
  private async keep(
    actor: Actor | null,
    firmId: string,
    bookingId: string,
    upload: Upload,
  ): Promise<{ name: string; uploadedAt: string }> {
    const { jobId, installerFirmId } = await this.certifiable(this.knex, bookingId, firmId);
    const file = await this.files.keep({
      jobId,
      upload,
      uploadedBy: actor?.userId ?? null,
      actor,
      auditFirmId: installerFirmId,
      keepLocation: false,
      ...PDF_ONLY,
      also: async (trx, created) => {
        // Checked again under the booking's lock: a slot reassigned or taken back meanwhile takes no certificate.
        await trx('bookings').where('id', bookingId).forUpdate().first('id');
        await this.certifiable(trx, bookingId, firmId);
        const before = await trx('electrical_certificates').where('job_id', jobId).first();
        const values = {
          file_id: created.id,
          uploaded_by_firm_id: firmId,
          uploaded_by: actor?.userId ?? null,
          uploaded_at: new Date(this.now()),
        };
        await trx('electrical_certificates')
          .insert({ job_id: jobId, ...values })
          .onConflict('job_id')
          .merge();
        await recordChange(
          trx,
          actor,
          'electrical_certificate',
          jobId,
          before ? 'update' : 'create',
          before ?? null,
          { ...values, bookingId },
          installerFirmId,
        );
      },
    });
    return { name: file.name, uploadedAt: new Date(this.now()).toISOString() };
  }

  /** A slot of the partner's own firm, or 404 (another firm's slot id, or a reader who is not a partner firm). */
  async assertOwnSlot(actor: Actor, bookingId: string): Promise<void> {
    const booking = readsHandoverRecords(actor) ? undefined : await scoped(Booking, actor).findById(bookingId);
    if (!booking) throw new NotFoundError('slot');
  }

  /** The partner coordinator uploads from Our slots, for a slot of their own firm. */
  async uploadForSlot(actor: Actor, bookingId: string, upload: Upload): Promise<{ name: string; uploadedAt: string }> {
    await this.assertOwnSlot(actor, bookingId);
    return this.keep(actor, actor.firmId, bookingId, upload);
  }

  /** The electrician uploads through a certificate link (no session): the link names the booking and firm. */
  async uploadByLink(claims: CertificateClaims, upload: Upload): Promise<{ name: string; uploadedAt: string }> {
    return this.keep(null, claims.firmId, claims.bookingId, upload);
  }

  /** What the link page says of a booking's certificate: this firm's own upload, or null. */
  forPartner(firmId: string, bookingIds: string[]): Promise<Map<string, { name: string; uploadedAt: string } | null>> {
    return partnerCertificates(this.knex, firmId, bookingIds);
  }
}

/**
 * What a partner firm's slots (Our slots, the link page) say of their certificates: for each
 * electrical connection booking, the certificate where this firm uploaded it (read-policy.ts
 * `certificateForPartner`); bookings without one are absent.
 */
export async function partnerCertificates(
  db: Db,
  firmId: string,
  bookingIds: string[],
): Promise<Map<string, { name: string; uploadedAt: string } | null>> {
  const rows = bookingIds.length
    ? await db('bookings as b')
        .join('stages as s', 's.id', 'b.stage_id')
        .join('electrical_certificates as c', 'c.job_id', 's.job_id')
        .join('job_files as f', 'f.id', 'c.file_id')
        .whereIn('b.id', bookingIds)
        .where('s.kind', CERTIFIED_STAGE_KIND)
        .select('b.id as booking_id', 'c.uploaded_by_firm_id', 'f.name', 'c.uploaded_at')
    : [];
  const out = new Map<string, { name: string; uploadedAt: string } | null>();
  for (const r of rows)
    out.set(
      String(r.bookingId),
      certificateForPartner(
        { firmId },
        { uploadedByFirmId: String(r.uploadedByFirmId), name: r.name, uploadedAt: r.uploadedAt },
      ),
    );
  return out;
}

/**
 * The certificate link for an answer page's slot, or null when the slot takes none: an electrical
 * connection, confirmed, under way or done, for the partner firm that holds it.
 */
export async function certificateLinkFor(
  links: CertificateLinks,
  publicUrl: string,
  slot: {
    bookingId: string;
    stageKind: string;
    state: string;
    endsAt: Date;
    partnerFirmId: string;
  },
  now: Date,
): Promise<string | null> {
  if (slot.stageKind !== CERTIFIED_STAGE_KIND || !(CERTIFYING_STATES as readonly string[]).includes(slot.state))
    return null;
  const token = await links.sign(
    { bookingId: slot.bookingId, firmId: slot.partnerFirmId },
    certificateLinkExpiry(slot.endsAt, now),
  );
  return `${publicUrl}/answer/certificate/${token}`;
}
