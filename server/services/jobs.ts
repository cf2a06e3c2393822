import type { Knex } from 'knex';
import type { CreateJob, JobQuery, JobSummary } from '../../shared/schemas/jobs.ts';
import { Job, Unit } from '../models/index.ts';
import { BadRequestError } from '../errors.ts';
import type { Actor } from './actor.ts';
import { findVisible, scoped } from './scope.ts';
import { recordChange } from './audit.ts';
import { jobForReader } from './read-policy.ts';

const SORT_COLUMNS: Record<JobQuery['sort'], string> = {
  promisedFrom: 'jobs.promised_from', reference: 'jobs.reference', customerName: 'jobs.customer_name',
  status: 'jobs.status', orderedOn: 'jobs.ordered_on',
};

export class JobsService {
  constructor(private readonly knex: Knex) {}

  /** The jobs list: search, filters, sorting and paging done in the database. */
  async list(actor: Actor, query: JobQuery): Promise<{ items: JobSummary[]; total: number }> {
    const base = scoped(Job, actor, undefined).leftJoin('units', 'units.id', 'jobs.unit_id');
    if (query.search) {
      const like = `%${query.search.replace(/[\\%_]/g, (c) => '\\' + c)}%`;
      base.where((w) => w.whereILike('jobs.reference', like).orWhereILike('jobs.customer_name', like)
        .orWhereILike('jobs.site_town', like).orWhereILike('jobs.site_postcode', like));
    }
    if (query.status) base.where('jobs.status', query.status);
    if (query.installationType) base.where('jobs.installation_type', query.installationType);
    const total = await base.clone().resultSize();
    const rows = await base
      .select('jobs.*', 'units.model as unitName')
      .orderByRaw(`${SORT_COLUMNS[query.sort]} ${query.order} NULLS LAST, jobs.id`)
      .limit(query.pageSize).offset((query.page - 1) * query.pageSize) as (Job & { unitName: string | null })[];
    return {
      total,
      items: rows.map((j) => ({
        id: j.id, reference: j.reference, customerName: j.customerName, siteTown: j.siteTown,
        unitName: j.unitName, installationType: j.installationType, status: j.status,
        promisedFrom: j.promisedFrom, promisedTo: j.promisedTo, orderedOn: j.orderedOn,
      })),
    };
  }

  /** One job as the reader may see it (read-policy.ts: crew get no householder e-mail or phone). */
  async get(actor: Actor, id: string): Promise<Job> {
    return jobForReader(actor, await findVisible(Job, actor, id, undefined, 'job'));
  }

  async create(actor: Actor, input: CreateJob): Promise<Job> {
    return this.knex.transaction(async (trx) => {
      if (input.unitId && !(await scoped(Unit, actor, trx).findById(input.unitId))) {
        throw new BadRequestError('The unit is not in your catalogue.', [{ field: 'unitId', message: 'is not a unit in your catalogue' }]);
      }
      const job = await Job.query(trx).insert({ ...input, firmId: actor.firmId, status: 'enquiry' } as Partial<Job>);
      await recordChange(trx, actor, 'job', job.id, 'create', null, job);
      return job;
    });
  }
}
