import {
  formatInstant,
  formatPence,
  idleHireDays,
  isoDateOfDay,
  resourceCalendarOf,
  type HirePeriod,
} from '../scheduler/index.ts';
import { boardLink, dateIn, resourceName, type ReportContext } from './context.ts';
import type { HirePeriodRow, HireReport, HireSuggestion } from './types.ts';
import { weekOf, weekOfDate } from './weeks.ts';

/**
 * The board at the hire's dates, on the machine's row, with the hire period drawn: a week view when
 * the hire falls in one week, else the month it starts in (a single idle day showed an empty day).
 *
 * @example
 * hireLink(ctx, monToFriHire, 'Test mini digger (hired)') // '/board?view=week&date=2026-06-22&q=Test+mini+digger+%28hired%29&hire=7'
 */
export function hireLink(ctx: ReportContext, p: HirePeriod, machine: string): string {
  const tz = ctx.range.timeZone;
  const oneWeek = weekOf(p.onHire, tz) === weekOf(p.offHire - 1, tz);
  return boardLink(dateIn(ctx, p.onHire), { resourceName: machine, hireId: p.id, view: oneWeek ? 'week' : 'month' });
}

/** What the database knows about a hire period beyond the engine's fields. */
export interface HirePeriodFacts {
  id: string;
  supplierFirmId: string;
  supplierName: string;
  status: 'requested' | 'approved' | 'ended';
  version: number;
  deliveryPence: number;
  collectionPence: number;
}

/**
 * The paid days of a hire period as local dates: the days of the machine's calendar with working
 * time inside [on-hire, off-hire) — the same rule as the engine's {@link idleHireDays}.
 *
 * @example
 * paidDaysOf(ctx, monToFriHire) // ['2026-06-01', '2026-06-02', '2026-06-03', '2026-06-04', '2026-06-05']
 */
export function paidDaysOf(ctx: ReportContext, period: HirePeriod): string[] {
  const cal = resourceCalendarOf(ctx.index, period.resourceId);
  const out: string[] = [];
  const last = cal.dayOf(period.offHire - 1);
  for (let d = cal.dayOf(period.onHire); d <= last && out.length < 3660; d++) {
    const ivs = cal.dayIntervals(d);
    for (let i = 0; i < ivs.length; i += 2) {
      if ((ivs[i + 1] as number) > period.onHire && (ivs[i] as number) < period.offHire) {
        out.push(isoDateOfDay(d));
        break;
      }
    }
  }
  return out;
}

const dayWords = (iso: string) => formatInstant(Date.parse(`${iso}T12:00:00Z`), 'UTC').slice(0, -6);
const plural = (n: number, word: string) => `${n} ${word}${n === 1 ? '' : 's'}`;

/**
 * Ways to pay for fewer idle days, counting only days still to come (days gone are paid):
 * end a hire with nothing booked, start it later, off-hire earlier, or off-hire over a long idle
 * gap when the gap costs more than another collection and delivery.
 *
 * @example
 * hireSuggestions(['2026-06-01', …], new Set(['2026-06-04', '2026-06-05']), 14500, facts, '2026-05-29')
 * // [{ kind: 'shorten_end', label: 'Off-hire 2 days earlier (last paid day Wed 3 Jun): saves £290.00', savesPence: 29000 }]
 */
