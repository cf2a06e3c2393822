import type { Knex } from 'knex';
import { AuditEntry } from '../models/index.ts';
import type { Actor } from './actor.ts';
import { notifyBookingChange } from './board-stream.ts';

/** Writes one audit row inside the caller's transaction: who, when, before and after. */
export async function recordChange(
  trx: Knex.Transaction,
  actor: Actor | null,
  entity: string,
  entityId: string,
  action: 'create' | 'update' | 'delete',
  before: unknown,
  after: unknown,
  firmId = actor?.firmId ?? null,
): Promise<void> {
  await AuditEntry.query(trx).insert({
    firmId,
    actorUserId: actor?.userId ?? null,
    entity,
    entityId,
    action,
    before: before === null ? null : JSON.stringify(before),
    after: after === null ? null : JSON.stringify(after),
  } as Partial<AuditEntry>);
  // Every booking change reaches the open boards once the transaction commits.
  const booking = (after ?? before) as { stageId?: string; resourceId?: string } | null;
  if (entity === 'booking' && booking?.stageId && booking.resourceId)
    await notifyBookingChange(trx, entityId, booking.stageId, booking.resourceId);
}
