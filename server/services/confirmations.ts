import type { Knex } from 'knex';
import { ConstraintViolationError } from 'objection';
import type { PartnerAnswer } from '../../shared/schemas/answers.ts';
import { Booking } from '../models/index.ts';
import { ConflictError, NotFoundError, UnprocessableError } from '../errors.ts';
import type { Actor } from './actor.ts';
import { BookingsService } from './bookings.ts';
import type { AnswerAction, AnswerClaims } from './links.ts';
import type { AnswerRow, BookingWithAnswer } from './answer-views.ts';
import {
  BookingWriter,
  ResourceHeldError,
  StaleVersionError,
  TransitionRefusedError,
  partyOf,
  slotChanged,
  type BookingLimits,
  type BookingWork,
  type WriteContext,
} from './booking-writes.ts';

export { latestAnswers, withAnswers, type BookingWithAnswer } from './answer-views.ts';

/** What became of an answer: done, or why not. */
export type AnswerOutcome =
  | { result: 'confirmed' | 'declined' | 'proposed'; booking: Booking }
  | { result: 'stale'; booking: Booking }
  | { result: 'closed'; booking: Booking }
  | { result: 'taken'; booking: Booking }
  | { result: 'used' }
  | { result: 'gone' };

const ANSWER_ACTION = { confirm: 'accept', decline: 'decline', propose: 'propose' } as const;

export function isExclusionViolation(error: unknown): boolean {
  const e = error as { code?: string; nativeError?: { code?: string } };
  return (
    error instanceof ResourceHeldError ||
    error instanceof ConstraintViolationError ||
    e?.code === '23P01' ||
    e?.nativeError?.code === '23P01'
  );
}

/**
 * The key that makes an answer link single-use per request: whichever of its buttons (confirm,
 * decline, propose) is used first, the request for that booking version is answered.
 */
export function requestKeyOf(claims: Pick<AnswerClaims, 'bookingId' | 'version'>): string {
  return `answer.b${claims.bookingId}.v${claims.version}`;
}

/** Thrown inside a transaction to roll it back and hand an outcome out. */
class Outcome extends Error {
  constructor(readonly outcome: AnswerOutcome) {
    super(outcome.result);
  }
}

/**
 * Requests to partner firms and their answers: the scheduler publishes, cancels and decides on
 * proposals; the partner (through a signed link or the partner pages) confirms, declines or
 * proposes another time. Every booking change goes through the guarded write path, which writes
 * its e-mails to the outbox in the same transaction.
 */
export class ConfirmationsService {
  private readonly bookings: BookingsService;
  private readonly writer: BookingWriter;

  constructor(
    private readonly knex: Knex,
    now: () => number = Date.now,
    limits?: BookingLimits,
  ) {
    this.bookings = new BookingsService(knex, now, limits);
    this.writer = new BookingWriter(knex, now, limits);
  }

  private async view(actor: Actor, id: string): Promise<BookingWithAnswer> {
    return this.bookings.get(actor, id);
  }

  /** Sends a pencilled (or declined) booking of a partner's resource as a request: → sent, version + 1. */
  async publish(actor: Actor, id: string, version: number): Promise<BookingWithAnswer> {
    await this.writer.run({ actor, party: partyOf(actor) }, { bookingIds: [id] }, async (w) => {
      const before = await w.booking(id, version);
      if ((await w.sideOfBooking(before)) === 'own') {
        throw new UnprocessableError(
          "This is your own firm's resource: confirm it on the board. Requests go to partner firms.",
          { code: 'own-resource' },
        );
      }
      return w.apply({ action: 'send', bookingId: id, version });
    });
    return this.view(actor, id);
  }

  /** Withdraws a request or confirmed slot from the partner: → pencilled, version + 1, METHOD:CANCEL. */
  async cancel(actor: Actor, id: string, version: number): Promise<BookingWithAnswer> {
    await this.writer.run({ actor, party: partyOf(actor) }, { bookingIds: [id] }, (w) =>
      w.apply({ action: 'withdraw', bookingId: id, version }),
    );
    return this.view(actor, id);
  }

  private async openProposal(trx: Knex.Transaction, bookingId: string): Promise<AnswerRow> {
    const proposal = (await trx('booking_answers')
      .where({ booking_id: bookingId, action: 'propose', proposal_status: 'open' })
      .orderBy('created_at', 'desc')
      .orderBy('id', 'desc')
      .first()) as AnswerRow | undefined;
    if (!proposal) throw new ConflictError('There is no open proposal for this booking.', { code: 'no-open-proposal' });
    return proposal;
  }

