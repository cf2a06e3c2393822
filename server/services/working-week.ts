import type { Knex } from 'knex';
import { isWorkingEnd, isWorkingInstant, type WorkingCalendar } from '../../shared/scheduler/index.ts';
import type { AffectedBooking } from '../../shared/schemas/absences.ts';
import type {
  CalendarHoursSaved,
  CalendarHoursView,
  HolidayRegionSaved,
  PutCalendarHours,
  PutHolidayRegion,
  WorkingWeekView,
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
import { ConflictError, NotFoundError } from '../errors.ts';
import type { Actor } from './actor.ts';
import { recordChange } from './audit.ts';
import { notifyFirmChange } from './board-stream.ts';
import { bookingsWithin } from './absences.ts';
import { holidayRegionOf } from './board.ts';
import { holidaysFor } from './holiday-days.ts';

interface CalendarRow {
  id: string;
  name: string;
  version: number;
  weeklyHours: StoredWeeklyHours;
}

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
      const firm = await this.firm(actor, trx);
      const was = (await trx('calendars')
        .where({ id: calendarId, firm_id: actor.firmId })
        .forUpdate()
        .first('id', 'name', 'version', 'weekly_hours')) as CalendarRow | undefined;
      if (!was) throw new NotFoundError('working calendar');
      const isDefault =
        String((await trx('calendars').where('firm_id', actor.firmId).min('id as id').first())!.id) === String(was.id);
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
      const before = this.calendar(firm.timeZone, was.weeklyHours);
      const after = this.calendar(firm.timeZone, stored);
      const outside = (cal: WorkingCalendar, b: AffectedBooking) =>
        !isWorkingInstant(cal, Date.parse(b.startsAt)) || !isWorkingEnd(cal, Date.parse(b.endsAt));
      const affected = (await bookingsWithin(trx, actor, usedBy.select('id'), new Date(this.now()))).filter(
        (b) => outside(after, b) && !outside(before, b),
      );
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

  private async firm(actor: Actor, trx: Knex | Knex.Transaction, lock = false) {
    const q = trx('firms').where('id', actor.firmId);
    if (lock) q.forUpdate();
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
    const usedBy = (await this.resourcesOf(trx, actor, String(c.id), isDefault)
      .orderBy('name')
      .pluck('name')) as string[];
    return { id: String(c.id), name: c.name, version: c.version, hours: weekHoursOf(c.weeklyHours), usedBy };
  }

  /** Weekly hours alone (no holidays or closures): what a change of hours changes. */
  private calendar(timeZone: string, stored: StoredWeeklyHours): WorkingCalendar {
    return { id: 'week', timeZone, weekly: engineWeekly(stored) };
  }
}
