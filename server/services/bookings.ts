import type { Knex } from 'knex';
import type {
  BookingState,
  BookingView,
  CreateBooking,
  MarkProgress,
  MoveStage,
  PartnerBookingNote,
  UpdateBooking,
} from '../../shared/schemas/bookings.ts';
import { dependentChoiceOf } from '../../shared/schemas/bookings.ts';
import { plural } from '../../shared/plural.ts';
import { progressActionOf } from '../../shared/schemas/bookings.ts';
import { createBoardIndex, type Violation } from '../../shared/scheduler/index.ts';
import { bookingsOfStage, shiftDependents } from '../../shared/board-actions.ts';
import { toEngineBoard } from '../../shared/board-data.ts';
import type { BoardData } from '../../shared/board-data.ts';
import type { ResourceSide } from '../../shared/booking-states.ts';
import { Booking, Stage } from '../models/index.ts';
import { BadRequestError, ConflictError, HttpError, NotFoundError } from '../errors.ts';
import type { Actor } from './actor.ts';
import { findVisible, scoped } from './scope.ts';
import { bookingDuring } from './ranges.ts';
import { loadBoard } from './board.ts';
import { withAnswers, type BookingWithAnswer } from './answer-views.ts';
import {
  BookingWriter,
  TransitionRefusedError,
  partyOf,
  type BookingChange,
  type BookingLimits,
  type WriteOutcome,
} from './booking-writes.ts';
import { recordUndo, type UndoContext } from './undo.ts';

const VIEW_COLUMNS = [
  'bookings.*',
  'stages.name as stageName',
  'stages.kind as stageKind',
  'stages.job_id as jobId',
  'jobs.reference as jobReference',
  'jobs.site_town as siteTown',
];

type BookingRow = Booking & {
  stageName: string;
  stageKind: string;
  jobId: string;
  jobReference: string;
  siteTown: string;
};

function toView(b: BookingRow): BookingView {
  return {
    id: b.id,
    stageId: b.stageId,
    jobId: b.jobId,
    resourceId: b.resourceId,
    startsAt: b.startsAt.toISOString(),
    endsAt: b.endsAt.toISOString(),
    state: b.state,
    version: b.version,
    stageName: b.stageName,
    stageKind: b.stageKind,
    jobReference: b.jobReference,
    siteTown: b.siteTown,
  };
}

/** What a write returns: the saved bookings and the engine's warnings about them. */
export interface WriteResult {
  bookings: BookingView[];
  warnings: Violation[];
}

/** A stage move also says which partner firms' sent or confirmed bookings it moved (each is asked again). */
export interface MoveResult extends WriteResult {
  reasked: PartnerBookingNote[];
}

const PARTNER_HELD: readonly BookingState[] = ['sent', 'confirmed'];

/** A partner firm's sent or confirmed booking on the board, named for the scheduler; null for any other booking. */
function partnerNote(data: BoardData, bookingId: string): PartnerBookingNote | null {
  const b = data.bookings.find((x) => x.id === bookingId);
  const resource = b && data.resources.find((r) => r.id === b.resourceId);
  if (!b || !resource || resource.ownership !== 'partner' || !PARTNER_HELD.includes(b.state)) return null;
  const stage = data.stages.find((s) => s.id === b.stageId);
  const job = data.jobs.find((j) => j.id === stage?.jobId);
  return {
    bookingId: b.id,
    stageName: stage?.name ?? 'a stage',
    jobReference: job?.reference ?? '',
    resourceName: resource.name,
    firmName: resource.firmName,
    state: b.state,
    startsAt: new Date(b.start).toISOString(),
  };
}

const DAY = 86_400_000;

export class BookingsService {
  private readonly writer: BookingWriter;

  constructor(
    private readonly knex: Knex,
    private readonly now: () => number = Date.now,
    limits?: BookingLimits,
  ) {
    this.writer = new BookingWriter(knex, now, limits);
  }

  private view(actor: Actor, trx?: Knex.Transaction) {
    return scoped(Booking, actor, trx)
      .join('stages', 'stages.id', 'bookings.stage_id')
      .join('jobs', 'jobs.id', 'stages.job_id')
      .select(VIEW_COLUMNS);
  }

