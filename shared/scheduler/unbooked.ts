import {
  bookingsOfStage,
  kindCalendarOf,
  spanEnd,
  spanStart,
  stageCalendarOf,
  type BoardIndex,
  type DepLink,
  type StageInfo,
} from './board-index.js';
import { bookableStart, mustFitInOneDay, roundUpToStep } from './booking-step.js';
import { addWorkingDays, addWorkingMinutes, type CompiledCalendar } from './calendar.js';
import { cureElapsedDays, releaseInstant } from './cure.js';
import { SchedulerError } from './errors.js';
import { formatInstant, workWords } from './format.js';
import { applyLag, describeLag } from './lag.js';
import { makeViolation, stageLabel, type BookingsOf } from './checks/violation.js';
import { leadTimeRulesOfStage, noticeWords } from './checks/lead-time.js';
import type { Booking, Instant, LeadTimeRule, Stage, Violation } from './types.js';

/** What holds an unbooked stage's earliest start back. */
export type HeldBy =
  | { kind: 'now' }
  | { kind: 'lead_time'; workingDays: number; from: 'now' | 'order'; ordered: boolean; reason?: string }
  | { kind: 'predecessor'; stageId: string; dependencyId: string; booked: boolean };

/** The earliest times a stage with no booking could have, as a person would book it. */
export interface UnbookedTimes {
  stageId: string;
  /** Earliest start: in working time, on the booking step, and within one working day when the stage must fit in one. */
  start: Instant;
  /** Its duration later on the same calendar. */
  finish: Instant;
  /** The calendar counted on: a resource's of a kind it needs (the job's firm first), else the firm's. */
  calendarId: string;
  heldBy: HeldBy;
}

/**
 * Earliest times of unbooked stages for one view of the bookings (the board's, or the board with
 * a move applied), each worked out once: back through unbooked predecessors to booked ones or to
 * now, with durations, lags, cures and notice periods.
 */
export interface UnbookedPlan {
  readonly index: BoardIndex;
  readonly bookingsOf: BookingsOf;
  /** Times by stage id; null for a stage in or behind a cycle. */
  readonly memo: Map<string, UnbookedTimes | null>;
}

/**
 * A fresh plan over the given bookings (default: the index's own).
 *
 * @example
 * const plan = unbookedPlan(index)
 * unbookedTimesOf(plan, 'base-1')?.start
 */
export function unbookedPlan(
  index: BoardIndex,
  bookingsOf: BookingsOf = (id) => bookingsOfStage(index, id),
): UnbookedPlan {
  return { index, bookingsOf, memo: new Map() };
}

/**
 * The notice rule that holds an unbooked stage back the longest: a rule applies when its stage
 * kind is the stage's, its stage id is the stage's and its resource kind is one the stage needs
 * (each when given). N working
 * days on the calendar of a resource of that kind (else the stage's), from now or from the job's
 * order date (now when it isn't ordered yet).
 */
function noticeFor(
  index: BoardIndex,
  stage: Stage,
  cal: CompiledCalendar,
): { at: number; rule: LeadTimeRule; ordered: boolean } | null {
  if (index.board.leadTimeRules.length === 0) return null;
  const job = index.jobs.get(stage.jobId);
  let best: { at: number; rule: LeadTimeRule; ordered: boolean } | null = null;
  for (const rule of leadTimeRulesOfStage(index, stage.id)) {
    const { resourceKind, stageKind } = rule.appliesTo;
    if (stageKind !== undefined && stageKind !== stage.kind) continue;
    if (resourceKind !== undefined && !stage.requirements.some((r) => r.kind === resourceKind)) continue;
    const c = resourceKind === undefined ? cal : (kindCalendarOf(index, resourceKind, job?.firmId) ?? cal);
    const ordered = job?.orderedAt != null;
    const from = rule.from === 'order' ? (job?.orderedAt ?? index.now) : index.now;
    const at = addWorkingDays(c, from, rule.workingDays);
    if (best === null || at > best.at) best = { at, rule, ordered };
  }
  return best;
}

