import {
  DAY_MS,
  formatInstant,
  resourceCalendarOf,
  workingMinutesBetween,
  type Booking,
  type CompiledCalendar,
  type Interval,
} from '../scheduler/index.ts';
import { ELSEWHERE_JOB_ID } from '../board-data.ts';
import { boardLink, dateIn, jobOfStage, namedMessage, type ReportContext } from './context.ts';
import type {
  RiskItem,
  RiskReason,
  RiskRow,
  RiskStatus,
  UtilisationGroup,
  UtilisationReport,
  UtilisationRow,
} from './types.ts';
import { weeksOf } from './weeks.ts';
import { deadlineDate } from '../local-dates.ts';

/**
 * Merges bookings into disjoint intervals clipped to [from, to): two bookings of one resource at
 * the same time (a clash) count their shared time once.
 *
 * @example
 * unionWithin([{ start: 0, end: 10 }, { start: 5, end: 20 }], 0, 15) // [{ start: 0, end: 15 }]
 */
export function unionWithin(spans: readonly Interval[], from: number, to: number): Interval[] {
  const clipped = spans
    .map((s) => ({ start: Math.max(s.start, from), end: Math.min(s.end, to) }))
    .filter((s) => s.end > s.start)
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
export function bookedWorkingMinutes(
  cal: CompiledCalendar,
  bookings: readonly Interval[],
  from: number,
  to: number,
): number {
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

const ratio = (booked: number, available: number) =>
  available > 0 ? Math.round((booked / available) * 10_000) / 10_000 : 0;

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
    const own: Booking[] = [],
      elsewhere: Booking[] = [];
    for (const b of list) (b.installerFirmId === ELSEWHERE_JOB_ID ? elsewhere : own).push(b);
    const { from, to } = ctx.range;
    const available = workingMinutesBetween(cal, from, to);
    const booked = bookedWorkingMinutes(cal, own, from, to);
    rows.push({
      resourceId: r.id,
      resourceName: r.name,
      firmName: r.firmName,
      group,
      kind: r.kind,
      availableMinutes: available,
      bookedMinutes: booked,
      elsewhereMinutes: bookedWorkingMinutes(cal, elsewhere, from, to),
      ratio: ratio(booked, available),
      weeks: weeks.map((w) => {
        const a = workingMinutesBetween(cal, w.start, w.end),
          b = bookedWorkingMinutes(cal, own, w.start, w.end);
        return { week: w.week, availableMinutes: a, bookedMinutes: b, ratio: ratio(b, a) };
      }),
      link: boardLink(dateIn(ctx, Math.max(from, Math.min(ctx.range.now, to - 1))), { resourceName: r.name }),
    });
  }
  const order: Record<UtilisationGroup, number> = { crew: 0, machine: 1, partner: 2 };
  rows.sort((a, b) => order[a.group] - order[b.group] || a.resourceName.localeCompare(b.resourceName));
  return { weeks: weeks.map((w) => w.week), rows };
}

/** The engine's checks that make a job's booked plan unworkable, as the risk they are. */
const PLAN_PROBLEMS: Record<string, RiskReason> = {
  lead_time: 'lead_time',
  capacity: 'short_resourced',
  order: 'order',
  lag: 'order',
  cure: 'order',
  cycle: 'order',
};
/** Reasons that mean the job can't go ahead as booked, whatever its dates. */
const BLOCKING_REASONS: ReadonlySet<RiskReason> = new Set(['lead_time', 'short_resourced', 'order']);

/**
 * A job at risk in one word, never "on time": late on its critical path, can't go ahead as booked
 * (a stage short of resources, stages out of order, a notice period broken), or waiting on a partner.
 *
 * @example
 * riskStatus(0, [{ reason: 'short_resourced', label: '…' }]) // { status: 'blocked', statusLabel: "Can't go ahead as booked" }
 */
