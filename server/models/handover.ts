import type { Knex } from 'knex';
import type { Actor } from '../services/actor.ts';
import { ScopedModel, visibleJobIds, type AnyQuery } from './base.ts';

const knexOf = (q: AnyQuery): Knex => q.modelClass().knex();

/** A job's handover: visible to whoever sees the job (a partner firm never reaches its routes). */
export class Handover extends ScopedModel {
  static override tableName = 'handovers';
  static override jsonAttributes = ['checklist'];
  id!: string;
  jobId!: string;
  checklist!: Record<string, boolean>;
  householderName!: string;
  householderEmail!: string | null;
  signatureFileId!: string;
  packFileId!: string | null;
  packOutboxId!: string | null;
  signedAt!: Date;
  signedByUser!: string | null;
  createdAt!: Date;
  static override scope(q: AnyQuery, actor: Actor) {
    q.whereIn('handovers.job_id', visibleJobIds(knexOf(q), actor));
  }
}