  /** Bookings overlapping [from, to) that the actor may see. */
  async list(actor: Actor, from: string, to: string): Promise<BookingWithAnswer[]> {
    const rows = (await this.view(actor)
      .where(bookingDuring(this.knex, 'bookings', from, to))
      .orderBy('bookings.starts_at')) as BookingRow[];
    return withAnswers(this.knex, rows.map(toView));
  }

  async get(actor: Actor, id: string, trx?: Knex.Transaction): Promise<BookingWithAnswer> {
    const row = (await this.view(actor, trx).findById(id)) as BookingRow | undefined;
    if (!row) throw new NotFoundError('booking');
    return (await withAnswers(trx ?? this.knex, [toView(row)]))[0]!;
  }

  /** The bookings a write kept, as the actor sees them, with the engine's warnings. */
  async saved(actor: Actor, outcome: WriteOutcome<unknown>): Promise<WriteResult> {
    const ids = outcome.written.filter((w) => w.after).map((w) => String(w.after!.id));
    const rows = ids.length
      ? ((await this.view(actor)
          .whereIn('bookings.id', [...new Set(ids)])
          .orderBy('bookings.id')) as BookingRow[])
      : [];
    return { bookings: rows.map(toView), warnings: outcome.warnings };
  }

  /** Books a stage on a resource (a drop from the tray); the engine checks it before it is kept. */
  async create(actor: Actor, input: CreateBooking, undo?: UndoContext): Promise<WriteResult> {
    const outcome = await this.writer.run(
      { actor, party: partyOf(actor) },
      { stageIds: [input.stageId], resourceIds: [input.resourceId] },
      async (w) => {
        await w.apply(bookChange(input));
        if (undo) await recordUndo(w.trx, actor, undo, w.written);
      },
    );
    return this.saved(actor, outcome);
  }

  /** Several bookings in one go (an auto-place preview being applied): all are kept or none; a refusal names the item. */
  async createMany(actor: Actor, inputs: CreateBooking[], undo?: UndoContext): Promise<WriteResult> {
    const outcome = await this.writer.run(
      { actor, party: partyOf(actor) },
      { stageIds: inputs.map((i) => i.stageId), resourceIds: inputs.map((i) => i.resourceId) },
      async (w) => {
        // The engine's view of every item's job is read once for the batch, not once per item.
        await w.prepareIndex(
          inputs.map((i) => i.stageId),
          inputs.map((i) => Date.parse(i.startsAt)),
        );
        for (const [n, input] of inputs.entries()) {
          try {
            await w.apply(bookChange(input));
          } catch (error) {
            throw inItem(error, n);
          }
        }
        if (undo) await recordUndo(w.trx, actor, undo, w.written);
      },
    );
    return this.saved(actor, outcome);
  }

  /**
   * Changes one booking: its time or resource (a move), and for the firm's own crews and machines
   * its confirmation. Sending, answering and progress have their own actions; a state this route
   * cannot set is refused by the state machine (409). A change based on an old version is refused.
   */
  async update(actor: Actor, id: string, input: UpdateBooking, undo?: UndoContext): Promise<WriteResult> {
    const outcome = await this.writer.run(
      { actor, party: partyOf(actor) },
      { bookingIds: [id], resourceIds: input.resourceId ? [input.resourceId] : [] },
      async (w) => {
        const before = await w.booking(id, input.version);
        const startsAt = Date.parse(input.startsAt);
        const endsAt = Date.parse(input.endsAt);
        const moves =
          startsAt !== before.startsAt.getTime() ||
          endsAt !== before.endsAt.getTime() ||
          (input.resourceId !== undefined && input.resourceId !== String(before.resourceId));
        let current = before;
        if (moves)
          current = (await w.apply({ action: 'move', bookingId: id, startsAt, endsAt, resourceId: input.resourceId }))!;
        if (input.state && input.state !== current.state) {
          await w.apply({
            action: patchAction(current.state, input.state, await w.sideOfBooking(current)),
            bookingId: id,
          });
        }
        if (undo) await recordUndo(w.trx, actor, undo, w.written);
      },
    );
    return this.saved(actor, outcome);
  }

