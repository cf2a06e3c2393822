import type { Knex } from 'knex';
import {
  addWorkingMinutes,
  createBoardIndex,
  formatInstant,
  localDayOf,
  resourceCalendarOf,
  type BoardIndex,
  type Violation,
} from '../../shared/scheduler/index.ts';
import { toEngineBoard } from '../../shared/board-data.ts';
import { nextState, type BookingAction, type BookingParty, type ResourceSide } from '../../shared/booking-states.ts';
import type { BookingState } from '../../shared/schemas/bookings.ts';
import { Booking, Resource, Stage } from '../models/index.ts';
import { BadRequestError, ConflictError, NotFoundError, UnprocessableError } from '../errors.ts';
import { reachOf, type Actor } from './actor.ts';
import { findVisible, scoped } from './scope.ts';
import { recordChange } from './audit.ts';
import { loadBoard } from './board.ts';
import { verifyStages } from './schedule-check.ts';
import { checkStageFinish } from './stage-gates.ts';
import { bookingRemoved, enqueueMessage, queueBookingMessage, queueCustomerNotice } from './outbox.ts';
import { outsideBookingWindow } from '../../shared/booking-window.ts';

const DAY = 86_400_000;

/** How far from today a booking may lie, and how much longer than its stage it may be. */
export interface BookingLimits {
  pastDays: number;
  futureDays: number;
  /** Working minutes a booking may run past what its stage needs (a resize for a slow day). */
  extraWorkingMinutes: number;
}

/** Two years back, three ahead, and one working day of slack: the defaults, each a setting. */
export const DEFAULT_BOOKING_LIMITS: BookingLimits = { pastDays: 730, futureDays: 1095, extraWorkingMinutes: 480 };

/** A change based on a booking version someone else has replaced. */
export class StaleVersionError extends ConflictError {
  constructor(detail: string, current: unknown) {
    super(detail, { code: 'stale-version', current });
  }
}

/**
 * A partner's answer or choice of person on a slot changed since their page loaded it: 409 with the
 * slot's times, state and version as they stand (its own booking; nothing of the installer's plan).
 */
export function slotChanged(row: Booking): StaleVersionError {
  return new StaleVersionError('This slot was changed since you loaded it: check its time and answer again.', {
    id: String(row.id),
    startsAt: row.startsAt.toISOString(),
    endsAt: row.endsAt.toISOString(),
    state: row.state,
    version: row.version,
  });
}

/** The state machine said no: 409 naming the transition in plain words. */
export class TransitionRefusedError extends ConflictError {
  constructor(
    readonly action: BookingAction,
    readonly from: BookingState | null,
    detail: string,
  ) {
    super(detail, { code: 'transition-refused', action, from });
  }
}

/** The resource is already held (confirmed or on site) then: PostgreSQL's exclusion constraint. */
export class ResourceHeldError extends ConflictError {
  constructor(detail: string) {
    super(detail, { code: 'double-booked' });
  }
}

/** Who is writing: a signed-in person, or the holder of an e-mailed link acting for a partner firm. */
export interface WriteContext {
  actor: Actor | null;
  party: BookingParty;
}

/** The party a signed-in person writes as. */
export function partyOf(actor: Actor): BookingParty {
  const reach = reachOf(actor);
  return reach === 'installer-office' ? 'office' : reach;
}

interface TimedChange {
  startsAt: number;
  endsAt?: number | undefined;
}

/** The steps of progress on site, whose time is kept in the audit row. */
const PROGRESS_STEPS: ReadonlySet<BookingAction> = new Set(['arrive', 'finish', 'undo-arrive', 'undo-finish']);

export type BookingChange =
  | ({ action: 'book' | 'book-confirmed'; stageId: string; resourceId: string } & TimedChange)
  | ({
      action: 'move' | 'take-proposal';
      bookingId: string;
      version?: number | undefined;
      resourceId?: string | undefined;
    } & TimedChange)
  | { action: 'assign'; bookingId: string; version?: number | undefined; resourceId: string }
  | {
      action: Exclude<BookingAction, 'book' | 'book-confirmed' | 'move' | 'take-proposal' | 'assign'>;
      bookingId: string;
      version?: number | undefined;
      /** A partner's own words with a decline or proposal: kept in the audit row beside the change. */
      reason?: string | undefined;
      /**
       * When a crew marked the step on a phone without a signal, sent once it had one (epoch ms):
       * the day an arrival is checked against, kept in the audit row beside the time it came in.
       */
      markedAt?: number | undefined;
    };

