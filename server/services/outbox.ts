import type { Knex } from 'knex';
import type { Booking } from '../models/index.ts';
import type { OutboxKind, OutboxPayload } from '../mail/messages.ts';
import type { Actor } from './actor.ts';

export type BookingMessageKind = 'request' | 'update' | 'cancel';

/** Stages whose date the householder is told (they must clear access and parking for it). */
export const CUSTOMER_NOTICE_STAGES = ['delivery', 'lift'];

/**
 * Writes one outbox row inside the caller's transaction, so the message exists exactly when the
 * change that causes it commits. A second write with the same key is ignored (returns false).
 * Keys use '.' and '-' only: they become BullMQ job ids, which may not contain ':'.
 */
export async function enqueueMessage(
  trx: Knex.Transaction | Knex,
  key: string,
  kind: OutboxKind,
  payload: OutboxPayload,
): Promise<boolean> {
  const rows = await trx('outbox')
    .insert({ idempotency_key: key, kind, payload: JSON.stringify(payload) })
    .onConflict('idempotency_key')
    .ignore()
    .returning('id');
  return rows.length > 0;
}

/**
 * Queues the e-mail (with its iCalendar invite) that tells a partner about a booking version:
 * a request, an update (new time or resource) or a cancellation. Requests and updates also record
 * when this version was asked for, which the reminder scan and the board's overdue flag read.
 */
export async function queueBookingMessage(
  trx: Knex.Transaction,
  input: { bookingId: string; kind: BookingMessageKind; version: number; resourceId?: string },
): Promise<boolean> {
  const resourceId =
    input.resourceId ?? String((await trx('bookings').where('id', input.bookingId).first('resource_id')).resourceId);
  const queued = await enqueueMessage(
    trx,
    `booking.${input.bookingId}.v${input.version}.${input.kind}.r${resourceId}`,
    `booking_${input.kind}`,
    { bookingId: input.bookingId, version: input.version, resourceId },
  );
  if (input.kind !== 'cancel') {
    await trx('booking_requests')
      .insert({ booking_id: input.bookingId, booking_version: input.version, resource_id: resourceId })
      .onConflict(['booking_id', 'booking_version'])
      .ignore();
  }
  return queued;
}

/** Tells the householder a delivery or lift date was confirmed or moved (once per stage and date). */
export async function queueCustomerNotice(
  trx: Knex.Transaction,
  input: { bookingId: string; event: 'confirmed' | 'changed' },
): Promise<boolean> {
  const row = await trx('bookings as b')
    .join('stages as s', 's.id', 'b.stage_id')
    .join('jobs as j', 'j.id', 's.job_id')
    .where('b.id', input.bookingId)
    .first('b.version', 'b.starts_at', 's.id as stage_id', 's.kind', 'j.customer_email');
  if (!row || !CUSTOMER_NOTICE_STAGES.includes(row.kind) || !row.customerEmail) return false;
  // Several bookings make up one lift (crane, crew, trucks): the householder hears once per date.
  return enqueueMessage(
    trx,
    `customer.stage${row.stageId}.${input.event}.${row.startsAt.getTime()}`,
    'customer_notice',
    { bookingId: input.bookingId, version: row.version, event: input.event },
  );
}

const OUT = ['sent', 'confirmed'];

/**
 * A sent or confirmed booking of a partner's resource was taken off the board: the partner gets a
 * cancellation. The booking row is gone, so the message is rendered from the audit row's snapshot
 * (the payload still holds ids only). Called by the guarded write path after it audits the delete.
 */
export async function bookingRemoved(trx: Knex.Transaction, actor: Actor, before: Booking): Promise<void> {
  if (!OUT.includes(before.state)) return;
  const resource = await trx('resources').where('id', before.resourceId).first('firm_id');
  if (!resource || String(resource.firmId) === actor.firmId) return;
  const audit = await trx('audit_log')
    .where({ entity: 'booking', entity_id: before.id, action: 'delete' })
    .orderBy('id', 'desc')
    .first('id');
  await enqueueMessage(
    trx,
    `booking.${before.id}.v${before.version + 1}.cancel.r${before.resourceId}`,
    'booking_cancel',
    {
      bookingId: String(before.id),
      version: before.version + 1,
      resourceId: String(before.resourceId),
      auditId: audit ? String(audit.id) : undefined,
    },
  );
}
