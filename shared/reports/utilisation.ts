import { DAY_MS, formatInstant, resourceCalendarOf, workingMinutesBetween, type Booking, type CompiledCalendar, type Interval } from '../scheduler/index.ts';
import { ELSEWHERE_JOB_ID } from '../board-data.ts';
import { boardLink, dateIn, jobOfStage, namedMessage, type ReportContext } from './context.ts';
import type { RiskItem, RiskRow, UtilisationGroup, UtilisationReport, UtilisationRow } from './types.ts';
import { weeksOf } from './weeks.ts';

/**
 * Merges bookings into disjoint intervals clipped to [from, to): two bookings of one resource at
 * the same time (a clash) count their shared time once.
 *
 * @example
 * unionWithin([{ start: 0, end: 10 }, { start: 5, end: 20 }], 0, 15) // [{ start: 0, end: 15 }]
 */
export function unionWithin(spans: readonly Interval[], from: number, to: number): Interval[] {
  const clipped = spans.map((s) => ({ start: Math.max(s.start, from), end: Math.min(s.end, to) })).filter((s) => s.end > s.start)
    .sort((a, b) => a.start - b.start);
  const out: Interval[] = [];
  for (const s of clipped) {
    const last = out[out.length - 1];
    if (last && s.start <= last.end) last.end = Math.max(last.end, s.end);
    else out.push({ ...s });
  }
  return out;
}

/**
 * Working minutes of a resource's calendar covered by bookings within [from, to).
 *
 * @example
 * bookedWorkingMinutes(crewCal, [tue0800to1700, wed0800to1700], mon0000, sat0000) // 1080 (2 × 9 h)
 */
export function bookedWorkingMinutes(cal: CompiledCalendar, bookings: readonly Interval[], from: number, to: number): number {
  let n = 0;
  for (const s of unionWithin(bookings, from, to)) n += workingMinutesBetween(cal, s.start, s.end);
  return n;
}

function groupOf(r: { category: string; ownership: string }): UtilisationGroup | null {
  if (r.ownership === 'partner') return 'partner';
  if (r.category === 'crew') return 'crew';
  if (r.category === 'machine') return 'machine';
  return null; // the firm's own people are counted through their crews
}

const ratio = (booked: number, available: number) => (available > 0 ? Math.round((booked / available) * 10_000) / 10_000 : 0);

/**
 * Booked against available working time per crew, machine and partner resource over the range
 * and per week. Available = working minutes of the resource's calendar in the range (hours,
 * public holidays, closures, absences); booked = working minutes covered by the reader's own
 * non-declined bookings. A partner's time taken by other installers is shown apart, unnamed.
 *
 * @example
 * utilisationRows(ctx).find((r) => r.resourceName === 'Crew Heron') // { availableMinutes: 2700, bookedMinutes: 1080, ratio: 0.4, … }
 */
export function utilisationRows(ctx: ReportContext): { weeks: string[]; rows: UtilisationRow[] } {
  const weeks = weeksOf(ctx.range, ctx.range.timeZone);
  const rows: UtilisationRow[] = [];
  for (const r of ctx.data.resources) {
    const group = groupOf(r);
    if (group === null) continue;
    const cal = resourceCalendarOf(ctx.index, r.id);
    const list = ctx.index.bookingsByResource.get(r.id)?.list ?? [];
    const own: Booking[] = [], elsewhere: Booking[] = [];
    for (const b of list) (b.installerFirmId === ELSEWHERE_JOB_ID ? elsewhere : own).push(b);
    const { from, to } = ctx.range;
    const available = workingMinutesBetween(cal, from, to);
    const booked = bookedWorkingMinutes(cal, own, from, to);
    rows.push({
      resourceId: r.id, resourceName: r.name, firmName: r.firmName, group, kind: r.kind,
      availableMinutes: available, bookedMinutes: booked, elsewhereMinutes: bookedWorkingMinutes(cal, elsewhere, from, to), ratio: ratio(booked, available),
      weeks: weeks.map((w) => {
        const a = workingMinutesBetween(cal, w.start, w.end), b = bookedWorkingMinutes(cal, own, w.start, w.end);
        return { week: w.week, availableMinutes: a, bookedMinutes: b, ratio: ratio(b, a) };
      }),
      link: boardLink(dateIn(ctx, Math.max(from, Math.min(ctx.range.now, to - 1))), { resourceName: r.name }),
    });
  }
  const order: Record<UtilisationGroup, number> = { crew: 0, machine: 1, partner: 2 };
  rows.sort((a, b) => order[a.group] - order[b.group] || a.resourceName.localeCompare(b.resourceName));
  return { weeks: weeks.map((w) => w.week), rows };
}

