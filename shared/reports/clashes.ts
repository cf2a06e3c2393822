import { findSlots, formatInstant, formatPence, resourceCalendarOf, violationKey, type Booking, type Violation } from '../scheduler/index.ts';
import { boardLink, dateIn, isElsewhere, jobOfStage, namedMessage, resourceName, type ReportContext } from './context.ts';
import type { ClashKind, ClashReport, ClashRow, SuggestedFix } from './types.ts';
import { weekOf } from './weeks.ts';

const KIND_LABELS: Record<ClashKind, string> = {
  clash: 'Resource double-booked',
  hire: 'Machine used outside its hire',
  person_double: 'Person in two places',
  cross_firm: 'Partner booked by another installer',
};
const CLASH_KINDS = new Set<string>(Object.keys(KIND_LABELS));

/** Options for {@link clashReport}. */
export interface ClashReportOptions {
  /** Slot-finder alternatives per clash after the earliest (default 2: three fixes). */
  alternatives?: number;
  /** Fixes are worked out for this many clashes, soonest first (default 60); the rest list none. */
  fixesFor?: number;
}

/**
 * Working days a booking spends on a hired machine outside every hire period, and their cost at
 * the period's day rate: the slot finder prices a slot's extra hire the same way.
 *
 * @example
 * extraHire(ctx, bookingTwoDaysAfterOffHire) // { days: 2, pence: 29000 }
 */
export function extraHire(ctx: ReportContext, booking: Booking): { days: number; pence: number } {
  const r = ctx.index.resources.get(booking.resourceId);
  if (r?.hired !== true) return { days: 0, pence: 0 };
  const cal = resourceCalendarOf(ctx.index, r.id);
  const periods = ctx.index.hireByResource.get(r.id) ?? [];
  const rate = periods[0]?.dayRatePence ?? 0;
  let days = 0;
  for (let d = cal.dayOf(booking.start); d <= cal.dayOf(booking.end - 1); d++) {
    const ivs = cal.dayIntervals(d);
    if (ivs.length === 0) continue;
    const s = Math.max(ivs[0] as number, booking.start), e = Math.min(ivs[ivs.length - 1] as number, booking.end);
    if (e <= s) continue;
    if (!periods.some((p) => p.onHire <= s && e <= p.offHire)) days++;
  }
  return { days, pence: days * rate };
}

function fixLabel(name: string, start: number, tz: string, cost: { extraHireDays: number; extraHirePence: number; delaysJob: boolean }): string {
  const money = cost.extraHireDays > 0
    ? `${formatPence(cost.extraHirePence)} extra hire (${cost.extraHireDays} day${cost.extraHireDays === 1 ? '' : 's'})`
    : 'no extra cost';
  return `Move to ${name} on ${formatInstant(start, tz)} — ${money}${cost.delaysJob ? '; the job finishes later' : ''}`;
}

/**
 * The slot finder's places for a stage on resources of a kind, from now, each with its cost.
 *
 * @example
 * suggestedFixes(ctx, 'lift-1', 'crane', 2)[0].label // 'Move to 60 t mobile crane on Wed 10 Jun 08:00 — no extra cost'
 */
export function suggestedFixes(ctx: ReportContext, stageId: string, kind: string, alternatives = 2): SuggestedFix[] {
  const jobId = ctx.index.stages.get(stageId)?.stage.jobId ?? '';
  let slots;
  try {
    slots = findSlots(ctx.index, { stageId, resourceKind: kind, earliest: ctx.range.now }, { alternatives });
  } catch {
    return []; // unknown stage or kind: nothing to suggest
  }
  return slots.map((s) => {
    const name = resourceName(ctx, s.resourceId);
    const tz = resourceCalendarOf(ctx.index, s.resourceId).timeZone;
    const date = dateIn(ctx, s.start);
    return {
      resourceId: s.resourceId, resourceName: name, start: s.start, end: s.end, date,
      extraHireDays: s.cost.extraHireDays, extraHirePence: s.cost.extraHirePence, floatUsedMinutes: s.cost.floatUsedMinutes, delaysJob: s.cost.delaysJob,
      label: fixLabel(name, s.start, tz, s.cost), link: boardLink(date, { jobId }),
    };
  });
}

