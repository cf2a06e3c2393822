import { Firm, Membership, Resource, Unit, User } from '../models/index.ts';
import { standardWeekIdOf, workingWeekIdOf } from '../models/base.ts';
import type { Actor } from './actor.ts';
import { workingWeekFor } from './read-policy.ts';
import { scoped } from './scope.ts';

/** Firms, people, resources and units as each role may see them. */
export class DirectoryService {
  async firms(actor: Actor) {
    const firms = await scoped(Firm, actor).orderBy('name');
    return firms.map((f) => ({
      id: f.id,
      name: f.name,
      kind: f.kind,
      timeZone: f.timeZone,
      holidayRegion: f.holidayRegion,
    }));
  }

  async members(actor: Actor) {
    const rows = (await scoped(Membership, actor)
      .join('users', 'users.id', 'memberships.user_id')
      .select('memberships.user_id', 'memberships.role', 'users.name', 'users.email')
      .orderBy('users.name')) as unknown as { userId: string; role: string; name: string; email: string }[];
    return rows.map((r) => ({ userId: r.userId, name: r.name, email: r.email, role: r.role }));
  }

  async resources(actor: Actor) {
    // The week each works to: its own, else its firm's standard week.
    const knex = Resource.knex();
    const rows = (await scoped(Resource, actor)
      .where('resources.active', true)
      .join('firms', 'firms.id', 'resources.firm_id')
      .leftJoin('calendars as week', 'week.id', workingWeekIdOf(knex, 'resources'))
      .select('resources.*', 'firms.name as firmName', 'firms.kind as firmKind', 'week.name as weekName')
      .select(knex.raw('week.id = ? AS standard_week', [standardWeekIdOf(knex, 'resources')]))
      .orderBy(['firms.name', 'resources.kind', 'resources.name'])) as (Resource & {
      firmName: string;
      firmKind: string;
      weekName: string | null;
      standardWeek: boolean;
    })[];
    return rows.map((r) => ({
      id: r.id,
      name: r.name,
      category: r.category,
      kind: r.kind,
      firmId: r.firmId,
      firmName: r.firmName,
      firmKind: r.firmKind,
      ownership: r.firmId === actor.firmId ? r.ownership : ('partner' as const),
      workingWeek: workingWeekFor(actor, {
        firmId: String(r.firmId),
        weekName: r.weekName,
        standardWeek: r.standardWeek === true,
      }),
    }));
  }

  async units(actor: Actor) {
    return scoped(Unit, actor).orderBy('model');
  }

  async user(actor: Actor, id: string) {
    return scoped(User, actor).findById(id);
  }
}
