import type { Knex } from 'knex';
import type {
  AbsenceCreated,
  AbsenceView,
  AffectedBooking,
  ClosureCreated,
  ClosureView,
  CreateAbsence,
  CreateClosure,
} from '../../shared/schemas/absences.ts';
import {
  addDays,
  dateWords,
  localSpanOf,
  localTimeOn,
  startOfLocalDay,
  type LocalSpan,
} from '../../shared/local-dates.ts';
import { BadRequestError, ConflictError, NotFoundError } from '../errors.ts';
import { reachOf, type Actor } from './actor.ts';
import { recordChange } from './audit.ts';
import { notifyFirmChange, notifyResourceChange } from './board-stream.ts';
import { bookingOfOwnResource } from './read-policy.ts';
import { lockResources } from './booking-writes.ts';
import { ownResourceIds } from '../models/base.ts';
import type { MyWorkAway } from '../../shared/schemas/my-work.ts';

/** Absences shown on a resource: those not over, and those that ended in the last 30 days. */
const SHOWN_AFTER_DAYS = 30;

interface OwnResource {
  id: string;
  name: string;
  firmId: string;
  timeZone: string;
}

interface ExceptionRow {
  id: string;
  resourceId: string;
  startsAt: Date;
  endsAt: Date;
  reason: string;
}

/**
 * A resource's time away (holiday, sickness, a machine off the road), kept as the resource's
 * calendar exceptions, which the board's working calendars and the engine already read. Only the
 * firm that owns a resource marks it away: an installer its crews, people and machines, a partner
 * firm its own people and plant (so every installer that books them sees it). Another firm's
 * resource is 404, as if it did not exist.
 */
export class AbsencesService {
  constructor(private readonly knex: Knex) {}

  /** The resource, when it is the actor's own firm's (404 otherwise, hired or a partner's included). */
  private async ownResource(actor: Actor, resourceId: string, trx: Knex | Knex.Transaction = this.knex) {
    const row = (await trx('resources as r')
      .join('firms as f', 'f.id', 'r.firm_id')
      .where({ 'r.id': resourceId, 'r.firm_id': actor.firmId, 'r.active': true })
      .first('r.id', 'r.name', 'r.firm_id', 'f.time_zone')) as OwnResource | undefined;
    if (!row || reachOf(actor) === 'crew') throw new NotFoundError('resource');
    return row;
  }

  private view(r: OwnResource, e: ExceptionRow): AbsenceView {
    // Whole days read as dates alone; part of a day gives its times (the exclusive end of a whole
    // last day is the next day's midnight).
    return {
      id: String(e.id),
      resourceId: String(e.resourceId),
      ...localSpanOf(e.startsAt, e.endsAt, r.timeZone),
      reason: e.reason,
    };
  }

  async list(actor: Actor, resourceId: string, now: number): Promise<AbsenceView[]> {
    const r = await this.ownResource(actor, resourceId);
    const rows = (await this.knex('calendar_exceptions')
      .where('resource_id', r.id)
      .where('ends_at', '>', new Date(now - SHOWN_AFTER_DAYS * 86_400_000))
      .orderBy('starts_at')
      .select('id', 'resource_id', 'starts_at', 'ends_at', 'reason')) as ExceptionRow[];
    return rows.map((e) => this.view(r, e));
  }

  async create(actor: Actor, resourceId: string, input: CreateAbsence): Promise<AbsenceCreated> {
    return this.knex.transaction(async (trx) => {
      const r = await this.ownResource(actor, resourceId, trx);
      await lockOwnTime(trx, String(r.id));
      const { startsAt, endsAt } = instantsOf(input, r.timeZone);
      refuseOverlap(
        `${r.name} is already marked away`,
        await overlapping(trx('calendar_exceptions').where('resource_id', r.id), startsAt, endsAt),
        r.timeZone,
      );
      const [row] = (await trx('calendar_exceptions')
        .insert({ resource_id: r.id, starts_at: startsAt, ends_at: endsAt, reason: input.reason })
        .returning(['id', 'resource_id', 'starts_at', 'ends_at', 'reason'])) as ExceptionRow[];
      const absence = this.view(r, row!);
      await recordChange(trx, actor, 'absence', absence.id, 'create', null, absence);
      await notifyResourceChange(trx, r.id);
      const affected = await bookingsWithin(trx, actor, [r.id], startsAt, endsAt);
      return { absence, affected };
    });
  }

