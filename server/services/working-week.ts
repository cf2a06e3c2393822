import type { Knex } from 'knex';
import { isWorkingEnd, isWorkingInstant, type WorkingCalendar } from '../../shared/scheduler/index.ts';
import type { AffectedBooking } from '../../shared/schemas/absences.ts';
import {
  MAX_CALENDARS,
  type CalendarCreated,
  type CalendarHoursSaved,
  type CalendarHoursView,
  type CreateCalendar,
  type HolidayRegionSaved,
  type PutCalendarHours,
  type PutHolidayRegion,
  type PutResourceCalendar,
  type RenameCalendar,
  type ResourceCalendarSaved,
  type WorkingWeekView,
} from '../../shared/schemas/working-week.ts';
import {
  engineWeekly,
  HOLIDAY_REGIONS,
  storedWeeklyHours,
  weekHoursOf,
  type HolidayRegionCode,
  type StoredWeeklyHours,
} from '../../shared/working-week.ts';
import { todayIn } from '../../shared/local-dates.ts';
import { BadRequestError, ConflictError, NotFoundError } from '../errors.ts';
import { reachOf, type Actor } from './actor.ts';
import { recordChange } from './audit.ts';
import { notifyFirmChange, notifyResourceChange } from './board-stream.ts';
import { bookingsWithin, lockFirmTime, lockOwnTime } from './absences.ts';
import { holidayRegionOf } from './board.ts';
import { holidaysFor } from './holiday-days.ts';

interface CalendarRow {
  id: string;
  name: string;
  version: number;
  weeklyHours: StoredWeeklyHours;
}

/** "A", "A and B", "A, B and C". */
const andList = (names: string[]) =>
  names.length <= 1 ? (names[0] ?? '') : `${names.slice(0, -1).join(', ')} and ${names[names.length - 1]}`;

const regionCode = (code: string | null): HolidayRegionCode | null =>
  code !== null && code in HOLIDAY_REGIONS ? (code as HolidayRegionCode) : null;

/**
 * A firm's working week: the hours each of its working calendars keeps (the firm's standard week,
 * and any other its crews, people or machines work to) and the bank holidays it works to. Only the
 * firm's owner changes them; the board, the engine's checks and every partner's view read them at
 * once. A calendar of another firm is 404, as if it did not exist.
 */
export class WorkingWeekService {
  constructor(
    private readonly knex: Knex,
    private readonly now: () => number,
  ) {}

  async get(actor: Actor): Promise<WorkingWeekView> {
    const firm = await this.firm(actor, this.knex);
    const rows = (await this.knex('calendars')
      .where('firm_id', actor.firmId)
      .orderBy('id')
      .select('id', 'name', 'version', 'weekly_hours')) as CalendarRow[];
    const views = await Promise.all(rows.map((c, i) => this.view(this.knex, actor, c, i === 0)));
    return { timeZone: firm.timeZone, holidayRegion: regionCode(firm.holidayRegion), calendars: views };
  }

  /**
   * Saves a calendar's week unless someone changed it since `version` (409 with theirs), and
   * answers with the bookings from now on that the new hours leave outside working time (the board
   * flags them; nothing moves on its own).
   */
  async putHours(actor: Actor, calendarId: string, input: PutCalendarHours): Promise<CalendarHoursSaved> {
    return this.knex.transaction(async (trx) => {
      const firm = await this.firm(actor, trx, true);
      await lockFirmTime(trx, actor.firmId);
      const was = await this.ownCalendar(trx, actor, calendarId);
      const isDefault = (await this.standardId(actor, trx)) === String(was.id);
      if (was.version !== input.version) {
        throw new ConflictError(`Someone else changed ${was.name} since you loaded it: reload to see theirs.`, {
          code: 'stale-version',
          current: await this.view(trx, actor, was, isDefault),
        });
      }
      const stored = storedWeeklyHours(input.hours);
      const [row] = (await trx('calendars')
        .where('id', was.id)
        .update({ weekly_hours: JSON.stringify(stored), version: was.version + 1 })
        .returning(['id', 'name', 'version', 'weekly_hours'])) as CalendarRow[];
      await recordChange(
        trx,
        actor,
        'calendar',
        String(was.id),
        'update',
        { hours: weekHoursOf(was.weeklyHours) },
        { hours: input.hours },
      );
      await notifyFirmChange(trx, actor.firmId);
      const usedBy = this.resourcesOf(trx, actor, String(was.id), isDefault);
      const affected = await this.leftOutside(trx, actor, usedBy.select('id'), firm.timeZone, was.weeklyHours, stored);
      return { calendar: await this.view(trx, actor, row!, isDefault), affected };
    });
  }

