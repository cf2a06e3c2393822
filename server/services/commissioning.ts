import type { Knex } from 'knex';
import type { CommissioningView, PutCommissioning } from '../../shared/schemas/commissioning.ts';
import { FILE_TYPES, type FileContentType } from '../../shared/schemas/files.ts';
import { cautionsFor } from '../../shared/cautions.ts';
import {
  commissioningGaps,
  readingChecks,
  waterTargetsOf,
  type CommissioningFacts,
  type SanitiserKind,
  type WaterTargets,
} from '../../shared/water-balance.ts';
import { Booking, Job } from '../models/index.ts';
import { CommissioningRecord } from '../models/handover-records.ts';
import { BadRequestError, ConflictError, ForbiddenError, NotFoundError } from '../errors.ts';
import { reachOf, type Actor } from './actor.ts';
import { findVisible, scoped } from './scope.ts';
import { readsHandoverRecords } from './read-policy.ts';
import { recordChange } from './audit.ts';
import type { FilesService } from './files.ts';

type Db = Knex | Knex.Transaction;

/** A job's commissioning record as stored, numbers as numbers, with its photos' file ids. */
export interface StoredCommissioning {
  id: string;
  jobId: string;
  checks: CommissioningFacts['checks'];
  ph: number | null;
  totalAlkalinityPpm: number | null;
  sanitiserPpm: number | null;
  sanitiserKind: SanitiserKind | null;
  notes: string | null;
  photoFileIds: string[];
  recordedBy: string | null;
  version: number;
  updatedAt: Date;
  completedAt: Date | null;
}

const num = (v: string | number | null | undefined): number | null =>
  v === null || v === undefined ? null : Number(v);

/**
 * The commissioning record of a job, or null when none was saved. No reader's scope is applied:
 * callers (the write path's gate, the handover) have already decided the job is theirs to look at.
 */
export async function loadCommissioningRecord(trx: Db, jobId: string): Promise<StoredCommissioning | null> {
  const row = (await trx('commissioning_records').where('job_id', jobId).first()) as CommissioningRecord | undefined;
  if (!row) return null;
  const photos = (await trx('commissioning_photos as p')
    .join('job_files as f', 'f.id', 'p.file_id')
    .where('p.job_id', jobId)
    .orderBy('f.created_at')
    .orderBy('f.id')
    .pluck('f.id')) as string[];
  return {
    id: String(row.id),
    jobId: String(row.jobId),
    checks: {
      pumpsPrimed: row.pumpsPrimed,
      pumpsTested: row.pumpsTested,
      heaterWorking: row.heaterWorking,
      lightsWorking: row.lightsWorking,
      noLeaks: row.noLeaks,
    },
    ph: num(row.ph),
    totalAlkalinityPpm: num(row.totalAlkalinityPpm),
    sanitiserPpm: num(row.sanitiserPpm),
    sanitiserKind: row.sanitiserKind,
    notes: row.notes,
    photoFileIds: photos.map(String),
    recordedBy: row.recordedBy === null ? null : String(row.recordedBy),
    version: row.version,
    updatedAt: row.updatedAt,
    completedAt: row.completedAt,
  };
}

/** The water targets of the firm whose job it is: its own ranges over the defaults. */
export async function waterTargetsForJob(trx: Db, jobId: string): Promise<WaterTargets> {
  const row = await trx('jobs as j')
    .leftJoin('firm_settings as fs', 'fs.firm_id', 'j.firm_id')
    .where('j.id', jobId)
    .first('fs.water_targets');
  return waterTargetsOf(row?.waterTargets);
}

function factsOf(r: StoredCommissioning | null): CommissioningFacts | null {
  return (
    r && {
      checks: r.checks,
      ph: r.ph,
      totalAlkalinityPpm: r.totalAlkalinityPpm,
      sanitiserPpm: r.sanitiserPpm,
      sanitiserKind: r.sanitiserKind,
      notes: r.notes,
      photoCount: r.photoFileIds.length,
    }
  );
}

/** What still stops a job's commissioning being marked done (empty when complete): the write path's gate. */
export async function commissioningGapsOf(trx: Db, jobId: string): Promise<string[]> {
  return commissioningGaps(factsOf(await loadCommissioningRecord(trx, jobId)), await waterTargetsForJob(trx, jobId));
}

/**
 * The crew's commissioning record on the phone: read by the installer's office and the crew who
 * see the job; changed by the office (owner, scheduler) and by crew booked on the job's
 * commission stage. Saved whole as the crew goes, at the version they loaded (older → 409).
 */
export class CommissioningService {
  constructor(
    private readonly knex: Knex,
    private readonly files: FilesService,
  ) {}

  private async visibleJob(actor: Actor, jobId: string, trx?: Knex.Transaction): Promise<Job> {
    // A partner firm never reads the record, whatever job it is booked on: the same 404 as another firm's job.
    if (!readsHandoverRecords(actor)) throw new NotFoundError('job');
    return findVisible(Job, actor, jobId, trx, 'job');
  }

