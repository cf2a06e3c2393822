import type { Knex } from 'knex';
import { ConstraintViolationError } from 'objection';
import type { PartnerAnswer } from '../../shared/schemas/answers.ts';
import { Booking, Resource } from '../models/index.ts';
import { ConflictError, NotFoundError, UnprocessableError } from '../errors.ts';
import type { Actor } from './actor.ts';
import { scoped } from './scope.ts';
import { recordChange } from './audit.ts';
import { BookingsService } from './bookings.ts';
import { enqueueMessage, queueBookingMessage, queueCustomerNotice } from './outbox.ts';
import type { AnswerAction, AnswerClaims } from './links.ts';
import { withAnswers, type AnswerRow, type BookingWithAnswer } from './answer-views.ts';

export { latestAnswers, withAnswers, type BookingWithAnswer } from './answer-views.ts';

/** What became of an answer: done, or why not. */
export type AnswerOutcome =
  | { result: 'confirmed' | 'declined' | 'proposed'; booking: Booking }
  | { result: 'stale'; booking: Booking }
  | { result: 'closed'; booking: Booking }
  | { result: 'taken'; booking: Booking }
  | { result: 'used' }
  | { result: 'gone' };

const ANSWERABLE: Record<AnswerAction, Booking['state'][]> = {
  confirm: ['sent'],
  decline: ['sent', 'confirmed'],
  propose: ['sent', 'confirmed'],
};

export function isExclusionViolation(error: unknown): boolean {
  const e = error as { code?: string; nativeError?: { code?: string } };
  return error instanceof ConstraintViolationError || e?.code === '23P01' || e?.nativeError?.code === '23P01';
}

/** Thrown inside a transaction to roll it back and hand an outcome out. */
class Outcome extends Error {
  constructor(readonly outcome: AnswerOutcome) { super(outcome.result); }
}

async function installerFirmOf(trx: Knex.Transaction, bookingId: string): Promise<string> {
  const row = await trx('bookings as b').join('stages as s', 's.id', 'b.stage_id').join('jobs as j', 'j.id', 's.job_id')
    .where('b.id', bookingId).first('j.firm_id');
  return String(row.firmId);
}

/**
 * Requests to partner firms and their answers: the scheduler publishes, cancels and decides on
 * proposals; the partner (through a signed link or the partner pages) confirms, declines or
 * proposes another time. Every change writes its e-mails to the outbox in the same transaction.
 */
export class ConfirmationsService {
  private readonly bookings: BookingsService;

  constructor(private readonly knex: Knex) {
    this.bookings = new BookingsService(knex);
  }

  private async view(actor: Actor, id: string, trx: Knex.Transaction): Promise<BookingWithAnswer> {
    const [view] = await withAnswers(trx, [await this.bookings.get(actor, id, trx)]);
    return view!;
  }

  private async lockForScheduler(actor: Actor, id: string, version: number, trx: Knex.Transaction): Promise<Booking> {
    const booking = await scoped(Booking, actor, trx).findById(id).forUpdate();
    if (!booking) throw new NotFoundError('booking');
    if (booking.version !== version) {
      throw new ConflictError('Someone else changed this booking since you loaded it.', { code: 'stale-version', current: await this.bookings.get(actor, id, trx) });
    }
    return booking;
  }

  private async partnerResource(trx: Knex.Transaction, actor: Actor, resourceId: string): Promise<boolean> {
    const resource = await Resource.query(trx).findById(resourceId);
    return Boolean(resource && String(resource.firmId) !== actor.firmId);
  }

  /** Sends a pencilled (or declined) booking of a partner's resource as a request: → sent, version + 1. */
  async publish(actor: Actor, id: string, version: number): Promise<BookingWithAnswer> {
    return this.knex.transaction(async (trx) => {
      const before = await this.lockForScheduler(actor, id, version, trx);
      if (!(await this.partnerResource(trx, actor, before.resourceId))) {
        throw new UnprocessableError("This is your own firm's resource: confirm it on the board. Requests go to partner firms.", { code: 'own-resource' });
      }
      if (before.state !== 'pencilled' && before.state !== 'declined') {
        throw new ConflictError(`This booking is already ${before.state}.`, { code: 'not-pencilled' });
      }
      const after = await Booking.query(trx).patchAndFetchById(id, { state: 'sent', version: before.version + 1, updatedAt: new Date() } as Partial<Booking>);
      await queueBookingMessage(trx, { bookingId: id, kind: 'request', version: after.version });
      await recordChange(trx, actor, 'booking', id, 'update', before, after);
      return this.view(actor, id, trx);
    });
  }

  /** Withdraws a request or confirmed slot from the partner: → pencilled, version + 1, METHOD:CANCEL. */
  async cancel(actor: Actor, id: string, version: number): Promise<BookingWithAnswer> {
    return this.knex.transaction(async (trx) => {
      const before = await this.lockForScheduler(actor, id, version, trx);
      if (before.state !== 'sent' && before.state !== 'confirmed') {
        throw new ConflictError(`A ${before.state} booking has not been sent to anyone.`, { code: 'not-sent' });
      }
      const after = await Booking.query(trx).patchAndFetchById(id, { state: 'pencilled', version: before.version + 1, updatedAt: new Date() } as Partial<Booking>);
      await queueBookingMessage(trx, { bookingId: id, kind: 'cancel', version: after.version, resourceId: String(before.resourceId) });
      await recordChange(trx, actor, 'booking', id, 'update', before, after);
      return this.view(actor, id, trx);
    });
  }