function compute(plan: UnbookedPlan, stageId: string): UnbookedTimes {
  const { index, bookingsOf, memo } = plan;
  const info = index.stages.get(stageId);
  if (info === undefined) throw new Error(`unreachable: stage ${stageId} is indexed`);
  const stage = info.stage;
  const cal = stageCalendarOf(index, stageId, []);
  const dur = stage.durationMinutes;
  let t = index.now;
  let heldBy: HeldBy = { kind: 'now' };
  const notice = noticeFor(index, stage, cal);
  if (notice !== null && notice.at > t) {
    t = notice.at;
    heldBy = {
      kind: 'lead_time',
      workingDays: notice.rule.workingDays,
      from: notice.rule.from,
      ordered: notice.ordered,
      ...(notice.rule.reason ? { reason: notice.rule.reason } : {}),
    };
  }
  for (const l of info.depsIn) {
    const p = l.from;
    if (p === info) continue;
    const pb = bookingsOf(p.stage.id);
    let pStart: number, pEnd: number;
    if (pb.length > 0) {
      pStart = spanStart(pb);
      pEnd = spanEnd(pb);
    } else {
      const pt = memo.get(p.stage.id);
      if (pt == null) continue;
      pStart = pt.start;
      pEnd = pt.finish;
    }
    const dep = l.dep;
    let b = applyLag(cal, dep.type === 'FS' || dep.type === 'FF' ? pEnd : pStart, dep.lag);
    if ((dep.type === 'FF' || dep.type === 'SF') && dur > 0) b = addWorkingMinutes(cal, b, -dur);
    if (p.stage.cure && dep.waitsForCure === true) b = Math.max(b, releaseInstant(pEnd, cureElapsedDays(p.stage.cure)));
    if (b > t) {
      t = b;
      heldBy = { kind: 'predecessor', stageId: p.stage.id, dependencyId: dep.id, booked: pb.length > 0 };
    }
  }
  const start = bookableStart(cal, t, {
    stepMinutes: index.stepMinutes,
    ...(mustFitInOneDay(stage, cal) ? { fitMinutes: dur } : {}),
  });
  return {
    stageId,
    start,
    finish: dur > 0 ? addWorkingMinutes(cal, start, dur) : start,
    calendarId: cal.source.id,
    heldBy,
  };
}

/** A calendar with no working time for ten years gives no times (the stage is then not a bound). */
function computeOrNull(plan: UnbookedPlan, stageId: string): UnbookedTimes | null {
  try {
    return compute(plan, stageId);
  } catch (e) {
    if (e instanceof SchedulerError && e.code === 'no_working_time') return null;
    throw e;
  }
}

/**
 * The earliest times of a stage that has no booking in the plan's view, or null for a booked
 * stage or one in or behind a cycle. Works back through unbooked predecessors (an explicit stack,
 * so a long chain can't overflow), each once.
 *
 * @example
 * unbookedTimesOf(unbookedPlan(index), 'lift-1') // { start, finish, heldBy: { kind: 'predecessor', stageId: 'base-1', … } }
 */
export function unbookedTimesOf(plan: UnbookedPlan, stageId: string): UnbookedTimes | null {
  const { index, bookingsOf, memo } = plan;
  const known = memo.get(stageId);
  if (known !== undefined) return known;
  if (!index.stages.has(stageId) || bookingsOf(stageId).length > 0) return null;
  const stack = [stageId];
  while (stack.length > 0) {
    const id = stack[stack.length - 1] as string;
    if (memo.has(id)) {
      stack.pop();
      continue;
    }
    if (index.blocked.has(id)) {
      memo.set(id, null);
      stack.pop();
      continue;
    }
    const info = index.stages.get(id);
    let waiting = false;
    for (const l of info?.depsIn ?? []) {
      const p = l.from.stage.id;
      if (p !== id && !memo.has(p) && bookingsOf(p).length === 0) {
        stack.push(p);
        waiting = true;
      }
    }
    if (waiting) continue;
    memo.set(id, computeOrNull(plan, id));
    stack.pop();
  }
  return memo.get(stageId) ?? null;
}

/**
 * The earliest times of a stage with no booking on the board, worked out from its unbooked
 * predecessors back to booked ones or to now (null when it is booked or in a cycle). For a job
 * panel's "earliest" beside a stage in the tray.
 *
 * @example
 * unbookedStageTimes(index, 'base-1') // { start: Tue 15 Sep 08:00, finish: 13:00, heldBy: { kind: 'predecessor', stageId: 'dig-1', booked: false } }
 */