export function riskStatus(
  lateByMs: number,
  reasons: readonly RiskItem[],
): { status: RiskStatus; statusLabel: string } {
  if (lateByMs > 0) return { status: 'late', statusLabel: `${Math.ceil(lateByMs / DAY_MS)} d late` };
  if (reasons.some((r) => BLOCKING_REASONS.has(r.reason)))
    return { status: 'blocked', statusLabel: "Can't go ahead as booked" };
  return {
    status: 'waiting',
    statusLabel: reasons.some((r) => r.reason === 'overdue') ? 'Answer overdue' : 'Waiting for an answer',
  };
}

/**
 * Jobs at risk: finishing after the promised date on the engine's critical path (negative
 * float), waiting on a partner's answer (bookings still 'sent'; `overdue` when the reminder scan
 * flagged them), booked inside a lead time, a booked stage short of a resource it needs
 * (capacity), or stages booked out of order (order, lag, cure, cycle). Latest first.
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
    // The deadline is the instant the promised day ends; its last millisecond still shows that day.
    add(job.id, {
      reason: 'late',
      label: `Finishes ${days} day${days === 1 ? '' : 's'} after the promised date (${formatInstant(cp.promisedBy - 1, tz).slice(0, -6)})`,
    });
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
    add(w.jobId, {
      reason: w.overdue ? 'overdue' : 'waiting',
      label: `${w.overdue ? 'Answer overdue' : 'Waiting for an answer'} from ${w.firm}: ${w.what.join(', ')}`,
    });
  }
  for (const v of ctx.violations) {
    const reason = PLAN_PROBLEMS[v.kind];
    if (reason === undefined || v.severity !== 'error') continue;
    const own = v.bookingIds
      .map((id) => ctx.bookings.get(id))
      .filter((b): b is NonNullable<typeof b> => b !== undefined && !b.elsewhere);
    const job = v.stageIds.map((id) => jobOfStage(ctx, id)).find((j) => j !== undefined);
    // A problem counts in the span when one of its bookings does (a cycle names stages only).
    if (!job || (own.length > 0 ? !own.some(inRange) : v.bookingIds.length > 0)) continue;
    const label = namedMessage(ctx, v);
    if (!(byJob.get(job.id) ?? []).some((x) => x.label === label)) add(job.id, { reason, label });
  }
  const rows: RiskRow[] = [...byJob.entries()].map(([jobId, reasons]) => {
    const job = ctx.jobs.get(jobId)!;
    const cp = cps.get(jobId);
    const firstBooking = ctx.data.bookings
      .filter((b) => !b.elsewhere && jobOfStage(ctx, b.stageId)?.id === jobId && b.end > ctx.range.now)
      .reduce<number | null>((m, b) => (m === null || b.start < m ? b.start : m), null);
    return {
      jobId,
      reference: job.reference,
      customerName: job.customerName,
      siteTown: job.siteTown,
      promisedBy: job.promisedBy ?? null,
      // The deadline is the instant the promised day ends (shared/local-dates.ts): its date is the day before it.
      promisedDate: job.promisedBy == null ? null : deadlineDate(job.promisedBy, ctx.range.timeZone),
      lateByMs: cp?.lateByMs ?? 0,
      floatMinutes: cp?.floatMinutes ?? 0,
      reasons,
      ...riskStatus(cp?.lateByMs ?? 0, reasons),
      link: boardLink(dateIn(ctx, firstBooking ?? ctx.range.now), { jobId }),
    };
  });
  const rank: Record<RiskStatus, number> = { late: 0, blocked: 1, waiting: 2 };
  rows.sort(
    (a, b) =>
      b.lateByMs - a.lateByMs ||
      rank[a.status] - rank[b.status] ||
      b.reasons.length - a.reasons.length ||
      (a.promisedBy ?? Infinity) - (b.promisedBy ?? Infinity) ||
      a.reference.localeCompare(b.reference),
  );
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