/**
 * Jobs at risk: finishing after the promised date on the engine's critical path (negative
 * float), waiting on a partner's answer (bookings still 'sent'; `overdue` when the reminder scan
 * flagged them), or booked inside a lead time. Latest first.
 *
 * @example
 * riskRows(ctx, new Set(['31']))[0].reasons // [{ reason: 'late', label: 'Finishes 3 days after the promised date (Fri 19 Jun)' }, …]
 */
export function riskRows(ctx: ReportContext, overdueBookingIds: ReadonlySet<string>): RiskRow[] {
  const byJob = new Map<string, RiskItem[]>();
  const add = (jobId: string, item: RiskItem) => byJob.set(jobId, [...(byJob.get(jobId) ?? []), item]);
  const cps = new Map(ctx.criticalPaths.map((c) => [c.jobId, c]));
  const tz = ctx.range.timeZone;
  for (const cp of ctx.criticalPaths) {
    const job = ctx.jobs.get(cp.jobId);
    if (!job || job.id === ELSEWHERE_JOB_ID || cp.lateByMs <= 0 || cp.promisedBy === null) continue;
    const days = Math.ceil(cp.lateByMs / DAY_MS);
    add(job.id, { reason: 'late', label: `Finishes ${days} day${days === 1 ? '' : 's'} after the promised date (${formatInstant(cp.promisedBy, tz).slice(0, -6)})` });
  }
  const inRange = (b: { start: number; end: number }) => b.end > ctx.range.from && b.start < ctx.range.to;
  // One line per job and partner firm: the stages still waiting for that firm's answer.
  const waiting = new Map<string, { jobId: string; firm: string; overdue: boolean; what: string[] }>();
  for (const b of ctx.data.bookings) {
    if (b.elsewhere || b.state !== 'sent' || !inRange(b)) continue;
    const job = jobOfStage(ctx, b.stageId);
    const r = ctx.resources.get(b.resourceId);
    if (!job || r?.ownership !== 'partner') continue;
    const key = `${job.id}|${r.firmName}`;
    const w = waiting.get(key) ?? { jobId: job.id, firm: r.firmName, overdue: false, what: [] };
    w.overdue ||= overdueBookingIds.has(b.id);
    w.what.push(`'${ctx.index.stages.get(b.stageId)?.stage.name ?? ''}' ${formatInstant(b.start, tz).slice(0, -6)}`);
    waiting.set(key, w);
  }
  for (const w of waiting.values()) {
    add(w.jobId, { reason: w.overdue ? 'overdue' : 'waiting', label: `${w.overdue ? 'Answer overdue' : 'Waiting for an answer'} from ${w.firm}: ${w.what.join(', ')}` });
  }
  for (const v of ctx.violations) {
    if (v.kind !== 'lead_time') continue;
    const b = ctx.bookings.get(v.bookingIds[0] ?? '');
    const job = v.stageIds[0] ? jobOfStage(ctx, v.stageIds[0]) : undefined;
    if (!b || !job || !inRange(b)) continue;
    add(job.id, { reason: 'lead_time', label: namedMessage(ctx, v) });
  }
  const rows: RiskRow[] = [...byJob.entries()].map(([jobId, reasons]) => {
    const job = ctx.jobs.get(jobId)!;
    const cp = cps.get(jobId);
    const firstBooking = ctx.data.bookings.filter((b) => !b.elsewhere && jobOfStage(ctx, b.stageId)?.id === jobId && b.end > ctx.range.now)
      .reduce<number | null>((m, b) => (m === null || b.start < m ? b.start : m), null);
    return {
      jobId, reference: job.reference, customerName: job.customerName, siteTown: job.siteTown, promisedBy: job.promisedBy ?? null,
      lateByMs: cp?.lateByMs ?? 0, floatMinutes: cp?.floatMinutes ?? 0, reasons,
      link: boardLink(dateIn(ctx, firstBooking ?? ctx.range.now), { jobId }),
    };
  });
  rows.sort((a, b) => b.lateByMs - a.lateByMs || b.reasons.length - a.reasons.length || (a.promisedBy ?? Infinity) - (b.promisedBy ?? Infinity) || a.reference.localeCompare(b.reference));
  return rows;
}

/**
 * Utilisation per resource and week, and the jobs at risk.
 *
 * @example
 * utilisationReport(ctx, overdue).resources.length
 */
export function utilisationReport(ctx: ReportContext, overdueBookingIds: ReadonlySet<string>): UtilisationReport {
  const { weeks, rows } = utilisationRows(ctx);
  return { range: ctx.range, weeks, resources: rows, risks: riskRows(ctx, overdueBookingIds) };
}
