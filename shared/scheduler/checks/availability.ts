import { resourceCalendarOf, type BoardIndex } from '../board-index.js';
import { isWorkingEnd, isWorkingInstant, workingMinutesBetween, type CompiledCalendar } from '../calendar.js';
import { formatInstant } from '../format.js';
import { holidayDaysOf } from '../holidays.js';
import { DAY_MS, MINUTE_MS, timeZoneOffset, weekdayOfDay } from '../time-zone.js';
import type { Booking, Stage, Violation } from '../types.js';
import { capitalise, makeViolation, resourceLabel, stageLabel } from './violation.js';

/**
 * Why there is no work at an instant: 'public holiday', 'closed or absent' or 'outside working hours'.
 *
 * @example
 * whyNotWorking(firmCal, christmasDay1000) // 'public holiday'
 */
export function whyNotWorking(cal: CompiledCalendar, instant: number): string {
  const day = cal.dayOf(instant);
  if (holidayDaysOf(cal.source).has(day)) return 'public holiday';
  const minute = (instant + timeZoneOffset(cal.timeZone, instant) - day * DAY_MS) / MINUTE_MS;
  const ranges = cal.source.weekly[weekdayOfDay(day)] ?? [];
  if (ranges.some(([s, e]) => s <= minute && minute < e)) return 'closed or absent';
  return 'outside working hours';
}

/**
 * Availability of one booking on its resource's calendar: it must start and end in working time
 * (not on a public holiday, closure or absence) — error; and hold at least the stage's working
 * minutes — warning (the stage would overrun).
 *
 * @example
 * checkAvailability(index, craneOnBankHoliday) // [{ kind: 'availability', severity: 'error', … }]
 */
export function checkAvailability(
  index: BoardIndex,
  booking: Booking,
  stage: Stage | undefined = index.stages.get(booking.stageId)?.stage,
  out: Violation[] = [],
  cal: CompiledCalendar = resourceCalendarOf(index, booking.resourceId),
): Violation[] {
  if (!isWorkingInstant(cal, booking.start)) {
    const why = whyNotWorking(cal, booking.start);
    out.push(
      makeViolation(
        'availability',
        'error',
        [booking.stageId],
        [booking.resourceId],
        [booking.id],
        `${capitalise(resourceLabel(index, booking.resourceId))} isn't working when ${stageLabel(index, booking.stageId)} starts (${formatInstant(booking.start, cal.timeZone)}: ${why})`,
        { at: booking.start, reason: why },
      ),
    );
  }
  if (!isWorkingEnd(cal, booking.end)) {
    const why = whyNotWorking(cal, booking.end - 1);
    out.push(
      makeViolation(
        'availability',
        'error',
        [booking.stageId],
        [booking.resourceId],
        [booking.id],
        `${capitalise(resourceLabel(index, booking.resourceId))} isn't working when ${stageLabel(index, booking.stageId)} finishes (${formatInstant(booking.end, cal.timeZone)}: ${why})`,
        { at: booking.end, reason: why },
      ),
    );
  }
  const need = stage?.durationMinutes ?? 0;
  if (need > 0) {
    const booked = workingMinutesBetween(cal, booking.start, booking.end);
    if (booked < need) {
      out.push(
        makeViolation(
          'availability',
          'warning',
          [booking.stageId],
          [booking.resourceId],
          [booking.id],
          `${stageLabel(index, booking.stageId)} needs ${fmtHours(need)} of work but ${resourceLabel(index, booking.resourceId)} is booked for ${fmtHours(booked)} of working time`,
          { neededMinutes: need, bookedMinutes: booked },
        ),
      );
    }
  }
  return out;
}

function fmtHours(minutes: number): string {
  const h = Math.round((minutes / 60) * 100) / 100;
  return `${h} h`;
}