function rowOf(ctx: ReportContext, v: Violation): (ClashRow & { offending?: Booking }) | null {
  const ownStages = v.stageIds.filter((id) => !isElsewhere(ctx, { stageId: id }));
  if (ownStages.length === 0) return null;
  const ownBookings = v.bookingIds.map((id) => ctx.bookings.get(id)).filter((b): b is Booking => b !== undefined && !isElsewhere(ctx, { bookingId: b.id }));
  if (ownBookings.length === 0) return null;
  // The later-booked of a pair is the one to move (ties: the larger id, as the engine orders them).
  const offending = ownBookings.reduce((a, b) => (b.start > a.start || (b.start === a.start && b.id > a.id) ? b : a));
  const from = typeof v.details?.from === 'number' ? v.details.from : Math.min(...ownBookings.map((b) => b.start));
  const to = typeof v.details?.to === 'number' ? v.details.to : Math.max(...ownBookings.map((b) => b.end));
  const jobs = [...new Map(ownStages.map((id) => jobOfStage(ctx, id)).filter((j) => j !== undefined).map((j) => [j.id, j])).values()];
  const offendingJob = jobOfStage(ctx, offending.stageId);
  const date = dateIn(ctx, from);
  const kind = v.kind as ClashKind;
  const resourceIds = kind === 'person_double' ? v.resourceIds : [offending.resourceId];
  return {
    id: violationKey(v), kind, kindLabel: KIND_LABELS[kind], date, from, to,
    message: namedMessage(ctx, v),
    jobIds: jobs.map((j) => j.id), jobReferences: jobs.map((j) => j.reference),
    stageId: offending.stageId, stageName: ctx.index.stages.get(offending.stageId)?.stage.name ?? '',
    resourceNames: resourceIds.map((id) => resourceName(ctx, id)),
    costPence: kind === 'hire' ? extraHire(ctx, offending).pence : 0,
    link: boardLink(date, offendingJob ? { jobId: offendingJob.id } : { resourceName: resourceName(ctx, offending.resourceId) }),
    fixes: [], offending,
  };
}

/**
 * Every clash the engine finds in the range — a resource double-booked, a machine outside its
 * hire, a person in two places, a partner's resource booked by another installer — soonest
 * first and, on the same day, the costliest first; each with a board link and the slot finder's
 * fixes for the later-booked stage. Another installer's side of a shared resource is never listed.
 *
 * @example
 * clashReport(ctx).rows[0] // { kind: 'clash', date: '2026-06-09', link: '/board?view=day&date=2026-06-09&job=14', fixes: [...] }
 */
export function clashReport(ctx: ReportContext, options: ClashReportOptions = {}): ClashReport {
  const rows: (ClashRow & { offending?: Booking })[] = [];
  for (const v of ctx.violations) {
    if (!CLASH_KINDS.has(v.kind)) continue;
    const row = rowOf(ctx, v);
    if (row && row.to > ctx.range.from && row.from < ctx.range.to) rows.push(row);
  }
  rows.sort((a, b) => (a.date < b.date ? -1 : a.date > b.date ? 1 : 0) || b.costPence - a.costPence || a.from - b.from || (a.id < b.id ? -1 : 1));
  const fixesFor = options.fixesFor ?? 60;
  const out: ClashRow[] = rows.map((row, i) => {
    const { offending, ...rest } = row;
    const kind = offending ? ctx.index.resources.get(offending.resourceId)?.kind : undefined;
    const fixes = i < fixesFor && offending && kind ? suggestedFixes(ctx, offending.stageId, kind, options.alternatives ?? 2) : [];
    return { ...rest, fixes };
  });
  const perWeek = new Map<string, number>();
  for (const r of out) perWeek.set(weekOf(r.from, ctx.range.timeZone), (perWeek.get(weekOf(r.from, ctx.range.timeZone)) ?? 0) + 1);
  return { range: ctx.range, rows: out, perWeek: [...perWeek.entries()].sort().map(([week, count]) => ({ week, count })) };
}
