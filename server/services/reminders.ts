import type { Knex } from 'knex';
import { enqueueMessage } from './outbox.ts';

/**
 * Finds requests still unanswered `reminderHours` after they were sent (the current version of a
 * booking still in 'sent', no answer for that version), flags them overdue for the board and queues
 * one reminder each, all in one transaction. A version is flagged and reminded at most once.
 */
export async function scanOverdueRequests(
  knex: Knex,
  options: { now: Date; reminderHours: number; limit?: number },
): Promise<number> {
  const cutoff = new Date(options.now.getTime() - options.reminderHours * 3_600_000);
  return knex.transaction(async (trx) => {
    const due = (await trx('booking_requests as r')
      .join('bookings as b', 'b.id', 'r.booking_id')
      .whereNull('r.overdue_at')
      .where('r.requested_at', '<=', cutoff)
      .where('b.state', 'sent')
      .whereRaw('b.version = r.booking_version')
      .whereNotExists(
        trx('booking_answers as a')
          .whereRaw('a.booking_id = r.booking_id')
          .whereRaw('a.booking_version = r.booking_version'),
      )
      .orderBy('r.requested_at')
      .limit(options.limit ?? 500)
      .forUpdate('r')
      .skipLocked()
      .select('r.id', 'r.booking_id', 'r.booking_version')) as {
      id: string;
      bookingId: string;
      bookingVersion: number;
    }[];
    for (const r of due) {
      await trx('booking_requests').where('id', r.id).update({ overdue_at: options.now });
      await enqueueMessage(trx, `booking.${r.bookingId}.v${r.bookingVersion}.reminder`, 'booking_reminder', {
        bookingId: String(r.bookingId),
        version: r.bookingVersion,
      });
    }
    return due.length;
  });
}