  /**
   * Sets the bank holidays the firm works to, unless it was changed since the form loaded (`was`),
   * and answers with the bookings from now on that start or finish on one of the new region's
   * holidays that the old region did not have.
   */
  async putHolidayRegion(actor: Actor, input: PutHolidayRegion): Promise<HolidayRegionSaved> {
    return this.knex.transaction(async (trx) => {
      const firm = await this.firm(actor, trx, true);
      await lockFirmTime(trx, actor.firmId);
      const current = regionCode(firm.holidayRegion);
      if (current !== input.was) {
        throw new ConflictError(
          `Someone else changed the bank holidays to ${current ? HOLIDAY_REGIONS[current] : 'none'} since you loaded them: reload to see.`,
          { code: 'stale-version', current },
        );
      }
      await trx('firms').where('id', actor.firmId).update({ holiday_region: input.holidayRegion });
      await recordChange(
        trx,
        actor,
        'firm',
        actor.firmId,
        'update',
        { holidayRegion: firm.holidayRegion },
        { holidayRegion: input.holidayRegion },
      );
      await notifyFirmChange(trx, actor.firmId);
      const now = this.now();
      const upcoming = await bookingsWithin(
        trx,
        actor,
        trx('resources').where('firm_id', actor.firmId).select('id'),
        new Date(now),
      );
      const last = Math.max(now, ...upcoming.map((b) => Date.parse(b.endsAt)));
      const days = (code: string | null) =>
        new Set(holidaysFor(holidayRegionOf(code), { from: now, to: last }, 1).map((h) => h.date));
      const [had, has] = [days(firm.holidayRegion), days(input.holidayRegion)];
      const newly = (t: number) => {
        const d = todayIn(firm.timeZone, t);
        return has.has(d) && !had.has(d);
      };
      const affected = upcoming.filter((b) => newly(Date.parse(b.startsAt)) || newly(Date.parse(b.endsAt) - 1));
      return { holidayRegion: input.holidayRegion, affected };
    });
  }

  /**
   * Adds a working week named by the owner: the standard week's hours and the firm's closures (a
   * works shutdown is every week's), and nothing working to it until someone is moved onto it.
   */
  async createCalendar(actor: Actor, input: CreateCalendar): Promise<CalendarCreated> {
    return this.knex.transaction(async (trx) => {
      await this.firm(actor, trx, true);
      const standardId = await this.standardId(actor, trx);
      const standard = (await trx('calendars').where('id', standardId).first('weekly_hours')) as
        { weeklyHours: StoredWeeklyHours } | undefined;
      if (!standard) throw new NotFoundError('working calendar');
      const count = Number((await trx('calendars').where('firm_id', actor.firmId).count('* as n').first())!.n);
      if (count >= MAX_CALENDARS) {
        throw new ConflictError(
          `Your firm already keeps ${MAX_CALENDARS} working weeks, the most it can: change or take away one of them instead.`,
          { code: 'too-many-weeks' },
        );
      }
      const [row] = (await trx('calendars')
        .insert({ firm_id: actor.firmId, name: input.name, weekly_hours: JSON.stringify(standard.weeklyHours) })
        .returning(['id', 'name', 'version', 'weekly_hours'])) as CalendarRow[];
      const closures = (await trx('calendar_exceptions')
        .where('calendar_id', standardId)
        .select('starts_at', 'ends_at', 'reason')) as { startsAt: Date; endsAt: Date; reason: string }[];
      if (closures.length) {
        await trx('calendar_exceptions').insert(
          closures.map((c) => ({ calendar_id: row!.id, starts_at: c.startsAt, ends_at: c.endsAt, reason: c.reason })),
        );
      }
      const calendar = await this.view(trx, actor, row!, false);
      await recordChange(trx, actor, 'calendar', calendar.id, 'create', null, {
        name: calendar.name,
        hours: calendar.hours,
      });
      await notifyFirmChange(trx, actor.firmId);
      return { calendar };
    });
  }

