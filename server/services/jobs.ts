import type { Knex } from 'knex';
import type { ModelObject } from 'objection';
import type { CreateJob, JobQuery, JobSummary, NextReference } from '../../shared/schemas/jobs.ts';
import { Job, Unit } from '../models/index.ts';
import { BadRequestError, ConflictError } from '../errors.ts';
import type { Actor } from './actor.ts';
import { findVisible, scoped } from './scope.ts';
import { recordChange } from './audit.ts';
import { jobForReader } from './read-policy.ts';

/** A job as its page reads it: the job's fields, its unit's name and when it was surveyed. */
export type JobView = ModelObject<Job> & {
  unitName: string | null;
  unitMaker: string | null;
  surveyedAt: string | null;
};

/** The prefix and digit width a firm's first job reference gets (our own starting point). */
const FIRST_PREFIX = 'J-';
const FIRST_WIDTH = 4;

/** A reference's prefix and trailing number, or null when it does not end in digits. @example splitReference('TW-2401') // { prefix: 'TW-', digits: '2401' } */
export function splitReference(reference: string): { prefix: string; digits: string } | null {
  const m = /^(.*?)(\d+)$/.exec(reference);
  return m ? { prefix: m[1] ?? '', digits: m[2] ?? '' } : null;
}

const SORT_COLUMNS: Record<JobQuery['sort'], string> = {
  promisedFrom: 'jobs.promised_from',
  reference: 'jobs.reference',
  customerName: 'jobs.customer_name',
  status: 'jobs.status',
  orderedOn: 'jobs.ordered_on',
};

export class JobsService {
  constructor(private readonly knex: Knex) {}

  /** The jobs list: search, filters, sorting and paging done in the database. */
  async list(actor: Actor, query: JobQuery): Promise<{ items: JobSummary[]; total: number }> {
    const base = scoped(Job, actor, undefined).leftJoin('units', 'units.id', 'jobs.unit_id');
    if (query.search) {
      const like = `%${query.search.replace(/[\\%_]/g, (c) => '\\' + c)}%`;
      base.where((w) =>
        w
          .whereILike('jobs.reference', like)
          .orWhereILike('jobs.customer_name', like)
          .orWhereILike('jobs.site_town', like)
          .orWhereILike('jobs.site_postcode', like),
      );
    }
    if (query.status) base.where('jobs.status', query.status);
    if (query.installationType) base.where('jobs.installation_type', query.installationType);
    const total = await base.clone().resultSize();
    const rows = (await base
      .select('jobs.*', 'units.model as unitName')
      .orderByRaw(`${SORT_COLUMNS[query.sort]} ${query.order} NULLS LAST, jobs.id`)
      .limit(query.pageSize)
      .offset((query.page - 1) * query.pageSize)) as (Job & { unitName: string | null })[];
    return {
      total,
      items: rows.map((j) => ({
        id: j.id,
        reference: j.reference,
        customerName: j.customerName,
        siteTown: j.siteTown,
        unitName: j.unitName,
        installationType: j.installationType,
        status: j.status,
        promisedFrom: j.promisedFrom,
        promisedTo: j.promisedTo,
        orderedOn: j.orderedOn,
      })),
    };
  }

  /**
   * One job as the reader may see it (read-policy.ts: crew get no householder e-mail or phone),
   * with its unit's name and when it was surveyed: the job page's header and step bar read these.
   * The unit is read through the job (crew see the unit of a job they are booked on, not the catalogue).
   */
  async get(actor: Actor, id: string): Promise<JobView> {
    const job = await findVisible(Job, actor, id, undefined, 'job');
    const extra = (await scoped(Job, actor)
      .where('jobs.id', id)
      .leftJoin('units', 'units.id', 'jobs.unit_id')
      .leftJoin('surveys', 'surveys.job_id', 'jobs.id')
      .select('units.model as unitName', 'units.maker as unitMaker', 'surveys.surveyed_at as surveyedAt')
      .first()) as unknown as
      { unitName: string | null; unitMaker: string | null; surveyedAt: Date | null } | undefined;
    return jobForReader(actor, {
      ...(job.toJSON() as ModelObject<Job>),
      unitName: extra?.unitName ?? null,
      unitMaker: extra?.unitMaker ?? null,
      surveyedAt: extra?.surveyedAt ? new Date(extra.surveyedAt).toISOString() : null,
    });
  }

  /**
   * The reference a new job would get: the firm's highest reference of the prefix + 1, with the
   * digits as wide as before (TW-0099 → TW-0100). Without a prefix, the latest job's prefix.
   *
   * @example
   * await jobs.nextReference(actor) // { prefix: 'TW-', nextReference: 'TW-2425' } when TW-2424 is the highest
   */
  async nextReference(actor: Actor, prefix?: string, trx?: Knex.Transaction): Promise<NextReference> {
    const chosen =
      prefix ??
      splitReference(
        (await scoped(Job, actor, trx).whereRaw(`jobs.reference ~ '[0-9]$'`).orderBy('jobs.id', 'desc').first())
          ?.reference ?? '',
      )?.prefix ??
      FIRST_PREFIX;
    // Only references that are the prefix then digits count: "TW-2401" for "TW-", not "TW-X1".
    const rows = await scoped(Job, actor, trx)
      .whereRaw('left(jobs.reference, ?) = ?', [chosen.length, chosen])
      .whereRaw(`substr(jobs.reference, ?) ~ '^[0-9]+$'`, [chosen.length + 1])
      .select('jobs.reference');
    let best: { n: bigint; width: number } | null = null;
    for (const { reference } of rows) {
      const digits = reference.slice(chosen.length);
      const n = BigInt(digits);
      if (!best || n > best.n) best = { n, width: digits.length };
    }
    const next = best ? best.n + 1n : 1n;
    return { prefix: chosen, nextReference: `${chosen}${String(next).padStart(best?.width ?? FIRST_WIDTH, '0')}` };
  }

  /** Refuses a reference another of the firm's jobs has, naming the next free one (409). */
  async checkReferenceFree(
    actor: Actor,
    reference: string,
    trx: Knex.Transaction,
    exceptJobId?: string,
  ): Promise<void> {
    const taken = await scoped(Job, actor, trx)
      .where('jobs.reference', reference)
      .modify((q) => {
        if (exceptJobId) q.whereNot('jobs.id', exceptJobId);
      })
      .first();
    if (!taken) return;
    const split = splitReference(reference);
    const { nextReference } = await this.nextReference(actor, split?.prefix, trx);
    throw new ConflictError(
      `${reference} is already the reference of another job (${taken.customerName}, ${taken.siteTown}). ${nextReference} is the next free one.`,
      {
        code: 'duplicate-reference',
        nextReference,
        errors: [{ field: 'reference', message: `is already used by another job; ${nextReference} is free` }],
      },
    );
  }

  async create(actor: Actor, input: CreateJob): Promise<Job> {
    return this.knex.transaction(async (trx) => {
      if (input.unitId && !(await scoped(Unit, actor, trx).findById(input.unitId))) {
        throw new BadRequestError('The unit is not in your catalogue.', [
          { field: 'unitId', message: 'is not a unit in your catalogue' },
        ]);
      }
      await this.checkReferenceFree(actor, input.reference, trx);
      const job = await Job.query(trx).insert({ ...input, firmId: actor.firmId, status: 'enquiry' } as Partial<Job>);
      await recordChange(trx, actor, 'job', job.id, 'create', null, job);
      return job;
    });
  }
}
