import type { Knex } from 'knex';
import { cautionsFor } from '../../shared/cautions.ts';
import type { DaySheet, DaySheetList } from '../../shared/schemas/day-sheets.ts';
import type { MyWorkHours, MyWorkItem, MyWorkList, MyWorkQuery } from '../../shared/schemas/my-work.ts';
import { weekWords, type StoredWeeklyHours } from '../../shared/working-week.ts';
import { progressActions } from '../../shared/progress-actions.ts';
import { addDays, endOfLocalDay, localDateOf, startOfLocalDay, todayIn } from '../../shared/local-dates.ts';
import { Booking, Firm } from '../models/index.ts';
import { ownResourceIds, workingWeekIdOf } from '../models/base.ts';
import type { Actor } from './actor.ts';
import { scoped } from './scope.ts';
import { AbsencesService } from './absences.ts';
import { bookingDuring } from './ranges.ts';
import {
  alongsideFor,
  contactsFor,
  unitArrivalFor,
  unitFacingFor,
  visitStatesFor,
  type AlongsideRow,
  type ArrivalRow,
} from './read-policy.ts';

type Row = Booking & {
  resourceName: string;
  resourceKind: string;
  resourceCategory: string;
  resourcePhone: string | null;
  resourceFirmName: string;
  stageKind: string;
  stageName: string;
  jobId: string;
  jobReference: string;
  installationType: string;
  siteAddress: string;
  siteTown: string;
  sitePostcode: string;
  accessNotes: string | null;
  customerName: string;
  customerPhone: string | null;
  officeName: string;
  officePhone: string | null;
  unitName: string | null;
  unitFacing: string | null;
  sharesCustomerContact: boolean | null;
  resourceFirmId: string;
  jobFirmId: string;
};

/** A visit with the booking's own facts a page needs beside the day sheet's. */
export type Visit = Omit<MyWorkItem, 'day' | 'actions'>;

const DAY_MS = 86_400_000;

/**
 * One printable sheet per crew (or person) per day: where they go, when, whom to call, what to
 * watch for. The office gets its firm's, crew their own, a partner firm its own people's sent,
 * confirmed and on-site slots; which contacts and neighbours each sees is read-policy.ts's call.
 */
export class DaySheetsService {
  constructor(
    private readonly knex: Knex,
    private readonly now: () => number = Date.now,
  ) {}

  /** The reader's visits overlapping [from, to), in time order (read-policy.ts decides the fields). */
  async visits(actor: Actor, from: Date, to: Date): Promise<Visit[]> {
    const rows = (await scoped(Booking, actor)
      .join('resources as r', 'r.id', 'bookings.resource_id')
      .join('firms as rf', 'rf.id', 'r.firm_id')
      .join('stages as s', 's.id', 'bookings.stage_id')
      .join('jobs as j', 'j.id', 's.job_id')
      .join('firms as jf', 'jf.id', 'j.firm_id')
      .leftJoin('units as u', 'u.id', 'j.unit_id')
      .leftJoin('surveys as sv', 'sv.job_id', 'j.id')
      .leftJoin('firm_settings as fs', 'fs.firm_id', 'j.firm_id')
      .where(bookingDuring(this.knex, 'bookings', from, to))
      .whereIn('bookings.state', visitStatesFor(actor))
      .select(
        'bookings.*',
        'r.name as resourceName',
        'r.kind as resourceKind',
        'r.category as resourceCategory',
        'r.phone as resourcePhone',
        'rf.name as resourceFirmName',
        's.kind as stageKind',
        's.name as stageName',
        'j.id as jobId',
        'j.reference as jobReference',
        'j.installation_type',
        'j.site_address',
        'j.site_town',
        'j.site_postcode',
        'j.access_notes',
        'j.customer_name',
        'j.customer_phone',
        'jf.name as officeName',
        'jf.phone as officePhone',
        'u.model as unitName',
        'sv.unit_facing',
        'fs.share_customer_contact_with_partners as sharesCustomerContact',
        'r.firm_id as resourceFirmId',
        'j.firm_id as jobFirmId',
      )
      .orderBy('bookings.starts_at')
      .orderBy('bookings.id')) as Row[];

    // Who else is on each stage: the crane, the plant, the partner firms (filtered per reader below).
    const stageIds = [...new Set(rows.map((r) => r.stageId))];
    const others = stageIds.length
      ? ((await this.knex('bookings as b')
          .join('resources as r', 'r.id', 'b.resource_id')
          .join('firms as f', 'f.id', 'r.firm_id')
          .whereIn('b.stage_id', stageIds)
          .whereNot('b.state', 'declined')
          .select(
            'b.stage_id',
            'b.resource_id',
            'b.state',
            'r.name',
            'r.kind',
            'r.category',
            'r.firm_id',
            'f.name as firmName',
          )) as (AlongsideRow & { stageId: string })[])
      : [];

    // When the unit arrives, for the stages the delivery comes before (filtered per reader below).
    const arrivals = stageIds.length
      ? ((await this.knex('dependencies as d')
          .join('stages as ds', 'ds.id', 'd.from_stage_id')
          .join('bookings as b', 'b.stage_id', 'ds.id')
          .join('resources as r', 'r.id', 'b.resource_id')
          .join('firms as f', 'f.id', 'r.firm_id')
          .whereIn('d.to_stage_id', stageIds)
          .where('ds.kind', 'delivery')
          .select('d.to_stage_id', 'b.starts_at', 'b.ends_at', 'b.state', 'f.name as firmName')) as (ArrivalRow & {
          toStageId: string;
        })[])
      : [];

    return rows.map((r) => ({
      bookingId: r.id,
      version: r.version,
      side: String(r.resourceFirmId) === String(r.jobFirmId) ? 'own' : 'partner',
      startsAt: r.startsAt.toISOString(),
      endsAt: r.endsAt.toISOString(),
      state: r.state,
      resource: {
        id: r.resourceId,
        name: r.resourceName,
        kind: r.resourceKind,
        category: r.resourceCategory,
        firmName: r.resourceFirmName,
      },
      stage: { id: r.stageId, kind: r.stageKind, name: r.stageName },
      job: {
        id: r.jobId,
        reference: r.jobReference,
        unitName: r.unitName,
        installationType: r.installationType,
        unitFacing: unitFacingFor(actor, r.stageKind, r.unitFacing ?? null),
      },
      site: { address: r.siteAddress, town: r.siteTown, postcode: r.sitePostcode, accessNotes: r.accessNotes },
      contacts: contactsFor(actor, {
        customerName: r.customerName,
        customerPhone: r.customerPhone,
        officeName: r.officeName,
        officePhone: r.officePhone,
        sharesCustomerContact: r.sharesCustomerContact === true,
      }),
      alongside: alongsideFor(
        actor,
        others
          .filter((o) => String(o.stageId) === String(r.stageId) && String(o.resourceId) !== String(r.resourceId))
          .map((o) => ({ ...o, resourceId: String(o.resourceId), firmId: String(o.firmId) })),
      ),
      cautions: cautionsFor(r.stageKind),
      unitArrives: unitArrivalFor(
        actor,
        arrivals.filter((a) => String(a.toStageId) === String(r.stageId)),
      ),
    }));
  }

