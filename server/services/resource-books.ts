import type { Knex } from 'knex';
import type { CreateResource, RenameResource } from '../../shared/schemas/resources.ts';
import { ConflictError, NotFoundError } from '../errors.ts';
import { reachOf, type Actor } from './actor.ts';
import { recordChange } from './audit.ts';
import { notifyFirmChange } from './board-stream.ts';
import { lockResources } from './booking-writes.ts';
import { bookingsWithin } from './absences.ts';

/** A resource as the Resources page lists it (the shape of GET /api/resources). */
export interface ResourceListed {
  id: string;
  name: string;
  category: 'crew' | 'person' | 'machine';
  kind: string;
  firmId: string;
  firmName: string;
  firmKind: string;
  ownership: 'owned' | 'hired';
}

/**
 * The firm's own books of crews, people and machines: a new one added, an old one taken off (kept,
 * with its history, but no longer shown or booked). Only the firm that owns a resource changes it;
 * another firm's is 404, as if it did not exist.
 */
export class ResourceBooksService {
  constructor(
    private readonly knex: Knex,
    private readonly now: () => number,
  ) {}

  async add(actor: Actor, input: CreateResource): Promise<ResourceListed> {
    if (reachOf(actor) === 'crew') throw new NotFoundError('firm');
    return this.knex.transaction(async (trx) => {
      const firm = (await trx('firms').where('id', actor.firmId).first('name', 'kind')) as {
        name: string;
        kind: string;
      };
      const calendar = (await trx('calendars').where('firm_id', actor.firmId).orderBy('id').first('id')) as
        { id: string } | undefined;
      const [row] = (await trx('resources')
        .insert({
          firm_id: actor.firmId,
          name: input.name,
          category: input.category,
          kind: input.kind,
          ownership: input.ownership,
          phone: input.phone ?? null,
          calendar_id: calendar?.id ?? null,
        })
        .returning(['id', 'name', 'category', 'kind', 'ownership'])) as Omit<
        ResourceListed,
        'firmId' | 'firmName' | 'firmKind'
      >[];
      const listed: ResourceListed = {
        ...row!,
        id: String(row!.id),
        firmId: actor.firmId,
        firmName: firm.name,
        firmKind: firm.kind,
      };
      await recordChange(trx, actor, 'resource', listed.id, 'create', null, listed);
      await notifyFirmChange(trx, actor.firmId);
      return listed;
    });
  }

  /**
   * Renames one of the firm's own resources (its bookings, past and ahead, follow: they point at
   * the resource, not its name). Refused (409) when someone renamed it since the page loaded.
   */
  async rename(actor: Actor, resourceId: string, input: RenameResource): Promise<{ id: string; name: string }> {
    return this.knex.transaction(async (trx) => {
      const r = (await trx('resources')
        .where({ id: resourceId, firm_id: actor.firmId, active: true })
        .forUpdate()
        .first('id', 'name')) as { id: string; name: string } | undefined;
      if (!r || reachOf(actor) === 'crew') throw new NotFoundError('resource');
      if (r.name !== input.previousName)
        throw new ConflictError(`This resource was renamed meanwhile, to ${r.name}: reload and try again.`, {
          code: 'stale-version',
          current: { id: String(r.id), name: r.name },
        });
      if (r.name === input.name) return { id: String(r.id), name: r.name };
      await trx('resources').where('id', r.id).update({ name: input.name });
      await recordChange(trx, actor, 'resource', String(r.id), 'update', { name: r.name }, { name: input.name });
      await notifyFirmChange(trx, actor.firmId);
      return { id: String(r.id), name: input.name };
    });
  }

  /** The firm's own resources taken off its books, to put one back (most recently taken off first). */
  async retired(actor: Actor): Promise<ResourceListed[]> {
    if (reachOf(actor) === 'crew') throw new NotFoundError('firm');
    const firm = (await this.knex('firms').where('id', actor.firmId).first('name', 'kind')) as {
      name: string;
      kind: string;
    };
    const rows = (await this.knex('resources')
      .where({ firm_id: actor.firmId, active: false })
      .orderBy([{ column: 'name' }, { column: 'id' }])
      .select('id', 'name', 'category', 'kind', 'ownership')) as Omit<
      ResourceListed,
      'firmId' | 'firmName' | 'firmKind'
    >[];
    return rows.map((r) => ({
      ...r,
      id: String(r.id),
      firmId: actor.firmId,
      firmName: firm.name,
      firmKind: firm.kind,
    }));
  }

  /**
   * Puts a resource taken off the books back on them, with its history (undoing a slip, or a crew
   * made up again). Refused (409) while another of the firm's resources has its name.
   */
  async restore(actor: Actor, resourceId: string): Promise<{ id: string; name: string }> {
    return this.knex.transaction(async (trx) => {
      const r = (await trx('resources')
        .where({ id: resourceId, firm_id: actor.firmId })
        .forUpdate()
        .first('id', 'name', 'active')) as { id: string; name: string; active: boolean } | undefined;
      if (!r || reachOf(actor) === 'crew') throw new NotFoundError('resource');
      if (r.active) throw new ConflictError(`${r.name} is on the books already.`, { code: 'not-retired' });
      // Another resource of that name on the books meanwhile: the unique name index refuses it (409, naming the name).
      await trx('resources').where('id', r.id).update({ active: true });
      await recordChange(trx, actor, 'resource', String(r.id), 'update', { active: false }, { active: true });
      await notifyFirmChange(trx, actor.firmId);
      return { id: String(r.id), name: r.name };
    });
  }

  /**
   * Takes a resource off the firm's books. Refused (409, naming them) while it has bookings from
   * now on that stand: those are moved or taken off the board first, so no booking loses its crew.
   */
  async retire(actor: Actor, resourceId: string): Promise<void> {
    await this.knex.transaction(async (trx) => {
      // A booking being written on it meanwhile is either seen below or, once this commits, refused.
      await lockResources(trx, [resourceId]);
      const r = (await trx('resources')
        .where({ id: resourceId, firm_id: actor.firmId, active: true })
        .forUpdate()
        .first('id', 'name')) as { id: string; name: string } | undefined;
      if (!r || reachOf(actor) === 'crew') throw new NotFoundError('resource');
      const ahead = await bookingsWithin(trx, actor, [r.id], new Date(this.now()));
      if (ahead.length) {
        throw new ConflictError(
          `${r.name} has ${ahead.length === 1 ? 'a booking' : `${ahead.length} bookings`} from now on: move ${ahead.length === 1 ? 'it' : 'them'} to someone else or take ${ahead.length === 1 ? 'it' : 'them'} off the board first.`,
          { code: 'resource-booked', bookings: ahead },
        );
      }
      await trx('resources').where('id', r.id).update({ active: false });
      await recordChange(trx, actor, 'resource', String(r.id), 'update', { active: true }, { active: false });
      await notifyFirmChange(trx, actor.firmId);
    });
  }
}