export function unbookedStageTimes(index: BoardIndex, stageId: string): UnbookedTimes | null {
  return unbookedTimesOf(unbookedPlan(index), stageId);
}

function lagWords(lag: DepLink['dep']['lag']): string {
  if (lag.amount === 0) return '';
  return lag.amount > 0 ? ` and then ${describeLag(lag)}` : ` less a lead of ${describeLag(lag)}`;
}

/** The stages whose times decided P's: the unbooked chain back, ending with the booked stage that anchors it (if any). */
function chainOf(plan: UnbookedPlan, times: UnbookedTimes): { ids: string[]; anchor: string } {
  const ids: string[] = [];
  let t: UnbookedTimes | null = times;
  while (t !== null) {
    const h: HeldBy = t.heldBy;
    if (h.kind !== 'predecessor') return { ids, anchor: h.kind };
    ids.push(h.stageId);
    if (h.booked) return { ids, anchor: h.stageId };
    t = unbookedTimesOf(plan, h.stageId);
  }
  return { ids, anchor: 'now' };
}

function heldWords(plan: UnbookedPlan, times: UnbookedTimes, tz: string): string {
  const h = times.heldBy;
  const at = formatInstant(times.start, tz);
  switch (h.kind) {
    case 'now':
      return '';
    case 'lead_time': {
      const from = h.from === 'order' ? (h.ordered ? 'the order date' : 'today (not ordered yet)') : 'today';
      return `; it can't start itself before about ${at} (${noticeWords(h.workingDays)} notice from ${from}${h.reason ? `, ${h.reason}` : ''})`;
    }
    case 'predecessor':
      return `; it can't start itself before about ${at} (after ${stageLabel(plan.index, h.stageId)}${h.booked ? '' : ', not booked yet'})`;
  }
}

/**
 * The check of one dependency from a predecessor with no booking to a booked successor: the
 * successor may not start (FS, SS) or finish (FF, SF) before the predecessor's earliest times
 * allow, with the lag and, out of a cured stage on a link that waits for it, the cure. Returns the violation (severity error)
 * or undefined. Skipped when the reader sees only part of the bookings, and once any booking of
 * the successor is on site or done (the work is under way: whatever came first evidently did, and
 * marking progress must not be refused for it).
 * The violation names the successor, the predecessor and the stages that decided its times (the
 * unbooked ones back to the booked stage they wait for), so moving any of them re-checks it.
 *
 * @example
 * checkUnbookedLink(unbookedPlan(index), liftInfo.depsIn[0], liftBookings)
 * // "'Crane lift into pit' can't start before about Tue 22 Sep 11:00: 'Pour reinforced base' (not booked yet) needs 5 h and 6.9 days to cure first"
 */
