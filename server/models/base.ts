import { Model, type QueryBuilder } from 'objection';
import type { Knex } from 'knex';
import { reachOf, type Actor } from '../services/actor.ts';

// Objection's query builder over any model, as used by the scope functions.
// eslint-disable-next-line @typescript-eslint/no-explicit-any
export type AnyQuery = QueryBuilder<any, any>;

/**
 * Every model the server queries for a user states which rows that user may see. `scoped()` in
 * services/scope.ts is the one way services query for a user, and it always applies this.
 */
export class ScopedModel extends Model {
  static scope(_query: AnyQuery, _actor: Actor): void {
    throw new Error(`${this.name} has no firm scope`);
  }
}

/** Firms an actor may see: their own, plus the other side of each partnership. */
export function visibleFirmIds(knex: Knex, actor: Actor): Knex.QueryBuilder {
  if (reachOf(actor) === 'installer-office' || reachOf(actor) === 'crew') {
    return knex
      .select('partner_firm_id')
      .from('partnerships')
      .where('installer_firm_id', actor.firmId)
      .union((q) => q.select(knex.raw('?::bigint', [actor.firmId])));
  }
  return knex
    .select('installer_firm_id')
    .from('partnerships')
    .where('partner_firm_id', actor.firmId)
    .union((q) => q.select(knex.raw('?::bigint', [actor.firmId])));
}

/** Resources an actor acts on: a crew member's own person row and the crews they belong to. */
export function ownResourceIds(knex: Knex, actor: Actor): Knex.QueryBuilder {
  return knex
    .select('id')
    .from('resources')
    .where('user_id', actor.userId)
    .union((q) =>
      q
        .select('cm.crew_id')
        .from('crew_members as cm')
        .join('resources as p', 'p.id', 'cm.person_id')
        .where('p.user_id', actor.userId),
    );
}

/** Resources a partner firm owns. */
export function firmResourceIds(knex: Knex, firmId: string): Knex.QueryBuilder {
  return knex.select('id').from('resources').where('firm_id', firmId);
}

/** Jobs an actor may see. */
export function visibleJobIds(knex: Knex, actor: Actor): Knex.QueryBuilder {
  switch (reachOf(actor)) {
    case 'installer-office':
      return knex.select('id').from('jobs').where('firm_id', actor.firmId);
    case 'crew':
      return knex
        .select('s.job_id')
        .from('stages as s')
        .join('bookings as b', 'b.stage_id', 's.id')
        .join('jobs as j', 'j.id', 's.job_id')
        .where('j.firm_id', actor.firmId)
        .whereIn('b.resource_id', ownResourceIds(knex, actor));
    case 'partner':
      return knex
        .select('s.job_id')
        .from('stages as s')
        .join('bookings as b', 'b.stage_id', 's.id')
        .whereIn('b.resource_id', firmResourceIds(knex, actor.firmId));
  }
}

/**
 * The firm's standard week for a resource row aliased `alias`, as SQL: its firm's first calendar.
 * A resource with no week of its own works to it (see {@link workingWeekIdOf}).
 */
export function standardWeekIdOf(knex: Knex, alias: string): Knex.Raw {
  return knex.raw('(SELECT min(s.id) FROM calendars s WHERE s.firm_id = ??.firm_id)', [alias]);
}

/** The working week a resource row aliased `alias` works to, as SQL: its own, else its firm's standard week. */
export function workingWeekIdOf(knex: Knex, alias: string): Knex.Raw {
  return knex.raw('coalesce(??.calendar_id, ?)', [alias, standardWeekIdOf(knex, alias)]);
}