  async forDate(actor: Actor, date: string): Promise<DaySheetList> {
    const firm = await Firm.query(this.knex).findById(actor.firmId);
    const timeZone = firm?.timeZone ?? 'Europe/London';
    const visits = await this.visits(
      actor,
      new Date(startOfLocalDay(date, timeZone)),
      new Date(endOfLocalDay(date, timeZone)),
    );
    const sheets = new Map<string, DaySheet>();
    for (const { resource, version: _version, side: _side, ...visit } of visits) {
      if (resource.category === 'machine') continue;
      const sheet = sheets.get(resource.id) ?? { resource, date, visits: [] };
      sheet.visits.push(visit);
      sheets.set(resource.id, sheet);
    }
    return {
      date,
      timeZone,
      sheets: [...sheets.values()].sort((a, b) => a.resource.name.localeCompare(b.resource.name)),
    };
  }

  /**
   * A crew member's own bookings, with what each visit needs (the My work page): by default from
   * the start of today in the firm's zone for `days` days, today's first. Each says which progress
   * may be marked now, by the same rules the server enforces.
   */
  async myWork(actor: Actor, query: MyWorkQuery): Promise<MyWorkList> {
    const firm = await Firm.query(this.knex).findById(actor.firmId);
    const timeZone = firm?.timeZone ?? 'Europe/London';
    const today = todayIn(timeZone, this.now());
    const from = query.from ? new Date(query.from) : new Date(startOfLocalDay(today, timeZone));
    // `days` local days, which are not all 24 hours long: a week over a clock change ends at local midnight.
    const to = query.to
      ? new Date(query.to)
      : query.from
        ? new Date(from.getTime() + query.days * DAY_MS)
        : new Date(startOfLocalDay(addDays(today, query.days), timeZone));
    const [visits, away, hours] = await Promise.all([
      this.visits(actor, from, to),
      new AbsencesService(this.knex).ownAwayDuring(actor, from, to, timeZone),
      this.ownHours(actor),
    ]);
    return {
      today,
      timeZone,
      away,
      hours,
      items: visits.map((v) => ({
        ...v,
        day: localDateOf(Date.parse(v.startsAt), timeZone),
        actions: progressActions(v, today, timeZone),
      })),
    };
  }

  /**
   * The weeks the reader's own rows work to (their person row and the crews they are in, on the
   * books): a row with no week of its own works to the firm's standard week, its first calendar.
   */
  private async ownHours(actor: Actor): Promise<MyWorkHours[]> {
    const rows = (await this.knex('resources as r')
      .whereIn('r.id', ownResourceIds(this.knex, actor))
      .where({ 'r.active': true, 'r.firm_id': actor.firmId })
      .join('calendars as c', 'c.id', workingWeekIdOf(this.knex, 'r'))
      .orderBy(['c.id', 'r.name'])
      .select('r.name', 'c.id as calendar_id', 'c.name as week', 'c.weekly_hours')) as {
      name: string;
      calendarId: string;
      week: string;
      weeklyHours: StoredWeeklyHours;
    }[];
    const byWeek = new Map<string, MyWorkHours>();
    for (const r of rows) {
      const line = byWeek.get(String(r.calendarId));
      if (line) line.resourceNames.push(r.name);
      else byWeek.set(String(r.calendarId), { resourceNames: [r.name], week: r.week, words: weekWords(r.weeklyHours) });
    }
    return [...byWeek.values()];
  }
}