export function hireSuggestions(
  paid: readonly string[],
  idle: ReadonlySet<string>,
  dayRatePence: number,
  charges: { deliveryPence: number; collectionPence: number },
  today: string,
): HireSuggestion[] {
  const future = paid.filter((d) => d >= today);
  const out: HireSuggestion[] = [];
  if (paid.length > 0 && paid.every((d) => idle.has(d))) {
    if (future.length === 0) return [];
    const notStarted = (paid[0] as string) >= today;
    const saves = future.length * dayRatePence + (notStarted ? charges.deliveryPence + charges.collectionPence : 0);
    const lastGone = paid.filter((d) => d < today).at(-1);
    return [
      {
        kind: 'end',
        savesPence: saves,
        // Not started: the hire can go; started: off-hire after the last day already paid.
        ...(notStarted ? { cancel: true } : lastGone === undefined ? {} : { change: { offHireDate: lastGone } }),
        label: notStarted
          ? `Nothing is booked on this hire: cancel it: saves ${formatPence(saves)}`
          : `Nothing is booked on this hire: off-hire it now: saves ${formatPence(saves)}`,
      },
    ];
  }
  let lead = 0;
  while (lead < paid.length && idle.has(paid[lead] as string) && (paid[lead] as string) >= today) lead++;
  if (lead > 0 && (paid[0] as string) >= today) {
    out.push({
      kind: 'shorten_start',
      savesPence: lead * dayRatePence,
      change: { onHireDate: paid[lead] as string },
      label: `On-hire ${plural(lead, 'day')} later (first paid day ${dayWords(paid[lead] as string)}): saves ${formatPence(lead * dayRatePence)}`,
    });
  }
  let tail = 0;
  while (
    tail < paid.length - lead &&
    idle.has(paid[paid.length - 1 - tail] as string) &&
    (paid[paid.length - 1 - tail] as string) >= today
  )
    tail++;
  if (tail > 0) {
    out.push({
      kind: 'shorten_end',
      savesPence: tail * dayRatePence,
      change: { offHireDate: paid[paid.length - 1 - tail] as string },
      label: `Off-hire ${plural(tail, 'day')} earlier (last paid day ${dayWords(paid[paid.length - 1 - tail] as string)}): saves ${formatPence(tail * dayRatePence)}`,
    });
  }
  // Idle runs in the middle: worth a collection and a fresh delivery only when they cost more.
  const refetch = charges.deliveryPence + charges.collectionPence;
  let i = lead;
  while (i < paid.length - tail) {
    if (!idle.has(paid[i] as string) || (paid[i] as string) < today) {
      i++;
      continue;
    }
    let j = i;
    while (j + 1 < paid.length - tail && idle.has(paid[j + 1] as string)) j++;
    const run = j - i + 1,
      saves = run * dayRatePence - refetch;
    if (saves > 0) {
      out.push({
        kind: 'split',
        savesPence: saves,
        label: `Off-hire over the ${plural(run, 'idle day')} ${dayWords(paid[i] as string)} to ${dayWords(paid[j] as string)} and hire again: saves ${formatPence(saves)} after ${formatPence(refetch)} collection and delivery`,
      });
    }
    i = j + 1;
  }
  return out;
}

/**
 * Per hired machine, each hire period touching the range: paid days against days booked, the idle
 * paid days and their cost (the engine's {@link idleHireDays}, so the figures are the board's),
 * total cost, bookings outside the hire, and suggestions to end, shorten, split or merge hires.
 *
 * @example
 * hireReport(ctx, facts).periods[0] // { paidDays: 5, bookedDays: 2, idleDays: ['2026-06-01', …], idleCostPence: 43500, … }
 */