/** A change to a booking that exists (a declined booking dropped again is rebooked). */
type StoredChange =
  | Exclude<BookingChange, { action: 'book' | 'book-confirmed' }>
  | ({
      action: 'rebook';
      bookingId: string;
      version?: number | undefined;
      resourceId?: string | undefined;
    } & TimedChange);

/** One booking before and after a change (`after` null when it was taken off). */
export interface WrittenBooking {
  action: BookingAction;
  before: Booking | null;
  after: Booking | null;
}

/** Names for the sentences a refusal speaks (people, machines, stages, jobs). */
async function namesOf(
  trx: Knex.Transaction,
  stageId: string,
  resourceId: string,
): Promise<{ stage: string; resource: string; job: string }> {
  const row = await trx('stages as s')
    .join('jobs as j', 'j.id', 's.job_id')
    .crossJoin(trx.raw('resources as r'))
    .where('s.id', stageId)
    .where('r.id', resourceId)
    .first('s.name as stage', 'r.name as resource', 'j.reference as job');
  return row ?? { stage: 'this stage', resource: 'this resource', job: 'this job' };
}

function isPgError(error: unknown, code: string): boolean {
  const e = error as { code?: string; nativeError?: { code?: string } } | null;
  return e?.code === code || e?.nativeError?.code === code;
}

/**
 * The one unit of work in which bookings change. Everything that writes a booking's time, resource
 * or state does it through {@link BookingWriter.run}, which hands the work one of these after the
 * locks are held: it re-reads what it changes, asks the state machine, keeps instants in bounds,
 * writes the row, its outbox rows and its audit row (which also notifies the open boards).
 */
export class BookingWork {
  readonly written: WrittenBooking[] = [];
  /** Stages whose bookings got a new time, resource or hold: the engine looks at these. */
  readonly checkStages = new Set<string>();
  private readonly timed: { bookingId: string; stageId: string; resourceId: string; start: number; end: number }[] = [];
  private index: BoardIndex | null = null;
  /** Bookings locked ahead by {@link lockBookings}, each handed out once. */
  private readonly locked = new Map<string, Booking>();
  /** Rows that do not change within a write (a stage, a resource, a stage's installer), read once. */
  private readonly stages = new Map<string, Stage>();
  private readonly resources = new Map<string, Resource>();
  private readonly installerOfStage = new Map<string, string>();

  constructor(
    readonly trx: Knex.Transaction,
    readonly ctx: WriteContext,
    private readonly writer: BookingWriter,
  ) {}

  /**
   * Locks and reads many bookings the work is about to change in one query (in id order), with their
   * stages and resources in one query each, so a change of many bookings (a stage moved with its
   * dependents) reads them once rather than one by one. Reads only: each change still goes through
   * {@link apply}, which takes its booking from here and checks the version the caller saw.
   */
  async lockBookings(ids: readonly string[]): Promise<void> {
    const wanted = [...new Set(ids.map(String))].filter((id) => /^\d+$/.test(id) && !this.locked.has(id));
    if (wanted.length === 0) return;
    const query = this.ctx.actor ? scoped(Booking, this.ctx.actor, this.trx) : Booking.query(this.trx);
    const rows = await query.whereIn('bookings.id', wanted).orderBy('bookings.id').forUpdate();
    for (const row of rows) this.locked.set(String(row.id), row);
    await this.readStages(rows.map((r) => String(r.stageId)));
    const resourceIds = [...new Set(rows.map((r) => String(r.resourceId)))].filter((id) => !this.resources.has(id));
    if (resourceIds.length)
      for (const r of await Resource.query(this.trx).whereIn('id', resourceIds)) this.resources.set(String(r.id), r);
  }

  private async readStages(stageIds: string[]): Promise<void> {
    const wanted = [...new Set(stageIds)].filter((id) => !this.stages.has(id));
    if (wanted.length === 0) return;
    const rows = await Stage.query(this.trx)
      .join('jobs', 'jobs.id', 'stages.job_id')
      .whereIn('stages.id', wanted)
      .select('stages.*', 'jobs.firm_id as installerFirmId');
    for (const row of rows) {
      this.installerOfStage.set(String(row.id), String((row as Stage & { installerFirmId: string }).installerFirmId));
      this.stages.set(String(row.id), row);
    }
  }