  /** Renames a working week, unless it was renamed meanwhile (409 with the week as it stands). */
  async renameCalendar(actor: Actor, calendarId: string, input: RenameCalendar): Promise<CalendarHoursView> {
    return this.knex.transaction(async (trx) => {
      await this.firm(actor, trx, true);
      const c = await this.ownCalendar(trx, actor, calendarId);
      const isDefault = (await this.standardId(actor, trx)) === String(c.id);
      if (c.name !== input.previousName) {
        throw new ConflictError(`This week was renamed meanwhile, to ${c.name}: reload and try again.`, {
          code: 'stale-version',
          current: await this.view(trx, actor, c, isDefault),
        });
      }
      if (c.name !== input.name) {
        await trx('calendars').where('id', c.id).update({ name: input.name });
        await recordChange(trx, actor, 'calendar', String(c.id), 'update', { name: c.name }, { name: input.name });
        await notifyFirmChange(trx, actor.firmId);
      }
      return this.view(trx, actor, { ...c, name: input.name }, isDefault);
    });
  }

  /**
   * Takes away a working week nothing on the books works to. The standard week stays (new crews,
   * people and machines work to it); one still worked to is refused with who works to it.
   * Resources off the books that worked to it go back to the standard week.
   */
  async removeCalendar(actor: Actor, calendarId: string): Promise<void> {
    await this.knex.transaction(async (trx) => {
      await this.firm(actor, trx, true);
      const c = await this.ownCalendar(trx, actor, calendarId);
      if ((await this.standardId(actor, trx)) === String(c.id)) {
        throw new ConflictError(`${c.name} is the firm's standard week: new crews, people and machines work to it.`, {
          code: 'standard-week',
        });
      }
      const users = (await this.resourcesOf(trx, actor, String(c.id), false).orderBy('name').pluck('name')) as string[];
      if (users.length) {
        throw new ConflictError(
          `${andList(users)} ${users.length === 1 ? 'works' : 'work'} to ${c.name}: move ${users.length === 1 ? 'it' : 'them'} onto another week first.`,
          { code: 'in-use', usedBy: users },
        );
      }
      const before = await this.view(trx, actor, c, false);
      await trx('resources').where('calendar_id', c.id).update({ calendar_id: null });
      await trx('calendars').where('id', c.id).delete();
      await recordChange(trx, actor, 'calendar', before.id, 'delete', { name: before.name, hours: before.hours }, null);
      await notifyFirmChange(trx, actor.firmId);
    });
  }

  /**
   * Moves one of the firm's crews, people or machines onto another working week, unless it was
   * moved meanwhile (`was` is the week the page showed it on: 409 with where it is now), and answers
   * with its bookings from now on that the new week's hours leave outside working time.
   */
  async putResourceCalendar(
    actor: Actor,
    resourceId: string,
    input: PutResourceCalendar,
  ): Promise<ResourceCalendarSaved> {
    return this.knex.transaction(async (trx) => {
      const firm = await this.firm(actor, trx, true);
      // The write path's lock first, then the row (a booking under way holds the one and points at the other).
      await lockOwnTime(trx, resourceId);
      const r = (await trx('resources')
        .where({ id: resourceId, firm_id: actor.firmId, active: true })
        .forNoKeyUpdate()
        .first('id', 'name', 'calendar_id')) as { id: string; name: string; calendarId: string | null } | undefined;
      if (!r || reachOf(actor) === 'crew') throw new NotFoundError('resource');
      const standardId = await this.standardId(actor, trx);
      const calendars = (await trx('calendars')
        .where('firm_id', actor.firmId)
        .whereIn('id', [input.calendarId, r.calendarId ?? standardId])
        .select('id', 'name', 'version', 'weekly_hours')) as CalendarRow[];
      const byId = new Map(calendars.map((c) => [String(c.id), c]));
      const from = byId.get(String(r.calendarId ?? standardId));
      const to = byId.get(input.calendarId);
      if (!to) {
        throw new BadRequestError("That is not one of your firm's working weeks.", [
          { field: 'calendarId', message: "is not one of your firm's working weeks" },
        ]);
      }
      if (!from) throw new NotFoundError('working calendar');
      if (String(from.id) !== input.was) {
        throw new ConflictError(`Someone else moved ${r.name} onto ${from.name} since you loaded the page.`, {
          code: 'stale-version',
          current: String(from.id),
        });
      }
      if (String(from.id) !== String(to.id)) {
        // The standard week is kept as "none" (see resourcesOf), so a resource follows the firm's standard.
        await trx('resources')
          .where('id', r.id)
          .update({ calendar_id: String(to.id) === standardId ? null : to.id });
        await recordChange(
          trx,
          actor,
          'resource',
          String(r.id),
          'update',
          { calendar: from.name },
          { calendar: to.name },
        );
        await notifyResourceChange(trx, String(r.id));
      }
      const affected = await this.leftOutside(
        trx,
        actor,
        [String(r.id)],
        firm.timeZone,
        from.weeklyHours,
        to.weeklyHours,
      );
      return {
        from: await this.view(trx, actor, from, String(from.id) === standardId),
        to: await this.view(trx, actor, to, String(to.id) === standardId),
        affected,
      };
    });
  }