export function hireReport(ctx: ReportContext, facts: ReadonlyMap<string, HirePeriodFacts>): HireReport {
  const today = dateIn(ctx, ctx.range.now);
  const firstDay = dateIn(ctx, ctx.range.from),
    lastDay = dateIn(ctx, ctx.range.to - 1);
  const periods = ctx.data.hirePeriods
    .filter((p) => p.offHire > ctx.range.from && p.onHire < ctx.range.to && ctx.index.resources.has(p.resourceId))
    .sort((a, b) => a.onHire - b.onHire || (a.id < b.id ? -1 : 1));
  const rows: HirePeriodRow[] = periods.map((p) => {
    const f = facts.get(p.id);
    const idle = idleHireDays(ctx.index, p);
    const paid = paidDaysOf(ctx, p);
    const charges = { deliveryPence: f?.deliveryPence ?? 0, collectionPence: f?.collectionPence ?? 0 };
    const name = resourceName(ctx, p.resourceId);
    const outside = ctx.violations.filter((v) => v.kind === 'hire' && v.resourceIds.includes(p.resourceId)).length;
    return {
      id: p.id,
      resourceId: p.resourceId,
      resourceName: name,
      supplierFirmId: f?.supplierFirmId ?? '',
      supplierName: f?.supplierName ?? '',
      status: f?.status ?? 'approved',
      version: f?.version ?? 1,
      onHire: p.onHire,
      offHire: p.offHire,
      onHireDate: dateIn(ctx, p.onHire),
      offHireDate: dateIn(ctx, p.offHire - 1),
      dayRatePence: p.dayRatePence,
      ...charges,
      paidDays: idle.paidDays,
      bookedDays: idle.paidDays - idle.idleDays.length,
      idleDays: idle.idleDays,
      idleCostPence: idle.costPence,
      totalCostPence: idle.paidDays * p.dayRatePence + charges.deliveryPence + charges.collectionPence,
      bookingsOutsideHire: outside,
      // An ended hire is history: the machine has gone back, nothing about it can change.
      suggestions:
        f?.status === 'ended' ? [] : hireSuggestions(paid, new Set(idle.idleDays), p.dayRatePence, charges, today),
      link: hireLink(ctx, p, name),
    };
  });
  addMergeSuggestions(ctx, rows);

  const perWeek = new Map<string, { idleDays: number; costPence: number }>();
  for (const r of rows) {
    for (const d of r.idleDays) {
      if (d < firstDay || d > lastDay) continue;
      const w = perWeek.get(weekOfDate(d)) ?? { idleDays: 0, costPence: 0 };
      w.idleDays++;
      w.costPence += r.dayRatePence;
      perWeek.set(weekOfDate(d), w);
    }
  }
  return {
    range: ctx.range,
    periods: rows,
    totals: {
      paidDays: rows.reduce((n, r) => n + r.paidDays, 0),
      idleDays: rows.reduce((n, r) => n + r.idleDays.length, 0),
      idleCostPence: rows.reduce((n, r) => n + r.idleCostPence, 0),
      totalCostPence: rows.reduce((n, r) => n + r.totalCostPence, 0),
    },
    idlePerWeek: [...perWeek.entries()].sort().map(([week, w]) => ({ week, ...w })),
  };
}

/**
 * Two hires of one machine: overlapping ones pay twice for the shared days; back-to-back ones
 * with a short gap pay a collection and a delivery that keeping the machine through the gap
 * would save. Not with an ended hire: that machine has gone back.
 */
function addMergeSuggestions(ctx: ReportContext, rows: HirePeriodRow[]): void {
  for (let i = 0; i < rows.length; i++) {
    for (let j = i + 1; j < rows.length; j++) {
      const a = rows[i] as HirePeriodRow,
        b = rows[j] as HirePeriodRow;
      if (a.resourceId !== b.resourceId || a.status === 'ended' || b.status === 'ended') continue;
      const pa = paidDaysOf(ctx, {
        id: a.id,
        resourceId: a.resourceId,
        onHire: a.onHire,
        offHire: a.offHire,
        dayRatePence: a.dayRatePence,
      });
      const pb = paidDaysOf(ctx, {
        id: b.id,
        resourceId: b.resourceId,
        onHire: b.onHire,
        offHire: b.offHire,
        dayRatePence: b.dayRatePence,
      });
      const shared = pb.filter((d) => pa.includes(d)).length;
      if (shared > 0) {
        const saves =
          shared * Math.min(a.dayRatePence, b.dayRatePence) +
          Math.min(a.collectionPence + b.deliveryPence, b.collectionPence + a.deliveryPence);
        b.suggestions.push({
          kind: 'merge',
          savesPence: saves,
          label: `Overlaps the hire from ${dayWords(a.onHireDate)} on ${plural(shared, 'day')}: merge them: saves ${formatPence(saves)}`,
        });
        continue;
      }
      const cal = resourceCalendarOf(ctx.index, a.resourceId);
      let gap = 0;
      for (let d = cal.dayOf(a.offHire - 1) + 1; d < cal.dayOf(b.onHire); d++)
        if (cal.dayIntervals(d).length > 0) gap++;
      const saves = a.collectionPence + b.deliveryPence - gap * a.dayRatePence;
      if (saves > 0) {
        b.suggestions.push({
          kind: 'merge',
          savesPence: saves,
          label:
            gap === 0
              ? `Keep it on hire from the hire ending ${dayWords(a.offHireDate)}, with no working day between, instead of collecting and delivering again: saves ${formatPence(saves)}`
              : `Keep it on hire through the ${plural(gap, 'working day')} since the hire ending ${dayWords(a.offHireDate)} instead of collecting and delivering again: saves ${formatPence(saves)}`,
        });
      }
    }
  }
}