  async remove(actor: Actor, absenceId: string): Promise<void> {
    await this.knex.transaction(async (trx) => {
      const e = (await trx('calendar_exceptions')
        .where('id', absenceId)
        .whereNotNull('resource_id')
        .forUpdate()
        .first('id', 'resource_id', 'starts_at', 'ends_at', 'reason')) as ExceptionRow | undefined;
      if (!e) throw new NotFoundError('absence');
      const r = await this.ownResource(actor, String(e.resourceId), trx).catch(() => {
        throw new NotFoundError('absence');
      });
      await trx('calendar_exceptions').where('id', e.id).delete();
      await recordChange(trx, actor, 'absence', String(e.id), 'delete', this.view(r, e), null);
      await notifyResourceChange(trx, r.id);
    });
  }

  /**
   * The reader's own time away over [from, to), in their firm's zone: absences of the resources
   * they work as (their person row, their crews), and the days their firm is closed, told once
   * though a closure is kept on each of the firm's calendars. Crew read this on My work.
   */
  async ownAwayDuring(actor: Actor, from: Date, to: Date, timeZone: string): Promise<MyWorkAway[]> {
    const rows = (await this.knex('calendar_exceptions as e')
      .leftJoin('resources as r', 'r.id', 'e.resource_id')
      .where((q) =>
        q
          .whereIn('e.resource_id', ownResourceIds(this.knex, actor))
          .orWhereIn('e.calendar_id', this.knex('calendars').where('firm_id', actor.firmId).select('id')),
      )
      .where('e.ends_at', '>', from)
      .where('e.starts_at', '<', to)
      .orderBy([{ column: 'e.starts_at' }, { column: 'r.name' }])
      .select('r.name as resource_name', 'e.starts_at', 'e.ends_at', 'e.reason')) as {
      resourceName: string | null;
      startsAt: Date;
      endsAt: Date;
      reason: string;
    }[];
    const seen = new Set<string>();
    const out: MyWorkAway[] = [];
    for (const e of rows) {
      const away: MyWorkAway = {
        resourceName: e.resourceName ?? null,
        ...localSpanOf(e.startsAt, e.endsAt, timeZone),
        reason: e.reason,
      };
      const key = JSON.stringify(away);
      if (seen.has(key)) continue;
      seen.add(key);
      out.push(away);
    }
    return out;
  }

  /**
   * The firm's time zone and its calendars, the first being the one closures are listed from. A
   * change (`lock`) holds the firm's row first, as every change to its working weeks does
   * (server/services/working-week.ts): a week added meanwhile gets every closure, or waits for it.
   */
  private async firmCalendars(actor: Actor, trx: Knex | Knex.Transaction = this.knex, lock = false) {
    if (reachOf(actor) === 'crew') throw new NotFoundError('firm');
    const q = trx('firms').where('id', actor.firmId);
    if (lock) q.forNoKeyUpdate();
    const firm = (await q.first('time_zone')) as { timeZone: string };
    const calendars = (await trx('calendars').where('firm_id', actor.firmId).orderBy('id').pluck('id')) as string[];
    return { timeZone: firm.timeZone, calendars: calendars.map(String) };
  }

  private closureView(timeZone: string, e: { id: string; startsAt: Date; endsAt: Date; reason: string }): ClosureView {
    return { id: String(e.id), ...localSpanOf(e.startsAt, e.endsAt, timeZone), reason: e.reason };
  }

