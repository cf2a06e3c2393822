import type { Knex } from 'knex';
import { cautionsFor } from '../../shared/cautions.ts';
import type { DaySheet, DaySheetList, DaySheetVisit } from '../../shared/schemas/day-sheets.ts';
import { Booking, Firm } from '../models/index.ts';
import type { Actor } from './actor.ts';
import { scoped } from './scope.ts';

/** Offset of `timeZone` from UTC at an instant, in minutes. */
function offsetMinutes(timeZone: string, at: number): number {
  const name = new Intl.DateTimeFormat('en-GB', { timeZone, timeZoneName: 'longOffset' }).formatToParts(new Date(at))
    .find((p) => p.type === 'timeZoneName')?.value ?? 'GMT';
  const m = /GMT([+-])(\d{2}):?(\d{2})?/.exec(name);
  return m ? (m[1] === '-' ? -1 : 1) * (Number(m[2]) * 60 + Number(m[3] ?? 0)) : 0;
}

/** The instant a calendar day starts in a time zone (midnight local), correct across clock changes. */
export function startOfZonedDay(date: string, timeZone: string): Date {
  const [y, mo, d] = date.split('-').map(Number) as [number, number, number];
  const utcMidnight = Date.UTC(y, mo - 1, d);
  let guess = utcMidnight - offsetMinutes(timeZone, utcMidnight) * 60_000;
  guess = utcMidnight - offsetMinutes(timeZone, guess) * 60_000;
  return new Date(guess);
}

const nextDate = (date: string) => new Date(Date.parse(`${date}T00:00:00Z`) + 86_400_000).toISOString().slice(0, 10);

type Row = Booking & {
  resourceName: string; resourceKind: string; resourceCategory: string; resourcePhone: string | null; resourceFirmName: string;
  stageKind: string; stageName: string; jobId: string; jobReference: string; installationType: string;
  siteAddress: string; siteTown: string; sitePostcode: string; accessNotes: string | null;
  customerName: string; customerPhone: string | null; officeName: string; officePhone: string | null; unitName: string | null;
};

/** One printable sheet per crew (or person) per day: where they go, when, whom to call, what to watch for. */
export class DaySheetsService {
  constructor(private readonly knex: Knex) {}

  async forDate(actor: Actor, date: string): Promise<DaySheetList> {
    const firm = await Firm.query(this.knex).findById(actor.firmId);
    const timeZone = firm?.timeZone ?? 'Europe/London';
    const from = startOfZonedDay(date, timeZone);
    const to = startOfZonedDay(nextDate(date), timeZone);
    const rows = await scoped(Booking, actor)
      .join('resources as r', 'r.id', 'bookings.resource_id')
      .join('firms as rf', 'rf.id', 'r.firm_id')
      .join('stages as s', 's.id', 'bookings.stage_id')
      .join('jobs as j', 'j.id', 's.job_id')
      .join('firms as jf', 'jf.id', 'j.firm_id')
      .leftJoin('units as u', 'u.id', 'j.unit_id')
      .where('bookings.starts_at', '<', to).where('bookings.ends_at', '>', from)
      .whereNot('bookings.state', 'declined')
      .select('bookings.*', 'r.name as resourceName', 'r.kind as resourceKind', 'r.category as resourceCategory', 'r.phone as resourcePhone',
        'rf.name as resourceFirmName', 's.kind as stageKind', 's.name as stageName', 'j.id as jobId', 'j.reference as jobReference',
        'j.installation_type', 'j.site_address', 'j.site_town', 'j.site_postcode', 'j.access_notes', 'j.customer_name', 'j.customer_phone',
        'jf.name as officeName', 'jf.phone as officePhone', 'u.model as unitName')
      .orderBy('bookings.starts_at') as Row[];

    // Who else is on each stage that day: the crane, the plant, the partner firms.
    const stageIds = [...new Set(rows.map((r) => r.stageId))];
    const others = stageIds.length ? await this.knex('bookings as b').join('resources as r', 'r.id', 'b.resource_id')
      .join('firms as f', 'f.id', 'r.firm_id').whereIn('b.stage_id', stageIds).whereNot('b.state', 'declined')
      .select('b.stage_id', 'b.resource_id', 'r.name', 'r.kind', 'f.name as firmName') as { stageId: string; resourceId: string; name: string; kind: string; firmName: string }[] : [];

    const sheets = new Map<string, DaySheet>();
    for (const r of rows) {
      if (r.resourceCategory === 'machine') continue;
      const sheet = sheets.get(r.resourceId) ?? { resource: { id: r.resourceId, name: r.resourceName, kind: r.resourceKind, category: r.resourceCategory, firmName: r.resourceFirmName }, date, visits: [] };
      const visit: DaySheetVisit = {
        bookingId: r.id, startsAt: r.startsAt.toISOString(), endsAt: r.endsAt.toISOString(), state: r.state,
        stage: { id: r.stageId, kind: r.stageKind, name: r.stageName },
        job: { id: r.jobId, reference: r.jobReference, unitName: r.unitName, installationType: r.installationType },
        site: { address: r.siteAddress, town: r.siteTown, postcode: r.sitePostcode, accessNotes: r.accessNotes },
        contacts: [
          { name: r.customerName, phone: r.customerPhone, role: 'Customer' },
          { name: r.officeName, phone: r.officePhone, role: 'Installer office' },
        ],
        alongside: others.filter((o) => o.stageId === r.stageId && o.resourceId !== r.resourceId).map((o) => ({ name: o.name, kind: o.kind, firmName: o.firmName })),
        cautions: cautionsFor(r.stageKind),
      };
      sheet.visits.push(visit);
      sheets.set(r.resourceId, sheet);
    }
    return { date, timeZone, sheets: [...sheets.values()].sort((a, b) => a.resource.name.localeCompare(b.resource.name)) };
  }
}
