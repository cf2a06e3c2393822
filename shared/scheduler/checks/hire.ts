import { resourceCalendarOf, type BoardIndex } from '../board-index.js';
import { formatInstant, formatPence } from '../format.js';
import { isoDateOfDay } from '../time-zone.js';
import type { Booking, HirePeriod, Violation } from '../types.js';
import { capitalise, makeViolation, resourceLabel, stageLabel } from './violation.js';

/**
 * A hired machine must be booked inside one of its hire periods (on-hire to off-hire): error.
 *
 * @example
 * checkHire(index, excavatorBookedAfterOffHire)
 */
export function checkHire(index: BoardIndex, booking: Booking): Violation[] {
  const r = index.resources.get(booking.resourceId);
  if (r?.hired !== true) return [];
  const periods = index.hireByResource.get(r.id) ?? [];
  if (periods.some((p) => p.onHire <= booking.start && booking.end <= p.offHire)) return [];
  const tz = resourceCalendarOf(index, r.id).timeZone;
  const who = capitalise(resourceLabel(index, r.id));
  const message =
    periods.length === 0
      ? `${who} is hired in but not on hire for ${stageLabel(index, booking.stageId)}`
      : `${who} is booked for ${stageLabel(index, booking.stageId)} outside its hire (${periods
          .map((p) => `${formatInstant(p.onHire, tz)} to ${formatInstant(p.offHire, tz)}`)
          .join('; ')})`;
  return [makeViolation('hire', 'error', [booking.stageId], [r.id], [booking.id], message)];
}

/** Paid days of a hire period with no booking, and what they cost. */
export interface IdleHire {
  idleDays: string[];
  paidDays: number;
  costPence: number;
}

/**
 * Days of a hire period that are paid (working days of the machine's calendar, a common
 * practice assumption: day rates charged per working day) but have no active booking.
 *
 * @example
 * idleHireDays(index, hirePeriod) // { idleDays: ['2026-05-06'], paidDays: 5, costPence: 15000 }
 */
export function idleHireDays(index: BoardIndex, period: HirePeriod): IdleHire {
  const cal = resourceCalendarOf(index, period.resourceId);
  const first = cal.dayOf(period.onHire),
    last = cal.dayOf(period.offHire - 1);
  const booked = new Set<number>();
  for (const b of index.bookingsByResource.get(period.resourceId)?.list ?? []) {
    if (b.end <= period.onHire || b.start >= period.offHire) continue;
    const a = Math.max(cal.dayOf(b.start), first),
      z = Math.min(cal.dayOf(b.end - 1), last);
    for (let d = a; d <= z; d++) booked.add(d);
  }
  const idleDays: string[] = [];
  let paidDays = 0;
  for (let d = first; d <= last && d - first < 3660; d++) {
    const ivs = cal.dayIntervals(d);
    let works = false;
    for (let i = 0; i < ivs.length; i += 2) {
      if ((ivs[i + 1] as number) > period.onHire && (ivs[i] as number) < period.offHire) works = true;
    }
    if (!works) continue;
    paidDays++;
    if (!booked.has(d)) idleDays.push(isoDateOfDay(d));
  }
  return { idleDays, paidDays, costPence: idleDays.length * period.dayRatePence };
}

/**
 * Idle-hire warnings for every hire period on the board (money paid for a machine standing idle).
 *
 * @example
 * checkIdleHire(index) // [{ kind: 'idle_hire', severity: 'warning', message: 'The excavator (ex-1) is on hire but idle on 2 days …' }]
 */
export function checkIdleHire(index: BoardIndex): Violation[] {
  const out: Violation[] = [];
  for (const p of index.board.hirePeriods) {
    const idle = idleHireDays(index, p);
    if (idle.idleDays.length === 0) continue;
    const names = idle.idleDays.map((d) => formatInstant(Date.parse(`${d}T12:00:00Z`), 'UTC').slice(0, -6));
    out.push(
      makeViolation(
        'idle_hire',
        'warning',
        [],
        [p.resourceId],
        [],
        `${capitalise(resourceLabel(index, p.resourceId))} is on hire but idle on ${idle.idleDays.length} day${idle.idleDays.length === 1 ? '' : 's'} (${names.join(', ')}): ${formatPence(idle.costPence)} paid for nothing`,
        { hirePeriodId: p.id, ...idle, dayRatePence: p.dayRatePence },
      ),
    );
  }
  return out;
}