  /** Days the whole firm is closed (a works shutdown): those not over, and those of the last 30 days. */
  async listClosures(actor: Actor, now: number): Promise<ClosureView[]> {
    const { timeZone, calendars } = await this.firmCalendars(actor);
    if (calendars.length === 0) return [];
    const rows = await this.knex('calendar_exceptions')
      .where('calendar_id', calendars[0])
      .where('ends_at', '>', new Date(now - SHOWN_AFTER_DAYS * 86_400_000))
      .orderBy('starts_at')
      .select('id', 'starts_at', 'ends_at', 'reason');
    return rows.map((e) => this.closureView(timeZone, e));
  }

  /**
   * Closes the whole firm for whole local days: the same days on each of its working calendars, so
   * every crew, person and machine of the firm is shaded on the boards (a partner firm's on the
   * boards of every installer it works with) and every booking left in them is flagged.
   */
  async createClosure(actor: Actor, input: CreateClosure): Promise<ClosureCreated> {
    return this.knex.transaction(async (trx) => {
      const { timeZone, calendars } = await this.firmCalendars(actor, trx, true);
      if (calendars.length === 0) throw new NotFoundError('working calendar');
      await lockFirmTime(trx, actor.firmId);
      const { startsAt, endsAt } = instantsOf(input, timeZone);
      refuseOverlap(
        'The firm is already closed',
        await overlapping(trx('calendar_exceptions').where('calendar_id', calendars[0]), startsAt, endsAt),
        timeZone,
      );
      const rows = await trx('calendar_exceptions')
        .insert(calendars.map((c) => ({ calendar_id: c, starts_at: startsAt, ends_at: endsAt, reason: input.reason })))
        .returning(['id', 'calendar_id', 'starts_at', 'ends_at', 'reason']);
      const first = rows.find((r: { calendarId: string }) => String(r.calendarId) === calendars[0])!;
      const closure = this.closureView(timeZone, first);
      await recordChange(trx, actor, 'closure', closure.id, 'create', null, closure);
      await notifyFirmChange(trx, actor.firmId);
      const affected = await bookingsWithin(
        trx,
        actor,
        trx('resources').where('firm_id', actor.firmId).select('id'),
        startsAt,
        endsAt,
      );
      return { closure, affected };
    });
  }

  /** Takes a closure off every calendar of the firm (the rows of the same days and reason). */
  async removeClosure(actor: Actor, closureId: string): Promise<void> {
    await this.knex.transaction(async (trx) => {
      const { timeZone, calendars } = await this.firmCalendars(actor, trx, true);
      const e = await trx('calendar_exceptions')
        .where('id', closureId)
        .whereIn('calendar_id', calendars)
        .forUpdate()
        .first('id', 'starts_at', 'ends_at', 'reason');
      if (!e) throw new NotFoundError('closure');
      await trx('calendar_exceptions')
        .whereIn('calendar_id', calendars)
        .where({ starts_at: e.startsAt, ends_at: e.endsAt, reason: e.reason })
        .delete();
      await recordChange(trx, actor, 'closure', String(e.id), 'delete', this.closureView(timeZone, e), null);
      await notifyFirmChange(trx, actor.firmId);
    });
  }
}

/** Time away (or closed days) of `q` that [startsAt, endsAt) would overlap, soonest first. */
async function overlapping(q: Knex.QueryBuilder, startsAt: Date, endsAt: Date): Promise<ExceptionRow[]> {
  return (await q
    .where('starts_at', '<', endsAt)
    .where('ends_at', '>', startsAt)
    .orderBy('starts_at')
    .select('id', 'starts_at', 'ends_at', 'reason')) as ExceptionRow[];
}

/** "Tue 13 Oct", "Tue 13 Oct – Fri 16 Oct", "Thu 24 Dec from 13:00": days and times as the page lists them. */
function spanWords(s: LocalSpan): string {
  if (s.from === s.to) {
    if (s.fromTime && s.toTime) return `${dateWords(s.from)} ${s.fromTime}–${s.toTime}`;
    if (s.fromTime) return `${dateWords(s.from)} from ${s.fromTime}`;
    return s.toTime ? `${dateWords(s.from)} until ${s.toTime}` : dateWords(s.from);
  }
  return `${dateWords(s.from)}${s.fromTime ? ` ${s.fromTime}` : ''} – ${dateWords(s.to)}${s.toTime ? ` ${s.toTime}` : ''}`;
}