  private async stage(id: string): Promise<Stage | undefined> {
    await this.readStages([String(id)]);
    return this.stages.get(String(id));
  }

  /** A booking the writer may see, locked for this transaction, at the version the caller saw. */
  async booking(id: string, version?: number): Promise<Booking> {
    const query = this.ctx.actor ? scoped(Booking, this.ctx.actor, this.trx) : Booking.query(this.trx);
    const row = this.locked.get(String(id)) ?? (await query.findById(id).forUpdate());
    this.locked.delete(String(id));
    if (!row) throw new NotFoundError('booking');
    if (version !== undefined && row.version !== version) {
      throw new StaleVersionError('Someone else changed this booking since you loaded it.', this.writer.viewOf(row));
    }
    return row;
  }

  /** Whose resource a booking holds, seen from the installer whose job it is. */
  private async sideOf(
    stageId: string,
    resourceId: string,
  ): Promise<{ side: ResourceSide; installerFirmId: string; resource: Resource }> {
    await this.readStages([String(stageId)]);
    const firmId = this.installerOfStage.get(String(stageId));
    const resource = this.resources.get(String(resourceId)) ?? (await Resource.query(this.trx).findById(resourceId));
    if (!firmId || !resource) throw new NotFoundError(firmId ? 'resource' : 'stage');
    this.resources.set(String(resourceId), resource);
    const installerFirmId = firmId;
    return { side: String(resource.firmId) === installerFirmId ? 'own' : 'partner', installerFirmId, resource };
  }

  /** Whose resource a booking holds: the installer's own, or a partner firm's. */
  async sideOfBooking(booking: Booking): Promise<ResourceSide> {
    return (await this.sideOf(String(booking.stageId), String(booking.resourceId))).side;
  }

  private refuse(action: BookingAction, from: BookingState | null, side: ResourceSide): never {
    const verdict = nextState(action, from, { party: this.ctx.party, side });
    throw new TransitionRefusedError(action, from, verdict.ok ? 'This change is not allowed.' : verdict.reason);
  }

  private stateAfter(action: BookingAction, from: BookingState | null, side: ResourceSide): BookingState | 'removed' {
    const verdict = nextState(action, from, { party: this.ctx.party, side });
    if (!verdict.ok) this.refuse(action, from, side);
    return verdict.to;
  }

  private checkWindow(field: string, instant: number): void {
    const outside = outsideBookingWindow(this.writer.limits, this.writer.now(), instant);
    if (outside) throw new BadRequestError(outside.detail, [{ field, message: outside.message }]);
  }

  /** Checks a start and end a person gave (window, order) before anything else is worked out. */
  checkTimes(startsAt: number, endsAt: number | undefined, fields = { start: 'startsAt', end: 'endsAt' }): void {
    this.checkWindow(fields.start, startsAt);
    if (endsAt === undefined) return;
    this.checkWindow(fields.end, endsAt);
    if (endsAt <= startsAt)
      throw new BadRequestError('A booking must end after it starts.', [
        { field: fields.end, message: 'must be after the start' },
      ]);
  }

  /** The engine's index of the job in play, loaded once per unit of work for calendars and durations. */
  private async engineIndex(stageId: string, around: number): Promise<BoardIndex> {
    if (this.index?.stages.has(stageId)) return this.index;
    const row = await this.trx('stages as s')
      .join('jobs as j', 'j.id', 's.job_id')
      .where('s.id', stageId)
      .first('s.job_id', 'j.firm_id');
    if (!row) throw new NotFoundError('stage');
    const now = this.writer.now();
    const data = await loadBoard(this.trx, this.writer.installerOffice(String(row.firmId), this.ctx.actor), {
      from: around - DAY,
      to: around + DAY,
      jobIds: [String(row.jobId)],
      now,
    });
    this.index = createBoardIndex(toEngineBoard(data), { now });
    return this.index;
  }