  /**
   * Moves the booking to the partner's proposed time (version + 1) and sends the update to confirm.
   * The engine checks the new time like any move: a time that breaks the plan is refused (422).
   */
  async acceptProposal(actor: Actor, id: string, version: number): Promise<BookingWithAnswer> {
    await this.writer.run({ actor, party: partyOf(actor) }, { bookingIds: [id] }, async (w) => {
      await w.booking(id, version);
      const proposal = await this.openProposal(w.trx, id);
      await w.apply({
        action: 'take-proposal',
        bookingId: id,
        version,
        startsAt: proposal.proposedStartsAt!.getTime(),
        endsAt: proposal.proposedEndsAt!.getTime(),
      });
      await w
        .trx('booking_answers')
        .where('id', proposal.id)
        .update({ proposal_status: 'accepted', decided_by: actor.userId, decided_at: new Date() });
    });
    return this.view(actor, id);
  }

  /** Keeps the original slot; the partner is told and asked again to confirm it (a new request version). */
  async refuseProposal(actor: Actor, id: string, version: number): Promise<BookingWithAnswer> {
    await this.writer.run({ actor, party: partyOf(actor) }, { bookingIds: [id] }, async (w) => {
      await w.booking(id, version);
      const proposal = await this.openProposal(w.trx, id);
      await w
        .trx('booking_answers')
        .where('id', proposal.id)
        .update({ proposal_status: 'refused', decided_by: actor.userId, decided_at: new Date() });
      await w.apply({ action: 'refuse-proposal', bookingId: id, version });
    });
    return this.view(actor, id);
  }

  /** A partner's answer from their own pages; the booking must be one of their firm's, already asked of them. */
  async answerAsPartner(actor: Actor, id: string, input: PartnerAnswer): Promise<AnswerOutcome> {
    const proposal =
      input.action === 'propose'
        ? { start: new Date(input.proposedStart!), end: new Date(input.proposedEnd!) }
        : undefined;
    return this.answer(
      { actor, party: 'partner' },
      id,
      async (w) => {
        const booking = await w.booking(id);
        if (booking.state === 'pencilled') throw new NotFoundError('booking');
        // After the pencilled check: a version must not tell a partner of a booking it can't see.
        if (booking.version !== input.version) throw slotChanged(booking);
        return booking;
      },
      input.action,
      proposal,
      'app',
      input.reason,
    );
  }

  /**
   * An answer through a signed link: the token is the authority, and its request can be answered once.
   * A decline or proposal may carry the partner's reason (already checked by the AnswerReason schema).
   */
  async answerByLink(
    claims: AnswerClaims,
    proposal?: { start: Date; end: Date },
    reason?: string,
  ): Promise<AnswerOutcome> {
    return this.answer(
      { actor: null, party: 'partner' },
      claims.bookingId,
      async (w) => {
        // Taking the request's key first makes a second answer to the same request wait here, then find it taken.
        const taken = await w
          .trx('link_uses')
          .insert({ jti: requestKeyOf(claims), purpose: 'answer', subject_id: claims.bookingId })
          .onConflict('jti')
          .ignore()
          .returning('jti');
        if (taken.length === 0) throw new Outcome({ result: 'used' });
        try {
          return await w.booking(claims.bookingId, claims.version);
        } catch (error) {
          if (error instanceof NotFoundError) throw new Outcome({ result: 'gone' });
          if (error instanceof StaleVersionError)
            throw new Outcome({ result: 'stale', booking: (await Booking.query(w.trx).findById(claims.bookingId))! });
          throw error;
        }
      },
      claims.action,
      proposal,
      'link',
      reason,
    );
  }

  private async answer(
    ctx: WriteContext,
    bookingId: string,
    lock: (w: BookingWork) => Promise<Booking>,
    action: AnswerAction,
    proposal: { start: Date; end: Date } | undefined,
    via: 'link' | 'app',
    reason?: string,
  ): Promise<AnswerOutcome> {
    // Only a decline or a proposal says why; a confirmation needs no reason and keeps none.
    const why = action === 'confirm' ? undefined : reason || undefined;
    try {
      const outcome = await this.writer.run(ctx, { bookingIds: [bookingId] }, async (w) => {
        const before = await lock(w);
        if (proposal) w.checkProposal(proposal.start.getTime(), proposal.end.getTime());
        let after: Booking | null;
        try {
          after = await w.apply({ action: ANSWER_ACTION[action], bookingId: String(before.id), reason: why });
        } catch (error) {
          if (error instanceof TransitionRefusedError) throw new Outcome({ result: 'closed', booking: before });
          throw error;
        }
        await w.trx('booking_answers').insert({
          booking_id: before.id,
          booking_version: before.version,
          action,
          via,
          answered_by: ctx.actor?.userId ?? null,
          proposed_starts_at: proposal?.start ?? null,
          proposed_ends_at: proposal?.end ?? null,
          proposal_status: action === 'propose' ? 'open' : null,
          reason: why ?? null,
        });
        return {
          result: action === 'confirm' ? 'confirmed' : action === 'decline' ? 'declined' : 'proposed',
          booking: after!,
        } as AnswerOutcome;
      });
      return outcome.result;
    } catch (error) {
      if (error instanceof Outcome) return error.outcome;
      if (isExclusionViolation(error)) {
        const booking = await Booking.query(this.knex).findById(bookingId);
        if (booking) return { result: 'taken', booking };
      }
      throw error;
    }
  }
}