/**
 * Time away that would overlap time away already marked is refused (409 `overlap`), naming it: the
 * page lists one entry for each time away, and taking one off must not leave the other's days
 * behind unseen. The caller holds the resource's (or the firm's) lock, so two at once queue here.
 */
function refuseOverlap(already: string, rows: ExceptionRow[], zone: string): void {
  if (rows.length === 0) return;
  const named = rows.map((e) => `${spanWords(localSpanOf(e.startsAt, e.endsAt, zone))} (${e.reason})`).join(', ');
  throw new ConflictError(`${already} ${named}. Change the days, or take that off first.`, {
    code: 'overlap',
    errors: [{ field: 'from', message: 'must not overlap days already marked' }],
  });
}

/**
 * The instants of time away (or a closure) in a firm's zone: from the first day's start, or its
 * `fromTime`; to the last day's end, or its `toTime`. Times in order on the page can still meet the
 * wrong way round across the hour the clocks skip in spring (01:30 is 02:30 then): refused.
 */
function instantsOf(input: CreateAbsence, zone: string): { startsAt: Date; endsAt: Date } {
  const startsAt = new Date(
    input.fromTime ? localTimeOn(input.from, input.fromTime, zone) : startOfLocalDay(input.from, zone),
  );
  const endsAt = new Date(
    input.toTime ? localTimeOn(input.to, input.toTime, zone) : startOfLocalDay(addDays(input.to, 1), zone),
  );
  if (endsAt <= startsAt)
    throw new BadRequestError('The time away must end after it starts.', [
      { field: 'toTime', message: 'must be after the time away starts (the clocks go forward that night)' },
    ]);
  return { startsAt, endsAt };
}

/**
 * Bookings of the resources (not declined, not done) inside [startsAt, endsAt), soonest first, as
 * the read policy lets the actor hear of them (bookingOfOwnResource).
 */
export async function bookingsWithin(
  trx: Knex.Transaction,
  actor: Actor,
  resourceIds: string[] | Knex.QueryBuilder,
  startsAt: Date,
  endsAt?: Date,
): Promise<AffectedBooking[]> {
  const q = trx('bookings as b')
    .join('stages as s', 's.id', 'b.stage_id')
    .join('jobs as j', 'j.id', 's.job_id')
    .whereIn('b.resource_id', resourceIds)
    .whereNotIn('b.state', ['declined', 'done'])
    .where('b.ends_at', '>', startsAt)
    .orderBy(['b.starts_at', 'b.id'])
    .select(
      'b.id',
      'b.starts_at',
      'b.ends_at',
      'b.state',
      'j.firm_id as job_firm_id',
      'j.reference',
      's.name as stage_name',
    );
  if (endsAt) q.where('b.starts_at', '<', endsAt);
  const rows = (await q) as Parameters<typeof bookingOfOwnResource>[1][];
  return rows.map((b) => bookingOfOwnResource(actor, b)).filter((b): b is AffectedBooking => b !== null);
}

/**
 * Takes the write path's lock on a resource whose own time changes (marked away, or back), and on
 * each crew it is in (a crew's booking takes the crew's lock, and counts its people): a booking
 * under way is waited for and named among those affected, and one sent meanwhile waits and is
 * checked against the new time away.
 */
export async function lockOwnTime(trx: Knex.Transaction, resourceId: string): Promise<void> {
  const crews = (await trx('crew_members').where('person_id', resourceId).pluck('crew_id')) as string[];
  await lockResources(trx, [String(resourceId), ...crews.map(String)]);
}

/** {@link lockOwnTime} for every resource of a firm: its working days or hours change for all of them. */
export async function lockFirmTime(trx: Knex.Transaction, firmId: string): Promise<void> {
  const ids = (await trx('resources').where({ firm_id: firmId, active: true }).pluck('id')) as string[];
  await lockResources(trx, ids.map(String));
}
