import type { Knex } from 'knex';
import type { BookingView, CreateBooking, MarkProgress, MoveStage, UpdateBooking } from '../../shared/schemas/bookings.ts';
import { addWorkingMinutes, createBoardIndex, resourceCalendarOf, type Violation } from '../../shared/scheduler/index.ts';
import { bookingsOfStage, shiftDependents } from '../../shared/board-actions.ts';
import { toEngineBoard } from '../../shared/board-data.ts';
import { Booking, Resource, Stage } from '../models/index.ts';
import { BadRequestError, ConflictError, NotFoundError } from '../errors.ts';
import type { Actor } from './actor.ts';
import { findVisible, scoped } from './scope.ts';
import { recordChange } from './audit.ts';
import { loadBoard } from './board.ts';
import { verifyStages } from './schedule-check.ts';
import { bookingChanged, bookingRemoved, queueCustomerNotice } from './outbox.ts';
import { withAnswers, type BookingWithAnswer } from './answer-views.ts';

const VIEW_COLUMNS = ['bookings.*', 'stages.name as stageName', 'stages.kind as stageKind', 'stages.job_id as jobId',
  'jobs.reference as jobReference', 'jobs.site_town as siteTown'];

type BookingRow = Booking & { stageName: string; stageKind: string; jobId: string; jobReference: string; siteTown: string };

function toView(b: BookingRow): BookingView {
  return {
    id: b.id, stageId: b.stageId, jobId: b.jobId, resourceId: b.resourceId,
    startsAt: b.startsAt.toISOString(), endsAt: b.endsAt.toISOString(), state: b.state, version: b.version,
    stageName: b.stageName, stageKind: b.stageKind, jobReference: b.jobReference, siteTown: b.siteTown,
  };
}

/** What a write returns: the saved bookings and the engine's warnings about them. */
export interface WriteResult { bookings: BookingView[]; warnings: Violation[] }

const DAY = 86_400_000;

export class BookingsService {
  constructor(private readonly knex: Knex, private readonly now: () => number = Date.now) {}

  private view(actor: Actor, trx?: Knex.Transaction) {
    return scoped(Booking, actor, trx).join('stages', 'stages.id', 'bookings.stage_id')
      .join('jobs', 'jobs.id', 'stages.job_id').select(VIEW_COLUMNS);
  }

  /** Bookings overlapping [from, to) that the actor may see. */
  async list(actor: Actor, from: string, to: string): Promise<BookingWithAnswer[]> {
    const rows = await this.view(actor).where('bookings.starts_at', '<', to).where('bookings.ends_at', '>', from)
      .orderBy('bookings.starts_at') as BookingRow[];
    return withAnswers(this.knex, rows.map(toView));
  }

  async get(actor: Actor, id: string, trx?: Knex.Transaction): Promise<BookingWithAnswer> {
    const row = await this.view(actor, trx).findById(id) as BookingRow | undefined;
    if (!row) throw new NotFoundError('booking');
    return (await withAnswers(trx ?? this.knex, [toView(row)]))[0]!;
  }

  private async views(actor: Actor, ids: string[], trx: Knex.Transaction): Promise<BookingView[]> {
    const rows = await this.view(actor, trx).whereIn('bookings.id', ids).orderBy('bookings.id') as BookingRow[];
    return rows.map(toView);
  }

  /** Ends a booking at the stage's working duration on the resource's calendar when no end is given. */
  private async endOf(actor: Actor, trx: Knex.Transaction, input: CreateBooking, stage: Stage): Promise<Date> {
    if (input.endsAt) return new Date(input.endsAt);
    const start = Date.parse(input.startsAt);
    const data = await loadBoard(trx, actor, { from: start - DAY, to: start + DAY, jobIds: [stage.jobId], now: this.now() });
    const index = createBoardIndex(toEngineBoard(data), { now: this.now() });
    if (!index.resources.has(input.resourceId)) throw new NotFoundError('resource');
    return new Date(addWorkingMinutes(resourceCalendarOf(index, input.resourceId), start, stage.durationMinutes));
  }

