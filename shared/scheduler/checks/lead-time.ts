import { resourceCalendarOf, type BoardIndex } from '../board-index.js';
import { roundUpToStep } from '../booking-step.js';
import { addWorkingDays } from '../calendar.js';
import { formatInstant } from '../format.js';
import type { Booking, LeadTimeRule, Violation } from '../types.js';
import { capitalise, makeViolation, resourceLabel, stageLabel } from './violation.js';

/**
 * Rules that apply to a booking: a rule's resourceKind and stageKind must both match when given.
 *
 * @example
 * matchingLeadTimeRules(index, booking) // [{ appliesTo: { resourceKind: 'crane' }, workingDays: 10, from: 'now' }]
 */
export function matchingLeadTimeRules(index: BoardIndex, booking: Booking): LeadTimeRule[] {
  const r = index.resources.get(booking.resourceId);
  const s = index.stages.get(booking.stageId)?.stage;
  return index.board.leadTimeRules.filter((rule) => {
    const { resourceKind, stageKind } = rule.appliesTo;
    if (resourceKind === undefined && stageKind === undefined) return false;
    return (resourceKind === undefined || resourceKind === r?.kind) && (stageKind === undefined || stageKind === s?.kind);
  });
}

/**
 * The earliest start a booking may have under the lead-time rules: N working days (on the
 * resource's calendar) from now, or from the job's order date (now if the job isn't ordered yet).
 *
 * @example
 * leadTimeEarliest(index, booking) // epoch ms, or -Infinity when no rule applies
 */
export function leadTimeEarliest(index: BoardIndex, booking: Booking): number {
  let t = Number.NEGATIVE_INFINITY;
  const cal = resourceCalendarOf(index, booking.resourceId);
  for (const rule of matchingLeadTimeRules(index, booking)) {
    const job = index.jobs.get(index.stages.get(booking.stageId)?.stage.jobId ?? '');
    const from = rule.from === 'order' ? (job?.orderedAt ?? index.now) : index.now;
    t = Math.max(t, addWorkingDays(cal, from, rule.workingDays));
  }
  return t;
}

/**
 * Lead-time check of one booking. Only pencilled bookings are checked: once a booking is sent
 * the other party has had notice, and a confirmed one was accepted. Severity error.
 *
 * @example
 * checkLeadTime(index, pencilledCraneBooking)
 */
export function checkLeadTime(index: BoardIndex, booking: Booking): Violation[] {
  if (booking.state !== 'pencilled') return [];
  const out: Violation[] = [];
  const cal = resourceCalendarOf(index, booking.resourceId);
  const job = index.jobs.get(index.stages.get(booking.stageId)?.stage.jobId ?? '');
  for (const rule of matchingLeadTimeRules(index, booking)) {
    const from = rule.from === 'order' ? (job?.orderedAt ?? index.now) : index.now;
    const earliest = addWorkingDays(cal, from, rule.workingDays);
    if (booking.start < earliest) {
      const what = rule.appliesTo.resourceKind !== undefined
        ? capitalise(resourceLabel(index, booking.resourceId))
        : stageLabel(index, booking.stageId);
      const fromWords = rule.from === 'order' ? (job?.orderedAt != null ? 'the order date' : 'today (the unit is not ordered yet)') : 'today';
      // Counted from now the notice ends at an odd minute: say (and offer) the next booking step.
      const shown = roundUpToStep(earliest, cal.timeZone, index.stepMinutes);
      out.push(makeViolation('lead_time', 'error', [booking.stageId], [booking.resourceId], [booking.id],
        `${what} needs ${rule.workingDays} working days' notice from ${fromWords}: the earliest start is ${formatInstant(shown, cal.timeZone)}`,
        { earliest, earliestStart: shown, workingDays: rule.workingDays, from: rule.from }));
    }
  }
  return out;
}