  /**
   * A drag on the board: every booking of the stage moves together (one may change resource), and
   * the booked stages after it move by the same working time as `dependents` says: none ("only
   * this"), those starting within the next `withinDays` days of the stage, or all. A partner firm's
   * sent or confirmed booking among those stages moves only when the scheduler named it in
   * `askAgain` (its partner is asked again); otherwise the move is refused (409) listing them, so
   * none is moved silently. The result lists every partner booking the move asks again.
   */
  async moveStage(actor: Actor, stageId: string, input: MoveStage, undo?: UndoContext): Promise<MoveResult> {
    let reasked: PartnerBookingNote[] = [];
    const outcome = await this.writer.run(
      { actor, party: partyOf(actor) },
      { stageIds: [stageId], resourceIds: input.resourceId ? [input.resourceId] : [] },
      async (w) => {
        const stage = await findVisible(Stage, actor, stageId, w.trx, 'stage');
        const current = await scoped(Booking, actor, w.trx)
          .where('stage_id', stageId)
          .whereNot('state', 'declined')
          .orderBy('id');
        if (!current.length)
          throw new BadRequestError('This stage has no booking to move yet.', [
            { field: 'stageId', message: 'has no booking; book it from the tray' },
          ]);
        const start = Date.parse(input.startsAt);
        w.checkTimes(start, input.endsAt ? Date.parse(input.endsAt) : undefined);
        const spanStart = Math.min(...current.map((b) => b.startsAt.getTime()));
        const data = await loadBoard(w.trx, actor, {
          from: Math.min(start, spanStart) - 7 * DAY,
          to: start + 60 * DAY,
          jobIds: [stage.jobId],
          now: this.now(),
        });
        const index = createBoardIndex(toEngineBoard(data), { now: this.now() });
        const shifts = [{ stageId, bookings: bookingsOfStage(index, stageId) }];
        const choice = dependentChoiceOf(input);
        if (choice !== 'none') {
          // "Within the next N days": the stages after it that now start before the stage's start plus N days.
          const limit = choice === 'within' ? spanStart + (input.withinDays ?? 0) * DAY : Number.POSITIVE_INFINITY;
          shifts.push(
            ...shiftDependents(index, stageId, start).filter(
              (s) => Math.min(...bookingsOfStage(index, s.stageId).map((b) => b.start)) < limit,
            ),
          );
        }
        const originalOf = new Map(data.bookings.map((b) => [b.id, b]));
        const movesAt = (planned: { id: string; start: number; end: number }) =>
          originalOf.get(planned.id)?.start !== planned.start || originalOf.get(planned.id)?.end !== planned.end;
        const dependentNotes = shifts
          .slice(1)
          .flatMap((s) => s.bookings.filter(movesAt).map((b) => partnerNote(data, b.id)))
          .filter((n): n is PartnerBookingNote => n !== null);
        const unasked = dependentNotes.filter((n) => !input.askAgain.includes(n.bookingId));
        if (unasked.length) {
          const names = unasked
            .map((n) => `'${n.stageName}' on ${n.jobReference} (${n.resourceName}, ${n.firmName}, ${n.state})`)
            .join('; ');
          throw new ConflictError(
            `Moving the stages after it would ask ${plural(unasked.length, 'partner booking')} again: ${names}. Choose to ask again, or move fewer stages.`,
            { code: 'asks-partners-again', bookings: unasked },
          );
        }
        // Every booking the move changes is locked and read in one query, not one by one.
        await w.lockBookings(shifts.flatMap((s) => s.bookings.map((b) => String(b.id))));
        for (const shift of shifts) {
          const own = shift.stageId === stageId;
          for (const planned of shift.bookings) {
            const before = current.find((b) => String(b.id) === String(planned.id));
            const startsAt = own
              ? input.endsAt
                ? start
                : (before ?? (planned as never as Booking)).startsAt.getTime() + (start - spanStart)
              : planned.start;
            const endsAt = own
              ? input.endsAt
                ? Date.parse(input.endsAt)
                : (before ?? (planned as never as Booking)).endsAt.getTime() + (start - spanStart)
              : planned.end;
            const resourceId =
              own && input.bookingId === String(planned.id) && input.resourceId ? input.resourceId : undefined;
            await w.apply({
              action: 'move',
              bookingId: String(planned.id),
              version: input.versions[String(planned.id)],
              startsAt,
              endsAt,
              resourceId,
            });
          }
        }
        const moved = new Set(
          w.written
            .filter(
              (x) =>
                x.before &&
                x.after &&
                (x.before.startsAt.getTime() !== x.after.startsAt.getTime() ||
                  x.before.endsAt.getTime() !== x.after.endsAt.getTime() ||
                  String(x.before.resourceId) !== String(x.after.resourceId)),
            )
            .map((x) => String(x.after!.id)),
        );
        reasked = [...moved].map((id) => partnerNote(data, id)).filter((n): n is PartnerBookingNote => n !== null);
        if (undo) await recordUndo(w.trx, actor, undo, w.written);
      },
    );
    return { ...(await this.saved(actor, outcome)), reasked };
  }

