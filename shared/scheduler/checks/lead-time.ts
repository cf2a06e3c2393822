import { resourceCalendarOf, type BoardIndex } from '../board-index.js';
import { roundUpToStep } from '../booking-step.js';
import { addWorkingDays } from '../calendar.js';
import { formatInstant } from '../format.js';
import type { Booking, LeadTimeRule, Violation } from '../types.js';
import { capitalise, resourceLabel, stageLabel, violationOf } from './violation.js';

/**
 * "5 working days'", "1 working day's": the possessive before "notice".
 *
 * @example
 * noticeWords(35) // "35 working days'"
 */
export function noticeWords(workingDays: number): string {
  return workingDays === 1 ? "1 working day's" : `${workingDays} working days'`;
}

interface RulesByStage {
  general: LeadTimeRule[];
  byStage: Map<string, LeadTimeRule[]>;
}

const rulesCache = new WeakMap<readonly LeadTimeRule[], RulesByStage>();

/**
 * The rules that may apply to a stage: the firm's (by resource or stage kind) and the stage's own
 * (by its id), found once per board so a board with a rule on every stage stays linear. A rule
 * that names nothing applies to nothing.
 *
 * @example
 * leadTimeRulesOfStage(index, 'delivery-7') // [{ appliesTo: { stageId: 'delivery-7' }, workingDays: 35, from: 'order' }, …]
 */
export function leadTimeRulesOfStage(index: BoardIndex, stageId: string): LeadTimeRule[] {
  const rules = index.board.leadTimeRules;
  let split = rulesCache.get(rules);
  if (split === undefined) {
    split = { general: [], byStage: new Map() };
    for (const rule of rules) {
      const { resourceKind, stageKind, stageId: id } = rule.appliesTo;
      if (id !== undefined) {
        const l = split.byStage.get(id);
        if (l === undefined) split.byStage.set(id, [rule]);
        else l.push(rule);
      } else if (resourceKind !== undefined || stageKind !== undefined) split.general.push(rule);
    }
    rulesCache.set(rules, split);
  }
  const own = split.byStage.get(stageId);
  return own === undefined ? split.general : [...split.general, ...own];
}

/**
 * Rules that apply to a booking: a rule's resourceKind, stageKind and stageId must each match when given.
 *
 * @example
 * matchingLeadTimeRules(index, booking) // [{ appliesTo: { resourceKind: 'crane' }, workingDays: 10, from: 'now' }]
 */
export function matchingLeadTimeRules(index: BoardIndex, booking: Booking): LeadTimeRule[] {
  const r = index.resources.get(booking.resourceId);
  const s = index.stages.get(booking.stageId)?.stage;
  return leadTimeRulesOfStage(index, booking.stageId).filter((rule) => {
    const { resourceKind, stageKind } = rule.appliesTo;
    return (
      (resourceKind === undefined || resourceKind === r?.kind) && (stageKind === undefined || stageKind === s?.kind)
    );
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
 * Lead-time check of one booking: at most one violation, for the rule whose notice ends last.
 * Only pencilled bookings are checked: once a booking is sent
 * the other party has had notice, and a confirmed one was accepted. Severity error. Appends to
 * `out` and returns it.
 *
 * @example
 * checkLeadTime(index, pencilledCraneBooking)
 */
export function checkLeadTime(index: BoardIndex, booking: Booking, out: Violation[] = []): Violation[] {
  if (booking.state !== 'pencilled') return out;
  const cal = resourceCalendarOf(index, booking.resourceId);
  const job = index.jobs.get(index.stages.get(booking.stageId)?.stage.jobId ?? '');
  // The firm's rule and the stage's own may both apply (15 days for any delivery, 35 for this
  // maker's): only the one that holds the booking back longest is told.
  let worst: { rule: LeadTimeRule; earliest: number } | null = null;
  for (const rule of matchingLeadTimeRules(index, booking)) {
    const from = rule.from === 'order' ? (job?.orderedAt ?? index.now) : index.now;
    const earliest = addWorkingDays(cal, from, rule.workingDays);
    if (booking.start < earliest && (worst === null || earliest > worst.earliest)) worst = { rule, earliest };
  }
  if (worst === null) return out;
  const { rule, earliest } = worst;
  const what =
    rule.appliesTo.resourceKind !== undefined
      ? capitalise(resourceLabel(index, booking.resourceId))
      : stageLabel(index, booking.stageId);
  const fromWords =
    rule.from === 'order'
      ? job?.orderedAt != null
        ? 'the order date'
        : 'today (the unit is not ordered yet)'
      : 'today';
  // Counted from now the notice ends at an odd minute: say (and offer) the next booking step.
  const shown = roundUpToStep(earliest, cal.timeZone, index.stepMinutes);
  const why = rule.reason ? ` (${rule.reason})` : '';
  out.push(
    violationOf(
      'lead_time',
      'error',
      [booking.stageId],
      [booking.resourceId],
      [booking.id],
      `${what} needs ${noticeWords(rule.workingDays)} notice from ${fromWords}${why}: the earliest start is ${formatInstant(shown, cal.timeZone)}`,
      { earliest, earliestStart: shown, workingDays: rule.workingDays, from: rule.from },
    ),
  );
  return out;
}