  /**
   * Loads the engine's index once for every stage a batch books (their jobs, across the span of
   * their starts), so each item's calendar and length checks find it loaded instead of loading the
   * board again. Reads only; stages of more than one installer are left to load one by one.
   */
  async prepareIndex(stageIds: readonly string[], starts: readonly number[]): Promise<void> {
    const finite = starts.filter(Number.isFinite);
    // A batch spread wider than a board window (or out of bounds, refused item by item) loads as before.
    if (stageIds.length === 0 || finite.length === 0 || Math.max(...finite) - Math.min(...finite) > 100 * DAY) return;
    const rows = (await this.trx('stages as s')
      .join('jobs as j', 'j.id', 's.job_id')
      .whereIn('s.id', [...new Set(stageIds.map(String))])
      .distinct('s.job_id', 'j.firm_id')) as { jobId: string; firmId: string }[];
    const firms = new Set(rows.map((r) => String(r.firmId)));
    if (firms.size !== 1) return;
    const now = this.writer.now();
    const data = await loadBoard(this.trx, this.writer.installerOffice([...firms][0]!, this.ctx.actor), {
      from: Math.min(...finite) - DAY,
      to: Math.max(...finite) + DAY,
      jobIds: rows.map((r) => String(r.jobId)),
      now,
    });
    this.index = createBoardIndex(toEngineBoard(data), { now });
  }

  /** The stage's working duration on the resource's calendar, from the start. */
  private async naturalEnd(stage: Stage, resourceId: string, start: number): Promise<number> {
    const index = await this.engineIndex(String(stage.id), start);
    if (!index.resources.has(String(resourceId))) throw new NotFoundError('resource');
    return addWorkingMinutes(resourceCalendarOf(index, String(resourceId)), start, stage.durationMinutes);
  }

  /** A booking may run a stage's working time plus the firm's slack, no longer. */
  private async checkLength(stage: Stage, resourceId: string, start: number, end: number): Promise<void> {
    const index = await this.engineIndex(String(stage.id), start);
    if (!index.resources.has(String(resourceId))) throw new NotFoundError('resource');
    const cal = resourceCalendarOf(index, String(resourceId));
    const longest = addWorkingMinutes(cal, start, stage.durationMinutes + this.writer.limits.extraWorkingMinutes);
    if (end > longest) {
      const hours = Math.round(stage.durationMinutes / 6) / 10;
      throw new BadRequestError(
        `'${stage.name}' needs ${hours} working hours; this booking would run until ${formatInstant(end, cal.timeZone)}.`,
        [
          {
            field: 'endsAt',
            message: `must be no later than ${formatInstant(longest, cal.timeZone)} (the stage's working time plus ${this.writer.limits.extraWorkingMinutes / 60} working hours)`,
          },
        ],
      );
    }
  }

  /** A resource must be of a kind the stage asks for. */
  private checkKind(stage: Stage, resource: Resource): void {
    const kinds = (stage.requirements ?? []).map((r) => r.kind);
    if (kinds.length && !kinds.includes(resource.kind)) {
      throw new UnprocessableError(
        `${resource.name} is a ${resource.kind.replace(/_/g, ' ')}; '${stage.name}' needs ${kinds.map((k) => k.replace(/_/g, ' ')).join(', ')}.`,
        {
          code: 'wrong-kind',
          violations: [
            { kind: 'wrong-kind', severity: 'error', message: `'${stage.name}' can't be done by ${resource.name}` },
          ],
        },
      );
    }
  }

  /** Applies one change; the engine's verdict on all of them comes when the work is done. */
  async apply(change: BookingChange): Promise<Booking | null> {
    switch (change.action) {
      case 'book':
      case 'book-confirmed':
        return this.book(change);
      default:
        return this.change(change);
    }
  }