  /** Whether the actor may change the record: the office, or crew with a booking on the commission stage. */
  private async mayEdit(actor: Actor, jobId: string, trx?: Knex.Transaction): Promise<boolean> {
    if (reachOf(actor) === 'installer-office') return actor.role === 'owner' || actor.role === 'scheduler';
    if (reachOf(actor) !== 'crew') return false;
    const own = await scoped(Booking, actor, trx)
      .join('stages as s', 's.id', 'bookings.stage_id')
      .where('s.job_id', jobId)
      .where('s.kind', 'commission')
      .whereNot('bookings.state', 'declined')
      .first();
    return Boolean(own);
  }

  async get(actor: Actor, jobId: string, trx?: Knex.Transaction): Promise<CommissioningView> {
    const job = await this.visibleJob(actor, jobId, trx);
    const scopedRow = await scoped(CommissioningRecord, actor, trx)
      .where('commissioning_records.job_id', jobId)
      .first();
    const record = scopedRow ? await loadCommissioningRecord(trx ?? this.knex, jobId) : null;
    const targets = await waterTargetsForJob(trx ?? this.knex, jobId);
    const photoIds = new Set(record?.photoFileIds ?? []);
    const photos = photoIds.size ? (await this.files.list(actor, jobId)).filter((f) => photoIds.has(f.id)) : [];
    const recorder = record?.recordedBy
      ? await (trx ?? this.knex)('users').where('id', record.recordedBy).first('name')
      : null;
    const readings = {
      ph: record?.ph ?? null,
      totalAlkalinityPpm: record?.totalAlkalinityPpm ?? null,
      sanitiserPpm: record?.sanitiserPpm ?? null,
      sanitiserKind: record?.sanitiserKind ?? null,
    };
    return {
      jobId: String(job.id),
      jobReference: job.reference,
      version: record?.version ?? 0,
      checks: record?.checks ?? {
        pumpsPrimed: false,
        pumpsTested: false,
        heaterWorking: false,
        lightsWorking: false,
        noLeaks: false,
      },
      ...readings,
      notes: record?.notes ?? null,
      photos,
      recordedBy: recorder?.name ?? null,
      updatedAt: record?.updatedAt.toISOString() ?? null,
      completedAt: record?.completedAt?.toISOString() ?? null,
      targets,
      readings: readingChecks(readings, targets),
      gaps: commissioningGaps(factsOf(record), targets),
      cautions: cautionsFor('commission'),
      canEdit: await this.mayEdit(actor, jobId, trx),
    };
  }

  async put(actor: Actor, jobId: string, input: PutCommissioning): Promise<CommissioningView> {
    return this.knex.transaction(async (trx) => {
      // The job row is the lock: two saves of one record queue here, and the second sees the new
      // version. FOR NO KEY UPDATE lets writes that only point at the job go on.
      const job = await this.visibleJob(actor, jobId, trx);
      await trx('jobs').where('id', job.id).forNoKeyUpdate().first('id');
      if (!(await this.mayEdit(actor, jobId, trx))) {
        throw new ForbiddenError('Only the crew booked on the commissioning, or the office, can change this record.');
      }
      const before = await loadCommissioningRecord(trx, jobId);
      if ((before?.version ?? 0) !== input.version) {
        throw new ConflictError('Someone else saved this commissioning record since you loaded it.', {
          code: 'stale-version',
          current: before ? await this.get(actor, jobId, trx) : null,
        });
      }
      const photoIds = [...new Set(input.photoFileIds)];
      if (photoIds.length) {
        const files = await trx('job_files')
          .where('job_id', jobId)
          .whereIn('id', photoIds)
          .select('id', 'content_type');
        const photos = new Set(
          files.filter((f) => FILE_TYPES[f.contentType as FileContentType]?.photo).map((f) => String(f.id)),
        );
        const wrong = photoIds.filter((id) => !photos.has(id));
        if (wrong.length)
          throw new BadRequestError('A photo of the record is not a photo of this job.', [
            { field: 'photoFileIds', message: `${wrong.join(', ')} is not a photo on this job` },
          ]);
      }
      const targets = await waterTargetsForJob(trx, jobId);
      const facts: CommissioningFacts = { ...input, photoCount: photoIds.length };
      const complete = commissioningGaps(facts, targets).length === 0;
      const now = new Date();
      const values = {
        ...input.checks,
        ph: input.ph,
        totalAlkalinityPpm: input.totalAlkalinityPpm,
        sanitiserPpm: input.sanitiserPpm,
        sanitiserKind: input.sanitiserKind,
        notes: input.notes,
        recordedBy: actor.userId,
        updatedAt: now,
        completedAt: complete ? (before?.completedAt ?? now) : null,
      };
      const saved = before
        ? await CommissioningRecord.query(trx).patchAndFetchById(before.id, {
            ...values,
            version: before.version + 1,
          } as Partial<CommissioningRecord>)
        : await CommissioningRecord.query(trx).insertAndFetch({
            ...values,
            jobId,
            version: 1,
          } as Partial<CommissioningRecord>);
      await trx('commissioning_photos').where('job_id', jobId).delete();
      if (photoIds.length)
        await trx('commissioning_photos').insert(photoIds.map((id) => ({ job_id: jobId, file_id: id })));
      await recordChange(
        trx,
        actor,
        'commissioning_record',
        String(saved.id),
        before ? 'update' : 'create',
        before,
        { ...saved, photoFileIds: photoIds },
        String(job.firmId),
      );
      return this.get(actor, jobId, trx);
    });
  }
}