export function checkUnbookedLink(
  plan: UnbookedPlan,
  link: DepLink,
  successorBookings: readonly Booking[],
): Violation | undefined {
  const { index } = plan;
  if (!index.seesAllBookings || successorBookings.length === 0 || link.from === link.to) return undefined;
  for (const b of successorBookings) if (b.state === 'done' || b.state === 'on_site') return undefined;
  const pt = unbookedTimesOf(plan, link.from.stage.id);
  if (pt === null) return undefined;
  const dep = link.dep;
  const p = link.from.stage;
  const sId = link.to.stage.id;
  const sCal = stageCalendarOf(index, sId, successorBookings);
  const sStart = spanStart(successorBookings),
    sEnd = spanEnd(successorBookings);
  const lagBound = applyLag(sCal, dep.type === 'FS' || dep.type === 'FF' ? pt.finish : pt.start, dep.lag);
  // Only a link that loads the base waits for its cure (walls may go up once it has set).
  const cure = dep.waitsForCure === true ? p.cure : null;
  const cureDays = cure ? cureElapsedDays(cure) : 0;
  const cureBound = cure ? releaseInstant(pt.finish, cureDays) : Number.NEGATIVE_INFINITY;
  const startBound = dep.type === 'FS' || dep.type === 'SS' ? Math.max(lagBound, cureBound) : cureBound;
  const finishBound = dep.type === 'FF' || dep.type === 'SF' ? lagBound : Number.NEGATIVE_INFINITY;
  let which: 'start' | 'finish';
  let bound: number, actual: number;
  if (sStart < startBound) {
    which = 'start';
    bound = startBound;
    actual = sStart;
  } else if (sEnd < finishBound) {
    which = 'finish';
    bound = finishBound;
    actual = sEnd;
  } else return undefined;
  const tz = sCal.timeZone;
  // Where a person could book it: a start goes to the successor's next working instant on the step.
  const stepped = roundUpToStep(bound, tz, index.stepMinutes);
  let shown = stepped;
  if (which === 'start') {
    try {
      shown = bookableStart(sCal, bound, { stepMinutes: index.stepMinutes });
    } catch (e) {
      if (!(e instanceof SchedulerError)) throw e;
    }
  }
  const P = stageLabel(index, p.id),
    S = stageLabel(index, sId);
  let what: string;
  if (which === 'start' && cure && cureBound >= lagBound) {
    what = `needs ${p.durationMinutes > 0 ? `${workWords(p.durationMinutes)} and ` : ''}${(Math.round(cureDays * 10) / 10).toFixed(1)} days to cure first`;
  } else if (dep.type === 'FS') {
    what =
      p.durationMinutes > 0
        ? `needs ${workWords(p.durationMinutes)}${lagWords(dep.lag)} first`
        : `has to be done first${lagWords(dep.lag)}`;
  } else {
    const own = dep.type === 'FF' ? 'finish' : 'start';
    what = `can't ${own} before about ${formatInstant(own === 'finish' ? pt.finish : pt.start, tz)}${lagWords(dep.lag)}`;
  }
  const { ids, anchor } = chainOf(plan, pt);
  const details: Record<string, unknown> = {
    dependencyId: dep.id,
    type: dep.type,
    unbooked: true,
    predecessorId: p.id,
    successorId: sId,
    earliest: bound,
    actual,
    anchor,
    chain: [pt, ...ids.map((id) => unbookedTimesOf(plan, id)).filter((t): t is UnbookedTimes => t !== null)].map(
      (t) => ({ stageId: t.stageId, start: t.start, finish: t.finish }),
    ),
  };
  details[which === 'start' ? 'earliestStart' : 'earliestFinish'] = shown;
  return makeViolation(
    'unbooked_predecessor',
    'error',
    [sId, p.id, ...ids],
    [],
    [],
    `${S} can't ${which} before about ${formatInstant(shown, tz)}: ${P} (not booked yet) ${what}${heldWords(plan, pt, tz)}`,
    details,
  );
}

/**
 * Unbooked-predecessor violations that name `stageId` when its bookings are `bookingsOf(stageId)`:
 * its own links from unbooked predecessors, and, downstream through stages with no booking, every
 * booked successor whose limit it decides (as the booked stage they wait for, or as one of the
 * unbooked chain). What `checkMove` adds to the other checks.
 *
 * @example
 * unbookedViolationsOf(unbookedPlan(index, bookingsOf), 'excavation-1')
 */
export function unbookedViolationsOf(plan: UnbookedPlan, stageId: string, out: Violation[] = []): Violation[] {
  const { index, bookingsOf } = plan;
  const info = index.stages.get(stageId);
  if (info === undefined || !index.seesAllBookings) return out;
  const own = bookingsOf(stageId);
  if (own.length > 0) {
    for (const l of info.depsIn) {
      if (l.from !== info && bookingsOf(l.from.stage.id).length === 0) {
        const v = checkUnbookedLink(plan, l, own);
        if (v !== undefined) out.push(v);
      }
    }
  }
  const seen = new Set<string>([stageId]);
  const queue: StageInfo[] = [info];
  for (let q = 0; q < queue.length; q++) {
    const n = queue[q] as StageInfo;
    const unbooked = bookingsOf(n.stage.id).length === 0;
    for (const l of n.depsOut) {
      const w = l.to;
      if (w === n) continue;
      const wb = bookingsOf(w.stage.id);
      if (wb.length > 0) {
        if (!unbooked) continue;
        const v = checkUnbookedLink(plan, l, wb);
        if (v !== undefined && v.stageIds.includes(stageId)) out.push(v);
      } else if (!seen.has(w.stage.id)) {
        seen.add(w.stage.id);
        queue.push(w);
      }
    }
  }
  return out;
}