  private async openProposal(trx: Knex.Transaction, bookingId: string): Promise<AnswerRow> {
    const proposal = await trx('booking_answers').where({ booking_id: bookingId, action: 'propose', proposal_status: 'open' })
      .orderBy('created_at', 'desc').orderBy('id', 'desc').first() as AnswerRow | undefined;
    if (!proposal) throw new ConflictError('There is no open proposal for this booking.', { code: 'no-open-proposal' });
    return proposal;
  }

  /** Moves the booking to the partner's proposed time (version + 1) and sends the update to confirm. */
  async acceptProposal(actor: Actor, id: string, version: number): Promise<BookingWithAnswer> {
    return this.knex.transaction(async (trx) => {
      const before = await this.lockForScheduler(actor, id, version, trx);
      const proposal = await this.openProposal(trx, id);
      const after = await Booking.query(trx).patchAndFetchById(id, {
        startsAt: proposal.proposedStartsAt!, endsAt: proposal.proposedEndsAt!, state: 'sent', version: before.version + 1, updatedAt: new Date(),
      } as Partial<Booking>);
      await trx('booking_answers').where('id', proposal.id).update({ proposal_status: 'accepted', decided_by: actor.userId, decided_at: new Date() });
      await queueBookingMessage(trx, { bookingId: id, kind: 'update', version: after.version });
      if (before.state === 'confirmed') await queueCustomerNotice(trx, { bookingId: id, event: 'changed' });
      await recordChange(trx, actor, 'booking', id, 'update', before, after);
      return this.view(actor, id, trx);
    });
  }

  /** Keeps the original slot; the partner is told and asked again to confirm it. */
  async refuseProposal(actor: Actor, id: string, version: number): Promise<BookingWithAnswer> {
    return this.knex.transaction(async (trx) => {
      const booking = await this.lockForScheduler(actor, id, version, trx);
      const proposal = await this.openProposal(trx, id);
      await trx('booking_answers').where('id', proposal.id).update({ proposal_status: 'refused', decided_by: actor.userId, decided_at: new Date() });
      await enqueueMessage(trx, `booking.${id}.v${booking.version}.refused.a${proposal.id}`, 'proposal_refused', { bookingId: id, version: booking.version });
      return this.view(actor, id, trx);
    });
  }

  /** A partner's answer from their own pages; the booking must be one of their firm's. */
  async answerAsPartner(actor: Actor, id: string, input: PartnerAnswer): Promise<AnswerOutcome> {
    const proposal = input.action === 'propose' ? { start: new Date(input.proposedStart!), end: new Date(input.proposedEnd!) } : undefined;
    return this.answer(async (trx) => {
      const booking = await scoped(Booking, actor, trx).findById(id).forUpdate();
      if (!booking || booking.state === 'pencilled') throw new NotFoundError('booking');
      return booking;
    }, input.action, proposal, { via: 'app', actor });
  }

  /** An answer through a signed link: the token is the authority, and it works once. */
  async answerByLink(claims: AnswerClaims, proposal?: { start: Date; end: Date }): Promise<AnswerOutcome> {
    return this.answer(async (trx) => {
      // Taking the jti first makes a second use of the same link wait here, then find it taken.
      const taken = await trx('link_uses').insert({ jti: claims.jti, purpose: 'answer', subject_id: claims.bookingId })
        .onConflict('jti').ignore().returning('jti');
      if (taken.length === 0) throw new Outcome({ result: 'used' });
      const booking = await Booking.query(trx).findById(claims.bookingId).forUpdate();
      if (!booking) throw new Outcome({ result: 'gone' });
      if (booking.version !== claims.version) throw new Outcome({ result: 'stale', booking });
      return booking;
    }, claims.action, proposal, { via: 'link', actor: null });
  }

  private async answer(lock: (trx: Knex.Transaction) => Promise<Booking>, action: AnswerAction, proposal: { start: Date; end: Date } | undefined,
    by: { via: 'link' | 'app'; actor: Actor | null }): Promise<AnswerOutcome> {
    let bookingId: string | undefined;
    try {
      return await this.knex.transaction(async (trx) => {
        const before = await lock(trx);
        bookingId = before.id;
        if (!ANSWERABLE[action].includes(before.state)) throw new Outcome({ result: 'closed', booking: before });
        let after = before;
        if (action !== 'propose') {
          after = await Booking.query(trx).patchAndFetchById(before.id, { state: action === 'confirm' ? 'confirmed' : 'declined', updatedAt: new Date() } as Partial<Booking>);
        }
        await trx('booking_answers').insert({
          booking_id: before.id, booking_version: before.version, action, via: by.via, answered_by: by.actor?.userId ?? null,
          proposed_starts_at: proposal?.start ?? null, proposed_ends_at: proposal?.end ?? null, proposal_status: action === 'propose' ? 'open' : null,
        });
        if (action === 'confirm') await queueCustomerNotice(trx, { bookingId: before.id, event: 'confirmed' });
        // The installer's audit log shows the partner's answer (or the link's, with no user).
        await recordChange(trx, by.actor, 'booking', before.id, 'update', before, { ...after.toJSON(), answer: action, proposal: proposal ?? null }, await installerFirmOf(trx, before.id));
        return { result: action === 'confirm' ? 'confirmed' : action === 'decline' ? 'declined' : 'proposed', booking: after } as AnswerOutcome;
      });
    } catch (error) {
      if (error instanceof Outcome) return error.outcome;
      if (isExclusionViolation(error) && bookingId) {
        return { result: 'taken', booking: (await Booking.query(this.knex).findById(bookingId))! };
      }
      throw error;
    }
  }
}
