import type { Knex } from 'knex';
import type {
  CreateResource,
  CrewMembers,
  CrewPerson,
  RenameResource,
  SetCrewMembers,
} from '../../shared/schemas/resources.ts';
import type { AffectedBooking } from '../../shared/schemas/absences.ts';
import { BadRequestError, ConflictError, NotFoundError } from '../errors.ts';
import { reachOf, type Actor } from './actor.ts';
import { recordChange } from './audit.ts';
import { notifyFirmChange, notifyResourceChange } from './board-stream.ts';
import { lockResources } from './booking-writes.ts';
import { bookingsWithin } from './absences.ts';

/** Ids once each, in numeric order (how a crew's people are compared and kept). */
const sorted = (ids: readonly string[]) => [...new Set(ids)].sort((a, b) => Number(a) - Number(b));

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
  /** The working week it keeps when not the firm's standard week (its own firm only; see workingWeekFor). */
  workingWeek?: string | null;
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

  /** One of the firm's own crews, still on the books (404 otherwise, and to crew members). */
  private async ownCrew(actor: Actor, crewId: string, trx: Knex | Knex.Transaction = this.knex) {
    const crew = (await trx('resources')
      .where({ id: crewId, firm_id: actor.firmId, active: true })
      .first('id', 'name', 'category')) as { id: string; name: string; category: string } | undefined;
    if (!crew || reachOf(actor) === 'crew') throw new NotFoundError('resource');
    if (crew.category !== 'crew')
      throw new ConflictError(`${crew.name} is not a crew: only a crew has people in it.`, { code: 'not-a-crew' });
    return { ...crew, id: String(crew.id) };
  }

  /** Who is in the crew, and the firm's people on the books, each with the other crews they are in. */
  async members(actor: Actor, crewId: string, trx: Knex | Knex.Transaction = this.knex): Promise<CrewMembers> {
    const crew = await this.ownCrew(actor, crewId, trx);
    const people = (await trx('resources')
      .where({ firm_id: actor.firmId, category: 'person', active: true })
      .orderBy([{ column: 'name' }, { column: 'id' }])
      .select('id', 'name')) as { id: string; name: string }[];
    const links = (await trx('crew_members as cm')
      .join('resources as c', 'c.id', 'cm.crew_id')
      .where({ 'c.firm_id': actor.firmId, 'c.active': true })
      .select('cm.crew_id', 'cm.person_id', 'c.name as crew_name')) as {
      crewId: string;
      personId: string;
      crewName: string;
    }[];
    const view = (p: { id: string; name: string }): CrewPerson => ({
      id: String(p.id),
      name: p.name,
      alsoIn: links
        .filter((l) => String(l.personId) === String(p.id) && String(l.crewId) !== crew.id)
        .map((l) => l.crewName)
        .sort(),
    });
    const inCrew = new Set(links.filter((l) => String(l.crewId) === crew.id).map((l) => String(l.personId)));
    return {
      crewId: crew.id,
      members: people.filter((p) => inCrew.has(String(p.id))).map(view),
      people: people.map(view),
    };
  }

  /**
   * Sets who is in one of the firm's own crews. Refused (409 `person-double`, naming the bookings)
   * when a person added would then be in two places from now on: on this crew's booking and, at
   * the same time, on their own or another crew's (the board's one-person-in-two-places rule).
   */
  async setMembers(actor: Actor, crewId: string, input: SetCrewMembers): Promise<CrewMembers> {
    return this.knex.transaction(async (trx) => {
      // The lock every booking write takes, on everyone this change may put in two places, in one
      // go: the crew, the people it will hold and the other crews they are in. A booking written on
      // any of them meanwhile is seen below, or waits for this to commit (and its check sees the crew).
      const wanted = sorted(input.personIds);
      const theirCrews = (
        await trx('crew_members').whereIn('person_id', wanted).whereNot('crew_id', crewId).pluck('crew_id')
      ).map(String);
      await lockResources(trx, [crewId, ...wanted, ...theirCrews]);
      const crew = await this.ownCrew(actor, crewId, trx);
      // The people on the books (as the page lists them): one taken off before is dropped on saving.
      const now = (
        await trx('crew_members as cm')
          .join('resources as p', 'p.id', 'cm.person_id')
          .where({ 'cm.crew_id': crew.id, 'p.active': true })
          .orderBy('cm.person_id')
          .pluck('cm.person_id')
      ).map(String);
      if (JSON.stringify(sorted(now)) !== JSON.stringify(sorted(input.previousPersonIds)))
        throw new ConflictError('Someone else changed the people in this crew meanwhile: reload and try again.', {
          code: 'stale-version',
          current: await this.members(actor, crew.id, trx),
        });
      const ours = new Set(
        (
          await trx('resources')
            .whereIn('id', wanted)
            .where({ firm_id: actor.firmId, category: 'person', active: true })
            .pluck('id')
        ).map(String),
      );
      const strangers = wanted.filter((id) => !ours.has(id));
      if (strangers.length)
        throw new BadRequestError("Only the firm's own people on its books can be in its crew.", [
          { field: 'personIds', message: `must be your firm's own people on its books (not ${strangers.join(', ')})` },
        ]);
      const added = wanted.filter((id) => !now.includes(id));
      const doubles = await this.doublesFromNow(trx, actor, crew.id, added);
      if (doubles.length)
        throw new ConflictError(
          `${doubles[0]!.person} would be in two places: ${crew.name} is booked while they are booked elsewhere. Move one of the bookings first, or leave them out.`,
          { code: 'person-double', doubles },
        );
      await trx('crew_members').where('crew_id', crew.id).delete();
      if (wanted.length) await trx('crew_members').insert(wanted.map((p) => ({ crew_id: crew.id, person_id: p })));
      await recordChange(trx, actor, 'resource', crew.id, 'update', { personIds: sorted(now) }, { personIds: wanted });
      await notifyResourceChange(trx, crew.id);
      return this.members(actor, crew.id, trx);
    });
  }

  /** For each person added, the crew's bookings from now on that overlap their own or their other crews'. */
  private async doublesFromNow(
    trx: Knex.Transaction,
    actor: Actor,
    crewId: string,
    added: string[],
  ): Promise<{ person: string; crewBooking: AffectedBooking; elsewhere: AffectedBooking }[]> {
    if (added.length === 0) return [];
    const from = new Date(this.now());
    const onCrew = await bookingsWithin(trx, actor, [crewId], from);
    if (onCrew.length === 0) return [];
    const out: { person: string; crewBooking: AffectedBooking; elsewhere: AffectedBooking }[] = [];
    for (const personId of added) {
      const person = (await trx('resources').where('id', personId).first('name')) as { name: string };
      // Read again under the locks setMembers took (its first read only chose what to lock): a crew
      // this person joined just before is seen.
      const otherCrews = (
        await trx('crew_members').where('person_id', personId).whereNot('crew_id', crewId).pluck('crew_id')
      ).map(String);
      const elsewhere = await bookingsWithin(trx, actor, [personId, ...otherCrews], from);
      for (const a of onCrew)
        for (const b of elsewhere)
          if (a.startsAt < b.endsAt && b.startsAt < a.endsAt)
            out.push({ person: person.name, crewBooking: a, elsewhere: b });
    }
    return out;
  }

  /** The firm's own resources taken off its books, to put one back (by name). */
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
      // A person who leaves leaves their crews first (and the crews' bookings no longer count them).
      const crews = (await trx('crew_members as cm')
        .join('resources as c', 'c.id', 'cm.crew_id')
        .where({ 'cm.person_id': r.id, 'c.active': true })
        .orderBy('c.name')
        .pluck('c.name')) as string[];
      if (crews.length)
        throw new ConflictError(
          `${r.name} is in ${crews.join(' and ')}: take them out of ${crews.length === 1 ? 'the crew' : 'those crews'} first (a crew's Edit).`,
          { code: 'in-a-crew', crews },
        );
      await trx('resources').where('id', r.id).update({ active: false });
      await recordChange(trx, actor, 'resource', String(r.id), 'update', { active: true }, { active: false });
      await notifyFirmChange(trx, actor.firmId);
    });
  }
}