  private async book(change: Extract<BookingChange, { action: 'book' | 'book-confirmed' }>): Promise<Booking> {
    const actor = this.ctx.actor;
    if (!actor) throw new NotFoundError('stage');
    this.checkTimes(change.startsAt, change.endsAt);
    const stage = await findVisible(Stage, actor, change.stageId, this.trx, 'stage');
    const resource = await findVisible(Resource, actor, change.resourceId, this.trx, 'resource');
    this.checkKind(stage, resource);
    const existing = await Booking.query(this.trx)
      .where({ stageId: change.stageId, resourceId: change.resourceId })
      .forUpdate()
      .first();
    if (existing?.state === 'declined') {
      // Dropping the stage on the same person again after they declined: the declined booking is rebooked.
      return (await this.change({
        action: 'rebook',
        bookingId: String(existing.id),
        startsAt: change.startsAt,
        endsAt: change.endsAt,
      }))!;
    }
    if (existing) {
      const names = await namesOf(this.trx, change.stageId, change.resourceId);
      throw new ConflictError(`${names.resource} already has '${names.stage}' on ${names.job}.`, {
        code: 'already-booked',
        bookingId: String(existing.id),
      });
    }
    const { side } = await this.sideOf(change.stageId, change.resourceId);
    const state = this.stateAfter(change.action, null, side) as BookingState;
    const endsAt = change.endsAt ?? (await this.naturalEnd(stage, change.resourceId, change.startsAt));
    await this.checkLength(stage, change.resourceId, change.startsAt, endsAt);
    const created = await this.writer.guard(this.trx, change.stageId, change.resourceId, (sp) =>
      Booking.query(sp).insert({
        stageId: change.stageId,
        resourceId: change.resourceId,
        startsAt: new Date(change.startsAt),
        endsAt: new Date(endsAt),
        state,
        createdBy: actor.userId,
      } as Partial<Booking>),
    );
    await this.record(change.action, null, created);
    if (state === 'confirmed')
      await queueCustomerNotice(this.trx, { bookingId: String(created.id), event: 'confirmed' });
    this.checkStages.add(String(created.stageId));
    return created;
  }

  private async change(change: StoredChange): Promise<Booking | null> {
    const before = await this.booking(change.bookingId, change.version);
    const stageId = String(before.stageId);
    const { side, installerFirmId } = await this.sideOf(stageId, String(before.resourceId));
    let action: BookingAction = change.action;
    const timed = 'startsAt' in change;
    // A declined booking moved to another time or person is rebooked: it starts again as pencilled.
    if (timed && action === 'move' && before.state === 'declined') action = 'rebook';
    const to = this.stateAfter(action, before.state, side);
    // When a step of progress was marked: the phone's time for a step it kept, else now. The audit
    // row keeps it, and the job page reads it back (on site since, done at).
    const kept = 'markedAt' in change ? change.markedAt : undefined;
    const markedAt = PROGRESS_STEPS.has(action) ? (kept ?? this.writer.now()) : undefined;
    if (action === 'arrive') await this.checkOnTheDay(before, installerFirmId, kept);
    // What the stage needs before it is done (a complete commissioning record, the certificate at handover).
    if (action === 'finish') await checkStageFinish(this.trx, stageId);

    if (to === 'removed') {
      await Booking.query(this.trx).deleteById(before.id);
      await this.record('unbook', before, null, installerFirmId);
      if (this.ctx.actor) await bookingRemoved(this.trx, this.ctx.actor, before);
      return null;
    }

    const patch: Partial<Booking> = { state: to, version: before.version + 1, updatedAt: new Date() };
    let newResource: { side: ResourceSide; resource: Resource } | null = null;
    const resourceId =
      'resourceId' in change && change.resourceId ? String(change.resourceId) : String(before.resourceId);
    if (resourceId !== String(before.resourceId)) {
      const resource = this.ctx.actor
        ? await findVisible(Resource, this.ctx.actor, resourceId, this.trx, 'resource')
        : null;
      if (!resource) throw new NotFoundError('resource');
      const stage = (await this.stage(stageId))!;
      this.checkKind(stage, resource);
      const taken = await Booking.query(this.trx).where({ stageId, resourceId }).whereNot('id', before.id).first();
      if (taken) {
        const names = await namesOf(this.trx, stageId, resourceId);
        throw new ConflictError(`${names.resource} already has '${names.stage}' on ${names.job}.`, {
          code: 'already-booked',
          bookingId: String(taken.id),
        });
      }
      newResource = { side: String(resource.firmId) === installerFirmId ? 'own' : 'partner', resource };
      patch.resourceId = resourceId;
      // On another resource the booking starts over there: asked again of a partner it had been sent to, pencilled otherwise.
      if (action === 'move' || action === 'rebook') {
        patch.state =
          newResource.side === 'partner'
            ? ['sent', 'confirmed'].includes(before.state)
              ? 'sent'
              : 'pencilled'
            : side === 'own'
              ? to
              : 'pencilled';
      }
    }
    if (timed) {
      const stage = (await this.stage(stageId))!;
      this.checkTimes(change.startsAt, change.endsAt);
      const start = change.startsAt;
      const end = change.endsAt ?? (await this.naturalEnd(stage, resourceId, start));
      await this.checkLength(stage, resourceId, start, end);
      patch.startsAt = new Date(start);
      patch.endsAt = new Date(end);
    }
    const changes =
      patch.state !== before.state ||
      patch.resourceId !== undefined ||
      (patch.startsAt !== undefined && patch.startsAt.getTime() !== before.startsAt.getTime()) ||
      (patch.endsAt !== undefined && patch.endsAt.getTime() !== before.endsAt.getTime());
    // The version counts changes to the booking (and a fresh request about it); a proposal changes neither.
    const after =
      changes || action === 'refuse-proposal'
        ? await this.writer.guard(this.trx, stageId, resourceId, (sp) =>
            Booking.query(sp).patchAndFetchById(before.id, patch),
          )
        : before;
    await this.messages(action, before, after, side, newResource?.side ?? side);
    await this.record(action, before, after, installerFirmId, {
      reason: 'reason' in change ? change.reason : undefined,
      markedAt,
    });
    const moved =
      before.startsAt.getTime() !== after.startsAt.getTime() || before.endsAt.getTime() !== after.endsAt.getTime();
    if (moved || newResource || action === 'send') this.checkStages.add(stageId);
    return after;
  }

