import type { Knex } from 'knex';
import type { BookingView } from '../../shared/schemas/bookings.ts';
import type { BookingAnswerFields, BookingAnswerView } from '../../shared/schemas/answers.ts';
import type { AnswerAction } from './links.ts';

export type BookingWithAnswer = BookingView & BookingAnswerFields;

export interface AnswerRow {
  id: string; bookingId: string; bookingVersion: number; action: AnswerAction; via: 'link' | 'app'; createdAt: Date;
  proposedStartsAt: Date | null; proposedEndsAt: Date | null; proposalStatus: 'open' | 'accepted' | 'refused' | null;
}

const toAnswerView = (a: AnswerRow): BookingAnswerView => ({
  id: String(a.id), action: a.action, version: a.bookingVersion, via: a.via, at: a.createdAt.toISOString(),
  proposedStart: a.proposedStartsAt?.toISOString() ?? null, proposedEnd: a.proposedEndsAt?.toISOString() ?? null,
  proposalStatus: a.proposalStatus,
});

/** The latest answer of each booking, by booking id. */
export async function latestAnswers(knex: Knex | Knex.Transaction, bookingIds: string[]): Promise<Map<string, BookingAnswerView>> {
  if (bookingIds.length === 0) return new Map();
  const rows = await knex('booking_answers').whereIn('booking_id', bookingIds).distinctOn('booking_id')
    .orderBy([{ column: 'booking_id' }, { column: 'created_at', order: 'desc' }, { column: 'id', order: 'desc' }]) as AnswerRow[];
  return new Map(rows.map((r) => [String(r.bookingId), toAnswerView(r)]));
}

/**
 * Adds the board's answer fields to booking views: the latest answer or proposal, and `overdue`
 * when the request for the current version is still unanswered after the reminder scan flagged it.
 */
export async function withAnswers<T extends Pick<BookingView, 'id' | 'version' | 'state'>>(knex: Knex | Knex.Transaction, views: T[]): Promise<(T & BookingAnswerFields)[]> {
  const ids = views.map((v) => v.id);
  const answers = await latestAnswers(knex, ids);
  const flagged = ids.length ? await knex('booking_requests').whereIn('booking_id', ids).whereNotNull('overdue_at')
    .select('booking_id', 'booking_version') as { bookingId: string; bookingVersion: number }[] : [];
  const overdue = new Set(flagged.map((r) => `${r.bookingId}.${r.bookingVersion}`));
  return views.map((v) => {
    const answer = answers.get(v.id) ?? null;
    const answered = answer !== null && answer.version === v.version;
    return { ...v, answer, overdue: v.state === 'sent' && !answered && overdue.has(`${v.id}.${v.version}`) };
  });
}
