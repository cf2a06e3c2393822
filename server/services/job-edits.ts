import type { Knex } from 'knex';
import type { UpdateJob } from '../../shared/schemas/jobs.ts';
import { Job, Unit } from '../models/index.ts';
import { BadRequestError, ConflictError, NotFoundError } from '../errors.ts';
import type { Actor } from './actor.ts';
import { scoped } from './scope.ts';
import { recordChange } from './audit.ts';
import { notifyJobChange } from './board-stream.ts';
import { JobsService } from './jobs.ts';

/** Editing a job's details, guarded by its version. */
export class JobEditsService {
  constructor(private readonly knex: Knex) {}

  async update(actor: Actor, id: string, input: UpdateJob): Promise<Job> {
    return this.knex.transaction(async (trx) => {
      // The job's row queues its own saves; FOR NO KEY UPDATE lets writes that only point at it go on.
      const before = await scoped(Job, actor, trx).findById(id).forNoKeyUpdate();
      if (!before) throw new NotFoundError('job');
      if (before.version !== input.version) {
        throw new ConflictError('Someone else changed this job since you loaded it.', {
          code: 'stale-version',
          current: before,
        });
      }
      const { version: _version, ...changes } = input;
      if (changes.reference !== undefined && changes.reference !== before.reference)
        await new JobsService(this.knex).checkReferenceFree(actor, changes.reference, trx, id);
      if (changes.unitId && !(await scoped(Unit, actor, trx).findById(changes.unitId))) {
        throw new BadRequestError('The unit is not in your catalogue.', [
          { field: 'unitId', message: 'is not a unit in your catalogue' },
        ]);
      }
      // Left out, a date stays as it was; null clears it.
      const from = changes.promisedFrom === undefined ? before.promisedFrom : changes.promisedFrom;
      const to = changes.promisedTo === undefined ? before.promisedTo : changes.promisedTo;
      if (from && to && to < from) {
        throw new BadRequestError('The promised window ends before it starts.', [
          { field: 'promisedTo', message: 'must be on or after the start of the promised window' },
        ]);
      }
      const after = await Job.query(trx).patchAndFetchById(id, {
        ...changes,
        version: before.version + 1,
      } as Partial<Job>);
      await recordChange(trx, actor, 'job', id, 'update', before, after);
      // Open boards show its reference, customer and promised window: they reload.
      await notifyJobChange(trx, String(id));
      return after;
    });
  }
}