  /** What a change means for the partner and the householder, in this transaction. */
  private async messages(
    action: BookingAction,
    before: Booking,
    after: Booking,
    side: ResourceSide,
    newSide: ResourceSide,
  ): Promise<void> {
    const id = String(after.id);
    const wasOut = side === 'partner' && ['sent', 'confirmed'].includes(before.state);
    const moved =
      before.startsAt.getTime() !== after.startsAt.getTime() || before.endsAt.getTime() !== after.endsAt.getTime();
    const newResource = String(before.resourceId) !== String(after.resourceId);
    switch (action) {
      case 'send':
        await queueBookingMessage(this.trx, { bookingId: id, kind: 'request', version: after.version });
        break;
      case 'withdraw':
        await queueBookingMessage(this.trx, {
          bookingId: id,
          kind: 'cancel',
          version: after.version,
          resourceId: String(before.resourceId),
        });
        break;
      case 'refuse-proposal':
        await enqueueMessage(this.trx, `booking.${id}.v${after.version}.refused`, 'proposal_refused', {
          bookingId: id,
          version: after.version,
        });
        await this.trx('booking_requests')
          .insert({ booking_id: id, booking_version: after.version, resource_id: after.resourceId })
          .onConflict(['booking_id', 'booking_version'])
          .ignore();
        break;
      case 'assign':
        if (after.state === 'sent')
          await queueBookingMessage(this.trx, { bookingId: id, kind: 'update', version: after.version });
        break;
      case 'accept':
        // The partner's calendar entry turns from tentative to confirmed (same UID, the new version as SEQUENCE).
        await enqueueMessage(this.trx, `booking.${id}.v${after.version}.confirmed`, 'booking_confirmed', {
          bookingId: id,
          version: after.version,
        });
        break;
      case 'decline':
        // The installer's schedulers hear of it at once: a declined slot is work for them (book it again).
        await enqueueMessage(this.trx, `booking.${id}.v${after.version}.declined`, 'booking_declined', {
          bookingId: id,
          version: after.version,
        });
        break;
      case 'move':
      case 'take-proposal':
      case 'rebook':
        if (wasOut && newResource) {
          await queueBookingMessage(this.trx, {
            bookingId: id,
            kind: 'cancel',
            version: after.version,
            resourceId: String(before.resourceId),
          });
          if (newSide === 'partner' && after.state === 'sent')
            await queueBookingMessage(this.trx, { bookingId: id, kind: 'request', version: after.version });
        } else if (wasOut && (moved || action === 'take-proposal')) {
          await queueBookingMessage(this.trx, { bookingId: id, kind: 'update', version: after.version });
        }
        break;
      default:
        break;
    }
    // The householder hears of a delivery or lift date when it is settled, and when a settled one moves.
    if (before.state === 'confirmed' && moved && after.state !== 'pencilled') {
      await queueCustomerNotice(this.trx, { bookingId: id, event: 'changed' });
    } else if (after.state === 'confirmed' && before.state !== 'confirmed') {
      await queueCustomerNotice(this.trx, { bookingId: id, event: 'confirmed' });
    }
  }

