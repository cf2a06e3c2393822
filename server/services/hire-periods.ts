import type { Knex } from 'knex';
import type { AffectedBooking } from '../../shared/schemas/absences.ts';
import type {
  CreateHirePeriod,
  HirePeriodCancelled,
  HirePeriodSaved,
  HirePeriodView,
  UpdateHirePeriod,
} from '../../shared/schemas/hire.ts';
import { Firm, HirePeriod, Resource } from '../models/index.ts';
import { BadRequestError, ConflictError, NotFoundError, UnprocessableError } from '../errors.ts';
import { bookingsWithin } from './absences.ts';
import type { Actor } from './actor.ts';
import { recordChange } from './audit.ts';
import { notifyResourceChange } from './board-stream.ts';
import { lockResources } from './booking-writes.ts';
import { findVisible, scoped } from './scope.ts';
import { dateWords, localDateOf } from '../../shared/local-dates.ts';

/** The model has no typed version yet: the migration 20261215000100 adds it and updated_at. */
type VersionedHire = HirePeriod & { version: number; updatedAt: Date };

function viewOf(h: VersionedHire): HirePeriodView {
  return {
    id: String(h.id),
    resourceId: String(h.resourceId),
    hirerFirmId: String(h.hirerFirmId),
    supplierFirmId: String(h.supplierFirmId),
    onHireAt: h.onHireAt.toISOString(),
    offHireAt: h.offHireAt.toISOString(),
    dayRatePence: h.dayRatePence,
    deliveryPence: h.deliveryPence,
    collectionPence: h.collectionPence,
    status: h.status,
    approvedBy: h.approvedBy === null ? null : String(h.approvedBy),
    version: h.version,
    updatedAt: h.updatedAt.toISOString(),
  };
}

/**
 * Hire periods the installer's manager records and approves. Only the firm's own hired machines,
 * from a firm it works with; every change audited; a change based on an old version is refused.
 */
export class HirePeriodsService {
  constructor(
    private readonly knex: Knex,
    private readonly now: () => number = Date.now,
  ) {}

  async create(actor: Actor, input: CreateHirePeriod): Promise<HirePeriodView> {
    return this.knex.transaction(async (trx) => {
      const resource = await findVisible(Resource, actor, input.resourceId, trx, 'resource');
      if (resource.firmId !== actor.firmId || resource.ownership !== 'hired') {
        throw new UnprocessableError("Only your own firm's hired machines have hire periods.", {
          errors: [{ field: 'resourceId', message: 'is not a machine your firm hires in' }],
        });
      }
      // The write path's lock on the machine first: a booking of it under way is waited for.
      await lockResources(trx, [String(resource.id)]);
      const supplier = await scoped(Firm, actor, trx).findById(input.supplierFirmId);
      if (!supplier || supplier.id === actor.firmId) {
        throw new BadRequestError('The supplier must be a firm you work with.', [
          { field: 'supplierFirmId', message: 'is not a firm you work with' },
        ]);
      }
      if (!input.alsoOverlapping)
        await askIfOverlapping(trx, actor, String(resource.id), new Date(input.onHireAt), new Date(input.offHireAt));
      const inserted = (await HirePeriod.query(trx)
        .insert({
          resourceId: input.resourceId,
          hirerFirmId: actor.firmId,
          supplierFirmId: input.supplierFirmId,
          onHireAt: new Date(input.onHireAt),
          offHireAt: new Date(input.offHireAt),
          dayRatePence: input.dayRatePence,
          deliveryPence: input.deliveryPence,
          collectionPence: input.collectionPence,
          status: input.approve ? 'approved' : 'requested',
          approvedBy: input.approve ? actor.userId : null,
        } as Partial<HirePeriod>)
        .returning('*')) as unknown as VersionedHire;
      const view = viewOf(inserted);
      await recordChange(trx, actor, 'hire_period', view.id, 'create', null, view);
      // Open boards check bookings against the hire and count its idle days: they reload.
      await notifyResourceChange(trx, String(resource.id));
      return view;
    });
  }

