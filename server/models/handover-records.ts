import type { Knex } from 'knex';
import type { Actor } from '../services/actor.ts';
import { readsHandoverRecords } from '../services/read-policy.ts';
import { ScopedModel, visibleJobIds, type AnyQuery } from './base.ts';

const knexOf = (q: AnyQuery): Knex => q.modelClass().knex();

/**
 * A job's commissioning record: whoever sees the job (the installer's office, crew booked on it),
 * never a partner firm (read-policy.ts `readsHandoverRecords`).
 */
export class CommissioningRecord extends ScopedModel {
  static override tableName = 'commissioning_records';
  id!: string;
  jobId!: string;
  pumpsPrimed!: boolean;
  pumpsTested!: boolean;
  heaterWorking!: boolean;
  lightsWorking!: boolean;
  noLeaks!: boolean;
  /** numeric columns arrive as strings; the service turns them into numbers. */
  ph!: string | number | null;
  totalAlkalinityPpm!: string | number | null;
  sanitiserPpm!: string | number | null;
  sanitiserKind!: 'chlorine' | 'bromine' | null;
  notes!: string | null;
  recordedBy!: string | null;
  version!: number;
  updatedAt!: Date;
  completedAt!: Date | null;
  static override scope(q: AnyQuery, actor: Actor) {
    if (!readsHandoverRecords(actor)) q.whereRaw('false');
    else q.whereIn('commissioning_records.job_id', visibleJobIds(knexOf(q), actor));
  }
}

/**
 * A job's electrical certificate: the installer's office and crew read it through the job; the
 * partner firm that uploaded it sees only its own row (its slot says it is uploaded).
 */
export class ElectricalCertificate extends ScopedModel {
  static override tableName = 'electrical_certificates';
  id!: string;
  jobId!: string;
  fileId!: string;
  uploadedByFirmId!: string;
  uploadedBy!: string | null;
  uploadedAt!: Date;
  static override scope(q: AnyQuery, actor: Actor) {
    if (readsHandoverRecords(actor)) q.whereIn('electrical_certificates.job_id', visibleJobIds(knexOf(q), actor));
    else q.where('electrical_certificates.uploaded_by_firm_id', actor.firmId);
  }
}

/** This module's scoped models, for the test that checks each declares its scope. */
export const HANDOVER_RECORD_MODELS = [CommissioningRecord, ElectricalCertificate] as const;
