import { resourceCalendarOf, violationKey, type Booking, type HirePeriod, type Violation } from '../scheduler/index.ts';
import {
  boardLink,
  dateIn,
  isElsewhere,
  jobOfStage,
  namedMessage,
  resourceName,
  type ReportContext,
} from './context.ts';
import { suggestedFixes } from './fixes.ts';
import type { ClashKind, ClashReport, ClashRow } from './types.ts';
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
  /** The writer's slack past a stage's working time (BOOKING_EXTRA_WORKING_MINUTES), so no fix is one it would refuse. */
  extraWorkingMinutes?: number;
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
    const s = Math.max(ivs[0] as number, booking.start),
      e = Math.min(ivs[ivs.length - 1] as number, booking.end);
    if (e <= s) continue;
    if (!periods.some((p) => p.onHire <= s && e <= p.offHire)) days++;
  }
  return { days, pence: days * rate };
}

/** The hire period of a booking's machine nearest to the booking in time, if it has any. */
function nearestHire(ctx: ReportContext, booking: Booking): HirePeriod | undefined {
  const gap = (p: { onHire: number; offHire: number }) =>
    Math.max(0, p.onHire - booking.end, booking.start - p.offHire);
  return [...(ctx.index.hireByResource.get(booking.resourceId) ?? [])].sort((a, b) => gap(a) - gap(b))[0];
}

/**
 * The days the nearest hire of a booking's machine would run to take the booking in: an earlier
 * first day, a later last day, or both. The last day is the one whose 23:59 (a hire's off-hire, as
 * the form records it) is at or after the booking's end.
 */
function coverOf(ctx: ReportContext, booking: Booking): ClashRow['cover'] {
  const hire = nearestHire(ctx, booking);
  if (!hire) return undefined;
  return {
    hireId: hire.id,
    ...(booking.start < hire.onHire ? { onHireDate: dateIn(ctx, booking.start) } : {}),
    ...(booking.end > hire.offHire ? { offHireDate: dateIn(ctx, booking.end + 59_999) } : {}),
  };
}

function rowOf(ctx: ReportContext, v: Violation): (ClashRow & { offending?: Booking }) | null {
  const ownStages = v.stageIds.filter((id) => !isElsewhere(ctx, { stageId: id }));
  if (ownStages.length === 0) return null;
  const ownBookings = v.bookingIds
    .map((id) => ctx.bookings.get(id))
    .filter((b): b is Booking => b !== undefined && !isElsewhere(ctx, { bookingId: b.id }));
  if (ownBookings.length === 0) return null;
  // The later-booked of a pair is the one to move (ties: the larger id, as the engine orders them).
  const offending = ownBookings.reduce((a, b) => (b.start > a.start || (b.start === a.start && b.id > a.id) ? b : a));
  const from = typeof v.details?.from === 'number' ? v.details.from : Math.min(...ownBookings.map((b) => b.start));
  const to = typeof v.details?.to === 'number' ? v.details.to : Math.max(...ownBookings.map((b) => b.end));
  const jobs = [
    ...new Map(
      ownStages
        .map((id) => jobOfStage(ctx, id))
        .filter((j) => j !== undefined)
        .map((j) => [j.id, j]),
    ).values(),
  ];
  const date = dateIn(ctx, from);
  const kind = v.kind as ClashKind;
  const cover = kind === 'hire' ? coverOf(ctx, offending) : undefined;
  const resourceIds = kind === 'person_double' ? v.resourceIds : [offending.resourceId];
  const bookingIds = ownBookings.map((b) => b.id);
  return {
    id: violationKey(v),
    kind,
    kindLabel: KIND_LABELS[kind],
    bookingIds,
    date,
    from,
    to,
    message: namedMessage(ctx, v),
    jobIds: jobs.map((j) => j.id),
    jobReferences: jobs.map((j) => j.reference),
    stageId: offending.stageId,
    stageName: ctx.index.stages.get(offending.stageId)?.stage.name ?? '',
    resourceNames: resourceIds.map((id) => resourceName(ctx, id)),
    costPence: kind === 'hire' ? extraHire(ctx, offending).pence : 0,
    // Both sides on the board: the resource's row (a person in two places is on two rows: no row
    // search), no job filter, the reader's own bookings of the problem outlined.
    link: boardLink(date, {
      resourceName: kind === 'person_double' ? undefined : resourceName(ctx, offending.resourceId),
      highlight: bookingIds,
      // A machine outside its hire: the hire it falls outside of is drawn beside it.
      hireId: cover?.hireId,
    }),
    fixes: [],
    ...(cover ? { cover } : {}),
    offending,
  };
}

/**
 * Every clash the engine finds in the range — a resource double-booked, a machine outside its
 * hire, a person in two places, a partner's resource booked by another installer — soonest
 * first and, on the same day, the costliest first; each with a board link and the slot finder's
 * fixes for the later-booked stage (only ones the write path would accept). Another installer's side of a shared resource is never listed.
 *
 * @example
 * clashReport(ctx).rows[0] // { kind: 'clash', date: '2026-06-09', link: '/board?view=day&date=2026-06-09&q=Crew+Finch&highlight=31%2C32', fixes: [...] }
 */
export function clashReport(ctx: ReportContext, options: ClashReportOptions = {}): ClashReport {
  const rows: (ClashRow & { offending?: Booking })[] = [];
  for (const v of ctx.violations) {
    if (!CLASH_KINDS.has(v.kind)) continue;
    const row = rowOf(ctx, v);
    if (row && row.to > ctx.range.from && row.from < ctx.range.to) rows.push(row);
  }
  rows.sort(
    (a, b) =>
      (a.date < b.date ? -1 : a.date > b.date ? 1 : 0) ||
      b.costPence - a.costPence ||
      a.from - b.from ||
      (a.id < b.id ? -1 : 1),
  );
  const fixesFor = options.fixesFor ?? 60;
  const out: ClashRow[] = rows.map((row, i) => {
    const { offending, ...rest } = row;
    const kind = offending ? ctx.index.resources.get(offending.resourceId)?.kind : undefined;
    const fixes =
      i < fixesFor && offending && kind
        ? suggestedFixes(ctx, offending.stageId, offending.id, kind, {
            alternatives: options.alternatives ?? 2,
            extraWorkingMinutes: options.extraWorkingMinutes,
          })
        : [];
    return { ...rest, fixes };
  });
  const perWeek = new Map<string, number>();
  for (const r of out)
    perWeek.set(weekOf(r.from, ctx.range.timeZone), (perWeek.get(weekOf(r.from, ctx.range.timeZone)) ?? 0) + 1);
  return {
    range: ctx.range,
    rows: out,
    perWeek: [...perWeek.entries()].sort().map(([week, count]) => ({ week, count })),
  };
}