  /**
   * Approve, end, or change dates and prices of one of the firm's hire periods; answers with the
   * machine's bookings from now on that the new dates leave outside every hire of it. Ending a hire
   * (the machine has gone back) puts its off-hire at now if it was later; an ended hire takes no
   * change but being reopened (approved again, with the off-hire it had).
   */
  async update(actor: Actor, id: string, input: UpdateHirePeriod): Promise<HirePeriodSaved> {
    return this.knex.transaction(async (trx) => {
      const before = await this.held(trx, actor, id, input.version);
      this.refuseStep(before, input);
      const onHireAt = input.onHireAt ? new Date(input.onHireAt) : before.onHireAt;
      let offHireAt = input.offHireAt ? new Date(input.offHireAt) : before.offHireAt;
      // Ended: the machine went back now, so it is off hire from now (to the minute) if it was later.
      const now = Math.floor(this.now() / 60_000) * 60_000;
      if (input.status === 'ended' && offHireAt.getTime() > now) offHireAt = new Date(now);
      if (offHireAt.getTime() <= onHireAt.getTime()) {
        throw new BadRequestError('The off-hire must be after the on-hire.', [
          {
            field: input.offHireAt ? 'offHireAt' : 'onHireAt',
            message: input.offHireAt ? 'must be after the on-hire' : 'must be before the off-hire',
          },
        ]);
      }
      // Only new days are asked about: an overlap the hire already had was answered when it was made.
      if ((input.onHireAt || input.offHireAt) && !input.alsoOverlapping)
        await askIfOverlapping(trx, actor, String(before.resourceId), onHireAt, offHireAt, id);
      const status = input.status ?? before.status;
      const after = (await HirePeriod.query(trx).patchAndFetchById(id, {
        onHireAt,
        offHireAt,
        status,
        dayRatePence: input.dayRatePence ?? before.dayRatePence,
        deliveryPence: input.deliveryPence ?? before.deliveryPence,
        collectionPence: input.collectionPence ?? before.collectionPence,
        approvedBy: input.status === 'approved' ? actor.userId : before.approvedBy,
        version: before.version + 1,
        updatedAt: new Date(),
      } as Partial<HirePeriod>)) as VersionedHire;
      const view = viewOf(after);
      await recordChange(trx, actor, 'hire_period', id, 'update', viewOf(before), view);
      await notifyResourceChange(trx, String(before.resourceId));
      return { hire: view, affected: await this.leftOutside(trx, actor, before, after) };
    });
  }

  /**
   * Cancels a hire that has not started (the manager's "cancel it" when nothing is booked on it);
   * answers with the machine's bookings from now on that it leaves off hire. One that has started
   * is kept, for what it cost: its off-hire is changed instead.
   */
  async cancel(actor: Actor, id: string, version: number): Promise<HirePeriodCancelled> {
    return this.knex.transaction(async (trx) => {
      const hire = await this.held(trx, actor, id, version);
      if (hire.onHireAt.getTime() <= this.now()) {
        throw new ConflictError('This hire has started, so it stays on the books: change its off-hire instead.', {
          code: 'hire-started',
          current: viewOf(hire),
        });
      }
      await HirePeriod.query(trx).deleteById(id);
      await recordChange(trx, actor, 'hire_period', id, 'delete', viewOf(hire), null);
      await notifyResourceChange(trx, String(hire.resourceId));
      return { affected: await this.leftOutside(trx, actor, hire, null) };
    });
  }

  /**
   * The steps a hire may not take: ending one that is not approved or has not started (it is
   * approved, changed or cancelled instead), and any change to an ended hire but reopening it
   * (status approved again: the end's Undo).
   */
  private refuseStep(hire: VersionedHire, input: UpdateHirePeriod): void {
    const refuse = (code: string, detail: string) => {
      throw new ConflictError(detail, { code, current: viewOf(hire) });
    };
    if (hire.status === 'ended') {
      if (input.status !== 'approved')
        refuse(
          'hire-ended',
          'This hire has ended, so it stays as it was: record a new hire if the machine comes back.',
        );
      return;
    }
    if (input.status !== 'ended') return;
    if (hire.status !== 'approved') refuse('hire-not-approved', 'Approve this hire before ending it.');
    if (hire.onHireAt.getTime() > this.now())
      refuse('hire-not-started', "This hire hasn't started, so there is nothing to end: cancel it instead.");
  }