  private async record(
    action: BookingAction,
    before: Booking | null,
    after: Booking | null,
    installerFirmId?: string,
    said: { reason?: string | undefined; markedAt?: number | undefined } = {},
  ): Promise<void> {
    this.written.push({ action, before, after });
    const row = (after ?? before)!;
    const firmId = installerFirmId ?? (await this.sideOf(String(row.stageId), String(row.resourceId))).installerFirmId;
    const snapshot = after
      ? {
          ...after.toJSON(),
          action,
          ...(said.reason ? { reason: said.reason } : {}),
          ...(said.markedAt !== undefined ? { markedAt: new Date(said.markedAt).toISOString() } : {}),
        }
      : null;
    await recordChange(
      this.trx,
      this.ctx.actor,
      'booking',
      String(row.id),
      before === null ? 'create' : after === null ? 'delete' : 'update',
      before,
      snapshot,
      firmId,
    );
  }

  /**
   * People are on site on the day of the booking, not a week ahead: the day it was marked (today,
   * or the day a phone without a signal kept it from), in the firm's zone, must fall within it.
   */
  private async checkOnTheDay(booking: Booking, installerFirmId: string, markedAt?: number): Promise<void> {
    const firm = await this.trx('firms').where('id', installerFirmId).first('time_zone');
    const zone = String(firm?.timeZone ?? 'Europe/London');
    const today = localDayOf(zone, markedAt ?? this.writer.now());
    const first = localDayOf(zone, booking.startsAt.getTime());
    const last = localDayOf(zone, booking.endsAt.getTime() - 1);
    if (today < first || today > last) {
      throw new TransitionRefusedError(
        'arrive',
        booking.state,
        `This booking is on ${formatInstant(booking.startsAt.getTime(), zone)}: it can be marked on site on that day.`,
      );
    }
  }

  /** Records an instant a partner proposed, in bounds like any booking time. */
  checkProposal(start: number, end: number): void {
    this.checkTimes(start, end, { start: 'proposedStart', end: 'proposedEnd' });
  }
}

/** What a write returns: the bookings as saved and the engine's warnings about them. */
export interface WriteOutcome<T> {
  result: T;
  written: WrittenBooking[];
  warnings: Violation[];
}

/** Transaction-long advisory locks on `keys`, taken in sorted order (so two writers never deadlock). */
async function takeLocks(trx: Knex.Transaction, keys: string[]): Promise<void> {
  if (keys.length === 0) return;
  await trx.raw(
    `SELECT pg_advisory_xact_lock(hashtextextended(k, 0)) FROM (SELECT unnest(?::text[]) AS k ORDER BY 1) AS keys`,
    [[...keys].sort()],
  );
}

/**
 * The lock every booking write takes on each resource it touches, for a change to a resource's own
 * time (taken off the books, marked away) to wait for such a write, or make it wait, and so see it.
 */
export async function lockResources(trx: Knex.Transaction, resourceIds: readonly string[]): Promise<void> {
  await takeLocks(
    trx,
    resourceIds.map((id) => `resource.${id}`),
  );
}

/**
 * The lock every booking write takes on each job it touches (before its resources), for a change to
 * a job's stages outside the write path (planning it again) to wait for such a write, or make it
 * wait, and so see its bookings.
 */
export async function lockJobs(trx: Knex.Transaction, jobIds: readonly string[]): Promise<void> {
  await takeLocks(
    trx,
    jobIds.map((id) => `job.${id}`),
  );
}

/** Which rows a write will touch, known before it starts: their jobs and resources are locked. */
export interface LockScope {
  bookingIds?: string[];
  stageIds?: string[];
  resourceIds?: string[];
}

/**
 * The guarded write path for bookings. In one transaction it
 * 1. takes advisory locks on every job and then every resource involved (each set in sorted order,
 *    so two writers never wait on each other in a circle),
 * 2. runs the caller's work, in which each change re-reads its booking, asks the state machine,
 *    checks its times, writes the row, its outbox rows and its audit row (which notifies the board
 *    stream when the transaction commits),
 * 3. asks the engine about every stage that got a new time, resource or hold, over the whole job
 *    and everything else on those resources; an error rolls everything back (422).
 */
