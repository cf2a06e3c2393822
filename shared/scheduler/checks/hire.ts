import { resourceCalendarOf, type BoardIndex } from '../board-index.js';
import { formatDayOfWeek, formatInstant, formatPence } from '../format.js';
import { isoDateOfDay } from '../time-zone.js';
import type { Booking, HirePeriod, Violation } from '../types.js';
import { capitalise, resourceLabel, stageLabel, violationOf } from './violation.js';

const NO_PERIODS: readonly HirePeriod[] = Object.freeze([]);
const NO_BOOKINGS: readonly Booking[] = Object.freeze([]);

/** "Tue 12 May" for an idle day (its number and its ISO date, which says it for far-off years). */
function dayWords(day: number, iso: string): string {
  return formatDayOfWeek(day) ?? formatInstant(Date.parse(`${iso}T12:00:00Z`), 'UTC').slice(0, -6);
}

/**
 * A hired machine must be booked inside one of its hire periods (on-hire to off-hire): error.
 * Appends to `out` and returns it.
 *
 * @example
 * checkHire(index, excavatorBookedAfterOffHire)
 */
export function checkHire(index: BoardIndex, booking: Booking, out: Violation[] = []): Violation[] {
  const r = index.resources.get(booking.resourceId);
  if (r?.hired !== true) return out;
  const periods = index.hireByResource.get(r.id) ?? NO_PERIODS;
  // A plain loop, no closure: every booking of a hired machine passes here.
  for (let i = 0; i < periods.length; i++) {
    const p = periods[i] as HirePeriod;
    if (p.onHire <= booking.start && booking.end <= p.offHire) return out;
  }
  const tz = resourceCalendarOf(index, r.id).timeZone;
  const who = capitalise(resourceLabel(index, r.id));
  const message =
    periods.length === 0
      ? `${who} is hired in but not on hire for ${stageLabel(index, booking.stageId)}`
      : `${who} is booked for ${stageLabel(index, booking.stageId)} outside its hire (${periods
          .map((p) => `${formatInstant(p.onHire, tz)} to ${formatInstant(p.offHire, tz)}`)
          .join('; ')})`;
  out.push(violationOf('hire', 'error', [booking.stageId], [r.id], [booking.id], message));
  return out;
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
  return idleHireOf(index, period, null);
}

/** {@link idleHireDays}, also handing back the idle days' numbers in `dayNumbers` when given. */
function idleHireOf(index: BoardIndex, period: HirePeriod, dayNumbers: number[] | null): IdleHire {
  const cal = resourceCalendarOf(index, period.resourceId);
  const first = cal.dayOf(period.onHire),
    last = cal.dayOf(period.offHire - 1);
  // Booked days as flags over the period's days (at most ten years of them) rather than a Set.
  const span = Math.max(0, Math.min(last - first + 1, 3660));
  const booked = new Uint8Array(span);
  const list = index.bookingsByResource.get(period.resourceId)?.list ?? NO_BOOKINGS;
  for (let k = 0; k < list.length; k++) {
    const b = list[k] as Booking;
    if (b.end <= period.onHire || b.start >= period.offHire) continue;
    const a = Math.max(cal.dayOf(b.start), first),
      z = Math.min(cal.dayOf(b.end - 1), last, first + span - 1);
    for (let d = a; d <= z; d++) booked[d - first] = 1;
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
    if (booked[d - first] === 0) {
      idleDays.push(isoDateOfDay(d));
      if (dayNumbers !== null) dayNumbers.push(d);
    }
  }
  return { idleDays, paidDays, costPence: idleDays.length * period.dayRatePence };
}

/**
 * Idle-hire warnings for every hire period on the board (money paid for a machine standing idle),
 * appended to `out`.
 *
 * @example
 * checkIdleHire(index) // [{ kind: 'idle_hire', severity: 'warning', message: 'The excavator (ex-1) is on hire but idle on 2 days …' }]
 */
export function checkIdleHire(index: BoardIndex, out: Violation[] = []): Violation[] {
  const days: number[] = [];
  for (const p of index.board.hirePeriods) {
    days.length = 0;
    const idle = idleHireOf(index, p, days);
    if (idle.idleDays.length === 0) continue;
    // "Tue 12 May" straight from the day number: a long hire has hundreds of idle days, and going
    // through the ISO text, a parse and a clock time for each showed up in the analysis.
    const names = idle.idleDays.map((d, k) => dayWords(days[k] as number, d));
    out.push(
      violationOf(
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