  /** One of the firm's own weeks, held for the rest of the transaction (404 for any other). */
  private async ownCalendar(trx: Knex.Transaction, actor: Actor, calendarId: string): Promise<CalendarRow> {
    const c = (await trx('calendars')
      .where({ id: calendarId, firm_id: actor.firmId })
      .forUpdate()
      .first('id', 'name', 'version', 'weekly_hours')) as CalendarRow | undefined;
    if (!c) throw new NotFoundError('working calendar');
    return c;
  }

  /** The firm's standard week: its first calendar (what resources with none work to). */
  private async standardId(actor: Actor, trx: Knex | Knex.Transaction): Promise<string> {
    const first = (await trx('calendars').where('firm_id', actor.firmId).min('id as id').first()) as
      { id: string | null } | undefined;
    if (!first || first.id === null) throw new NotFoundError('working calendar');
    return String(first.id);
  }

  /**
   * The firm's zone and bank holidays; `lock` holds its row for the rest of the transaction. Every
   * change to a firm's weeks and closed days takes it first, so they run one at a time per firm and
   * always lock in the same order (a move onto a week and taking that week away at once deadlocked
   * before). FOR NO KEY UPDATE, not FOR UPDATE: other writes that only point at the firm (an audit
   * row, a booking) are not held up.
   */
  private async firm(actor: Actor, trx: Knex | Knex.Transaction, lock = false) {
    const q = trx('firms').where('id', actor.firmId);
    if (lock) q.forNoKeyUpdate();
    const firm = (await q.first('time_zone', 'holiday_region')) as
      { timeZone: string; holidayRegion: string | null } | undefined;
    if (!firm) throw new NotFoundError('firm');
    return firm;
  }

  /** The firm's active resources that work to the calendar (those with none work to the firm's first). */
  private resourcesOf(trx: Knex | Knex.Transaction, actor: Actor, calendarId: string, isDefault: boolean) {
    return trx('resources')
      .where({ firm_id: actor.firmId, active: true })
      .where((q) => {
        q.where('calendar_id', calendarId);
        if (isDefault) q.orWhereNull('calendar_id');
      });
  }

  private async view(
    trx: Knex | Knex.Transaction,
    actor: Actor,
    c: CalendarRow,
    isDefault: boolean,
  ): Promise<CalendarHoursView> {
    const usedBy = (
      (await this.resourcesOf(trx, actor, String(c.id), isDefault).orderBy('name').select('id', 'name')) as {
        id: string;
        name: string;
      }[]
    ).map((r) => ({ id: String(r.id), name: r.name }));
    return {
      id: String(c.id),
      name: c.name,
      version: c.version,
      hours: weekHoursOf(c.weeklyHours),
      standard: isDefault,
      usedBy,
    };
  }

  /**
   * The bookings from now on of `resources` (a subquery of ids) that `after`'s hours leave outside
   * working time and `before`'s did not: what a change of hours, or a move onto another week, flags.
   */
  private async leftOutside(
    trx: Knex.Transaction,
    actor: Actor,
    resources: string[] | Knex.QueryBuilder,
    timeZone: string,
    before: StoredWeeklyHours,
    after: StoredWeeklyHours,
  ): Promise<AffectedBooking[]> {
    const [was, is] = [this.calendar(timeZone, before), this.calendar(timeZone, after)];
    const outside = (cal: WorkingCalendar, b: AffectedBooking) =>
      !isWorkingInstant(cal, Date.parse(b.startsAt)) || !isWorkingEnd(cal, Date.parse(b.endsAt));
    return (await bookingsWithin(trx, actor, resources, new Date(this.now()))).filter(
      (b) => outside(is, b) && !outside(was, b),
    );
  }

  /** Weekly hours alone (no holidays or closures): what a change of hours changes. */
  private calendar(timeZone: string, stored: StoredWeeklyHours): WorkingCalendar {
    return { id: 'week', timeZone, weekly: engineWeekly(stored) };
  }
}