export class BookingWriter {
  constructor(
    readonly knex: Knex,
    readonly now: () => number = Date.now,
    readonly limits: BookingLimits = DEFAULT_BOOKING_LIMITS,
  ) {}

  /** The installer's office as the engine's reader: the checks always see the whole job. */
  installerOffice(firmId: string, actor: Actor | null): Actor {
    return { userId: actor?.userId ?? '0', firmId, firmKind: 'installer', role: 'scheduler' };
  }

  viewOf(row: Booking): Record<string, unknown> {
    return {
      id: String(row.id),
      stageId: String(row.stageId),
      resourceId: String(row.resourceId),
      startsAt: row.startsAt.toISOString(),
      endsAt: row.endsAt.toISOString(),
      state: row.state,
      version: row.version,
    };
  }

  /** Runs a write that PostgreSQL may refuse for an overlap of held bookings, in the user's words. */
  async guard<T>(
    trx: Knex.Transaction,
    stageId: string,
    resourceId: string,
    write: (savepoint: Knex.Transaction) => PromiseLike<T>,
  ): Promise<T> {
    try {
      // A savepoint, so the refusal can be explained with a query in the same transaction.
      return await trx.transaction(async (savepoint) => await write(savepoint));
    } catch (error) {
      if (!isPgError(error, '23P01')) throw error;
      const names = await namesOf(trx, stageId, resourceId);
      throw new ResourceHeldError(`${names.resource} is already confirmed for other work at that time.`);
    }
  }

  private async lock(trx: Knex.Transaction, scope: LockScope): Promise<void> {
    const bookingIds = scope.bookingIds ?? [];
    const stageIds = scope.stageIds ?? [];
    const jobRows = await trx.raw(
      `SELECT DISTINCT s.job_id FROM stages s WHERE s.id = ANY(?::bigint[])
      UNION SELECT s.job_id FROM bookings b JOIN stages s ON s.id = b.stage_id WHERE b.id = ANY(?::bigint[])`,
      [stageIds, bookingIds],
    );
    const jobIds = (jobRows.rows as { job_id: string }[]).map((r) => String(r.job_id)).sort();
    await lockJobs(trx, jobIds);
    // With the jobs held no booking of theirs can change, so their resources are now known for certain.
    const resourceRows = await trx.raw(
      `SELECT DISTINCT b.resource_id FROM bookings b JOIN stages s ON s.id = b.stage_id
      WHERE s.job_id = ANY(?::bigint[]) OR b.id = ANY(?::bigint[])`,
      [jobIds, bookingIds],
    );
    const resourceIds = new Set([
      ...(resourceRows.rows as { resource_id: string }[]).map((r) => String(r.resource_id)),
      ...(scope.resourceIds ?? []).map(String),
    ]);
    await lockResources(trx, [...resourceIds]);
  }

  /**
   * Runs `work` inside the guarded transaction and returns its result with the engine's warnings.
   * Everything is kept, or nothing.
   */
  async run<T>(ctx: WriteContext, scope: LockScope, work: (w: BookingWork) => Promise<T>): Promise<WriteOutcome<T>> {
    // Two writers PostgreSQL had to pick between: the error handler tells the loser to try again
    // (409 write-conflict), as for every other route.
    return this.knex.transaction(async (trx) => {
      await this.lock(trx, scope);
      const w = new BookingWork(trx, ctx, this);
      const result = await work(w);
      const warnings = await this.verify(trx, ctx, [...w.checkStages]);
      return { result, written: w.written, warnings };
    });
  }

  /** The engine's verdict per installer whose stages changed, reading as that installer's office. */
  private async verify(trx: Knex.Transaction, ctx: WriteContext, stageIds: string[]): Promise<Violation[]> {
    if (stageIds.length === 0) return [];
    const rows = (await trx('stages as s')
      .join('jobs as j', 'j.id', 's.job_id')
      .whereIn('s.id', stageIds)
      .select('s.id', 'j.firm_id')) as { id: string; firmId: string }[];
    const byFirm = new Map<string, string[]>();
    for (const r of rows) byFirm.set(String(r.firmId), [...(byFirm.get(String(r.firmId)) ?? []), String(r.id)]);
    const warnings: Violation[] = [];
    for (const [firmId, ids] of byFirm)
      warnings.push(...(await verifyStages(trx, this.installerOffice(firmId, ctx.actor), ids, this.now())));
    return warnings;
  }
}