  private async insert(actor: Actor, trx: Knex.Transaction, input: CreateBooking): Promise<Booking> {
    const stage = await findVisible(Stage, actor, input.stageId, trx, 'stage');
    await findVisible(Resource, actor, input.resourceId, trx, 'resource');
    const created = await Booking.query(trx).insert({
      stageId: input.stageId, resourceId: input.resourceId, startsAt: new Date(input.startsAt),
      endsAt: await this.endOf(actor, trx, input, stage), state: input.state, createdBy: actor.userId,
    } as Partial<Booking>);
    await recordChange(trx, actor, 'booking', created.id, 'create', null, created);
    // Booked straight in as confirmed (the installer's own people): the householder hears of a delivery or lift day at once.
    if (created.state === 'confirmed') await queueCustomerNotice(trx, { bookingId: created.id, event: 'confirmed' });
    return created;
  }

  /** Books a stage on a resource (a drop from the tray); the engine checks it before it is kept. */
  async create(actor: Actor, input: CreateBooking): Promise<WriteResult> {
    return this.knex.transaction(async (trx) => {
      const created = await this.insert(actor, trx, input);
      const warnings = await verifyStages(trx, actor, [input.stageId], this.now());
      return { bookings: await this.views(actor, [created.id], trx), warnings };
    });
  }

  /** Several bookings in one go (an auto-place preview being applied): all are kept or none. */
  async createMany(actor: Actor, inputs: CreateBooking[]): Promise<WriteResult> {
    return this.knex.transaction(async (trx) => {
      const ids: string[] = [];
      for (const input of inputs) ids.push((await this.insert(actor, trx, input)).id);
      const warnings = await verifyStages(trx, actor, [...new Set(inputs.map((i) => i.stageId))], this.now());
      return { bookings: await this.views(actor, ids, trx), warnings };
    });
  }

  /** Changes one booking; a change based on an old version is refused (409), never overwritten. */
  async update(actor: Actor, id: string, input: UpdateBooking): Promise<WriteResult> {
    return this.knex.transaction(async (trx) => {
      const before = await scoped(Booking, actor, trx).findById(id).forUpdate();
      if (!before) throw new NotFoundError('booking');
      if (before.version !== input.version) {
        throw new ConflictError('Someone else changed this booking since you loaded it.', { code: 'stale-version', current: await this.get(actor, id, trx) });
      }
      if (input.resourceId && input.resourceId !== before.resourceId) await findVisible(Resource, actor, input.resourceId, trx, 'resource');
      const after = await Booking.query(trx).patchAndFetchById(id, {
        startsAt: new Date(input.startsAt), endsAt: new Date(input.endsAt),
        resourceId: input.resourceId ?? before.resourceId, state: input.state ?? before.state,
        version: before.version + 1, updatedAt: new Date(),
      } as Partial<Booking>);
      await bookingChanged(trx, actor, before, after); // the partner's update/cancel e-mail, in this transaction
      await recordChange(trx, actor, 'booking', id, 'update', before, after);
      const warnings = await verifyStages(trx, actor, [before.stageId], this.now());
      return { bookings: await this.views(actor, [id], trx), warnings };
    });
  }