  /**
   * A crew (or the office) marks a booking on site, then done, or takes either back; a step a phone
   * kept while it had no signal comes with how long ago it was marked.
   */
  async markProgress(actor: Actor, id: string, input: MarkProgress): Promise<BookingView> {
    // A kept step's time by the server's clock (the phone says how long ago, not when: its clock may be wrong).
    const markedAt = input.markedMsAgo === undefined ? undefined : this.writer.now() - input.markedMsAgo;
    await this.writer.run({ actor, party: partyOf(actor) }, { bookingIds: [id] }, (w) =>
      w.apply({ action: progressActionOf(input), bookingId: id, version: input.version, markedAt }),
    );
    return this.get(actor, id);
  }

  /** Takes a booking off the board (the stage goes back to the tray); a partner it was sent to is told. */
  async remove(actor: Actor, id: string, version: number, undo?: UndoContext): Promise<void> {
    await this.writer.run({ actor, party: partyOf(actor) }, { bookingIds: [id] }, async (w) => {
      await w.apply({ action: 'unbook', bookingId: id, version });
      if (undo) await recordUndo(w.trx, actor, undo, w.written);
    });
  }
}

function bookChange(input: CreateBooking): BookingChange {
  return {
    action: input.state === 'confirmed' ? 'book-confirmed' : 'book',
    stageId: input.stageId,
    resourceId: input.resourceId,
    startsAt: Date.parse(input.startsAt),
    endsAt: input.endsAt ? Date.parse(input.endsAt) : undefined,
  };
}

/** The state a PATCH asks for, as the action that gets there; the state machine then decides whether it may. */
function patchAction(
  from: BookingState,
  to: BookingState,
  side: ResourceSide,
): 'confirm' | 'unconfirm' | 'withdraw' | 'rebook' {
  if (to === 'confirmed') return 'confirm';
  if (to === 'pencilled')
    return side === 'partner' && from !== 'declined' ? 'withdraw' : from === 'declined' ? 'rebook' : 'unconfirm';
  const how: Record<'sent' | 'declined' | 'on_site' | 'done', string> = {
    sent: 'A booking becomes sent only by sending the partner a request (Send request), which e-mails them.',
    declined: 'Only the partner firm declines a slot of its own.',
    on_site: 'On site is marked through progress, by the crew on the booking or the office.',
    done: 'Done is marked through progress, after on site, by the crew on the booking or the office.',
  };
  throw new TransitionRefusedError(
    'move',
    from,
    `A ${from.replace('_', ' ')} booking can't be set to ${to.replace('_', ' ')} here. ${how[to]}`,
  );
}

/** A refusal inside a batch names the item it is about (bookings[3].startsAt). */
function inItem(error: unknown, n: number): unknown {
  if (error instanceof BadRequestError) {
    return new BadRequestError(
      `Booking ${n + 1} of the batch: ${error.detail ?? error.message}`,
      error.errors.map((e) => ({ ...e, field: `bookings[${n}].${e.field}` })),
    );
  }
  if (error instanceof HttpError) {
    return new HttpError(
      error.status,
      error.code,
      error.title,
      `Booking ${n + 1} of the batch: ${error.detail ?? error.message}`,
      { ...error.extra, item: n },
    );
  }
  return error;
}
