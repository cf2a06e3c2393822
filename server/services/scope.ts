import type { Knex } from 'knex';
import type { QueryBuilder } from 'objection';
import { NotFoundError } from '../errors.ts';
import type { AnyQuery, ScopedModel } from '../models/base.ts';
import type { Actor } from './actor.ts';

/**
 * The one way a service queries on behalf of a user: the model's firm scope is always applied, so
 * another firm's rows are simply not there (and their ids give 404, never data).
 */
export function scoped<C extends typeof ScopedModel>(
  model: C,
  actor: Actor,
  trx?: Knex.Transaction,
): QueryBuilder<InstanceType<C>, InstanceType<C>[]> {
  const query = model.query(trx) as unknown as QueryBuilder<InstanceType<C>, InstanceType<C>[]>;
  return query.modify((q: AnyQuery) => model.scope(q, actor));
}

/** A visible row by id, or NotFoundError. */
export async function findVisible<C extends typeof ScopedModel>(
  model: C,
  actor: Actor,
  id: string,
  trx?: Knex.Transaction,
  what?: string,
): Promise<InstanceType<C>> {
  const row = await scoped(model, actor, trx).findById(id);
  if (!row) throw new NotFoundError(what ?? model.tableName.replace(/s$/, ''));
  return row;
}