  /**
   * A drag on the board: every booking of the stage moves together (one may change resource), and
   * with `moveDependents` the booked stages after it move by the same working time.
   */
  async moveStage(actor: Actor, stageId: string, input: MoveStage): Promise<WriteResult> {
    return this.knex.transaction(async (trx) => {
      const stage = await findVisible(Stage, actor, stageId, trx, 'stage');
      const current = await scoped(Booking, actor, trx).where('stage_id', stageId).whereNot('state', 'declined').forUpdate().orderBy('id');
      if (!current.length) throw new BadRequestError('This stage has no booking to move yet.', [{ field: 'stageId', message: 'has no booking; book it from the tray' }]);
      const start = Date.parse(input.startsAt);
      const data = await loadBoard(trx, actor, { from: Math.min(start, ...current.map((b) => b.startsAt.getTime())) - 7 * DAY, to: start + 60 * DAY, jobIds: [stage.jobId], now: this.now() });
      const index = createBoardIndex(toEngineBoard(data), { now: this.now() });
      const shifts = [{ stageId, bookings: bookingsOfStage(index, stageId) }];
      if (input.moveDependents) shifts.push(...shiftDependents(index, stageId, start));
      const changed: Booking[] = [];
      const spanStart = Math.min(...current.map((b) => b.startsAt.getTime()));
      for (const shift of shifts) {
        for (const planned of shift.bookings) {
          const before = await scoped(Booking, actor, trx).findById(planned.id).forUpdate();
          if (!before) throw new NotFoundError('booking');
          const expected = input.versions[before.id];
          if (expected !== undefined && expected !== before.version) {
            throw new ConflictError('Someone else changed this stage since you loaded it.', { code: 'stale-version', current: await this.get(actor, before.id, trx) });
          }
          const own = shift.stageId === stageId;
          const newStart = own ? (input.endsAt ? start : before.startsAt.getTime() + (start - spanStart)) : planned.start;
          const newEnd = own ? (input.endsAt ? Date.parse(input.endsAt) : before.endsAt.getTime() + (start - spanStart)) : planned.end;
          const resourceId = own && input.bookingId === before.id && input.resourceId ? input.resourceId : before.resourceId;
          if (resourceId !== before.resourceId) await findVisible(Resource, actor, resourceId, trx, 'resource');
          const after = await Booking.query(trx).patchAndFetchById(before.id, {
            startsAt: new Date(newStart), endsAt: new Date(newEnd), resourceId, version: before.version + 1, updatedAt: new Date(),
          } as Partial<Booking>);
          await bookingChanged(trx, actor, before, after);
          await recordChange(trx, actor, 'booking', before.id, 'update', before, after);
          changed.push(after);
        }
      }
      const warnings = await verifyStages(trx, actor, shifts.map((s) => s.stageId), this.now());
      return { bookings: await this.views(actor, changed.map((b) => b.id), trx), warnings };
    });
  }

  /**
   * A crew marks its own booking on site, then done. Only the state changes (the time stays), so
   * the engine has nothing new to check; it must happen in order.
   */
  async markProgress(actor: Actor, id: string, input: MarkProgress): Promise<BookingView> {
    return this.knex.transaction(async (trx) => {
      const before = await scoped(Booking, actor, trx).findById(id).forUpdate();
      if (!before) throw new NotFoundError('booking');
      if (before.version !== input.version) {
        throw new ConflictError('This booking changed since you loaded it.', { code: 'stale-version', current: await this.get(actor, id, trx) });
      }
      const allowedFrom: Record<MarkProgress['state'], Booking['state'][]> = { on_site: ['pencilled', 'sent', 'confirmed'], done: ['on_site', 'confirmed'] };
      if (!allowedFrom[input.state].includes(before.state)) {
        throw new BadRequestError(`A ${before.state.replace('_', ' ')} booking can't be marked ${input.state.replace('_', ' ')}.`, [{ field: 'state', message: `can't follow ${before.state}` }]);
      }
      const after = await Booking.query(trx).patchAndFetchById(id, { state: input.state, version: before.version + 1, updatedAt: new Date() } as Partial<Booking>);
      await recordChange(trx, actor, 'booking', id, 'update', before, after);
      return this.get(actor, id, trx);
    });
  }

  /** Takes a booking off the board (the stage goes back to the tray). */
  async remove(actor: Actor, id: string, version: number): Promise<void> {
    await this.knex.transaction(async (trx) => {
      const before = await scoped(Booking, actor, trx).findById(id).forUpdate();
      if (!before) throw new NotFoundError('booking');
      if (before.version !== version) {
        throw new ConflictError('Someone else changed this booking since you loaded it.', { code: 'stale-version', current: await this.get(actor, id, trx) });
      }
      await Booking.query(trx).deleteById(id);
      await recordChange(trx, actor, 'booking', id, 'delete', before, null);
      await bookingRemoved(trx, actor, before);
    });
  }
}
