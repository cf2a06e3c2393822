import type { Knex } from 'knex';
import type { BookingView, CreateBooking, UpdateBooking } from '../../shared/schemas/bookings.ts';
import { Booking, Resource, Stage } from '../models/index.ts';
import { ConflictError, NotFoundError } from '../errors.ts';
import type { Actor } from './actor.ts';
import { findVisible, scoped } from './scope.ts';
import { recordChange } from './audit.ts';

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

export class BookingsService {
  constructor(private readonly knex: Knex) {}

  private view(actor: Actor, trx?: Knex.Transaction) {
    return scoped(Booking, actor, trx).join('stages', 'stages.id', 'bookings.stage_id')
      .join('jobs', 'jobs.id', 'stages.job_id').select(VIEW_COLUMNS);
  }

  /** Bookings overlapping [from, to) that the actor may see. */
  async list(actor: Actor, from: string, to: string): Promise<BookingView[]> {
    const rows = await this.view(actor).where('bookings.starts_at', '<', to).where('bookings.ends_at', '>', from)
      .orderBy('bookings.starts_at') as BookingRow[];
    return rows.map(toView);
  }

  async get(actor: Actor, id: string, trx?: Knex.Transaction): Promise<BookingView> {
    const row = await this.view(actor, trx).findById(id) as BookingRow | undefined;
    if (!row) throw new NotFoundError('booking');
    return toView(row);
  }

  async create(actor: Actor, input: CreateBooking): Promise<BookingView> {
    return this.knex.transaction(async (trx) => {
      await findVisible(Stage, actor, input.stageId, trx, 'stage');
      await findVisible(Resource, actor, input.resourceId, trx, 'resource');
      const created = await Booking.query(trx).insert({
        stageId: input.stageId, resourceId: input.resourceId, startsAt: new Date(input.startsAt),
        endsAt: new Date(input.endsAt), state: input.state, createdBy: actor.userId,
      } as Partial<Booking>);
      await recordChange(trx, actor, 'booking', created.id, 'create', null, created);
      return this.get(actor, created.id, trx);
    });
  }

  /** Moves or re-states a booking; a change based on an old version is refused (409), never overwritten. */
  async update(actor: Actor, id: string, input: UpdateBooking): Promise<BookingView> {
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
      await recordChange(trx, actor, 'booking', id, 'update', before, after);
      return this.get(actor, id, trx);
    });
  }
}