  /**
   * One of the firm's hire periods, locked for a change from `version`: the write path's lock on
   * the machine first (a booking of it under way is waited for), then the row. Another firm's hire
   * is not found; a version other than the stored one is refused with the hire as it stands.
   */
  private async held(trx: Knex.Transaction, actor: Actor, id: string, version: number): Promise<VersionedHire> {
    const hire = scoped(HirePeriod, actor, trx).where('hire_periods.hirer_firm_id', actor.firmId).findById(id);
    const seen = (await hire.clone()) as VersionedHire | undefined;
    if (!seen) throw new NotFoundError('hire period');
    await lockResources(trx, [String(seen.resourceId)]);
    const held = (await hire.forUpdate()) as VersionedHire | undefined;
    if (!held) throw new NotFoundError('hire period');
    if (held.version !== version) {
      throw new ConflictError('Someone else changed this hire since you loaded it.', {
        code: 'stale-version',
        current: viewOf(held),
      });
    }
    return held;
  }

  /**
   * The machine's bookings from now on (soonest first) inside one of its hires as they were and
   * inside none now that `before` became `after` (or went, when null): those the change leaves off
   * hire. The test is the engine's (a booking lies wholly inside one hire), so the board flags
   * exactly these.
   */
  private async leftOutside(
    trx: Knex.Transaction,
    actor: Actor,
    before: VersionedHire,
    after: VersionedHire | null,
  ): Promise<AffectedBooking[]> {
    const machine = String(before.resourceId);
    const others = (await scoped(HirePeriod, actor, trx)
      .where('hire_periods.resource_id', machine)
      .whereNot('hire_periods.id', before.id)) as HirePeriod[];
    const inside = (hires: HirePeriod[], b: AffectedBooking) =>
      hires.some(
        (h) => h.onHireAt.getTime() <= Date.parse(b.startsAt) && Date.parse(b.endsAt) <= h.offHireAt.getTime(),
      );
    const [was, is] = [[...others, before], after === null ? others : [...others, after]];
    return (await bookingsWithin(trx, actor, [machine], new Date(this.now()))).filter(
      (b) => inside(was, b) && !inside(is, b),
    );
  }
}

/**
 * Another hire of the machine over any of [onHireAt, offHireAt) is asked about first (409
 * `hire-overlap`, naming it): one machine paid for twice over the same days is most often a hire
 * recorded twice. It is not forbidden (the supplier may really have charged both, and the hire
 * report then suggests merging them): sent again with `alsoOverlapping`, it is saved. Hires that
 * meet, one ending as the next starts, do not overlap. Called under the machine's lock.
 */
async function askIfOverlapping(
  trx: Knex.Transaction,
  actor: Actor,
  resourceId: string,
  onHireAt: Date,
  offHireAt: Date,
  exceptId?: string,
): Promise<void> {
  const q = trx('hire_periods as h')
    .join('firms as s', 's.id', 'h.supplier_firm_id')
    .join('resources as r', 'r.id', 'h.resource_id')
    .where('h.resource_id', resourceId)
    .where('h.on_hire_at', '<', offHireAt)
    .where('h.off_hire_at', '>', onHireAt)
    .orderBy('h.on_hire_at')
    .first('h.id', 'h.on_hire_at', 'h.off_hire_at', 's.name as supplier', 'r.name as machine');
  if (exceptId !== undefined) q.whereNot('h.id', exceptId);
  const other = (await q) as
    { id: string; onHireAt: Date; offHireAt: Date; supplier: string; machine: string } | undefined;
  if (!other) return;
  const { timeZone } = (await trx('firms').where('id', actor.firmId).first('time_zone')) as { timeZone: string };
  const day = (t: number) => dateWords(localDateOf(t, timeZone));
  throw new ConflictError(
    `${other.machine} is already on hire ${day(other.onHireAt.getTime())} – ${day(other.offHireAt.getTime() - 1)} from ${other.supplier}: both hires would be paid for over the days they share.`,
    {
      code: 'hire-overlap',
      overlapping: {
        id: String(other.id),
        onHireAt: other.onHireAt.toISOString(),
        offHireAt: other.offHireAt.toISOString(),
        supplierName: other.supplier,
      },
    },
  );
}
