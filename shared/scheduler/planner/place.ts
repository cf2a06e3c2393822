import {
  bookingsOfStage,
  compareBookings,
  resourceCalendarOf,
  spanEnd,
  spanStart,
  stageCalendarOf,
  type BoardIndex,
  type DepLink,
} from '../board-index.js';
import { bookableStart, mustFitInOneDay, roundDownToStep, roundUpToStep } from '../booking-step.js';
import {
  addWorkingMinutes,
  compileCalendar,
  isWorkingInstant,
  workingMinutesBetween,
  type CompiledCalendar,
} from '../calendar.js';
import { overlappingOnResource } from '../checks/clash.js';
import { idleHireDays } from '../checks/hire.js';
import { leadTimeEarliest } from '../checks/lead-time.js';
import { earliestStartFromPredecessors } from '../checks/order.js';
import { capitalise, makeViolation, resourceLabel, type BookingsOf } from '../checks/violation.js';
import { checkStageBookings } from '../check-move.js';
import { formatInstant } from '../format.js';
import { reverseLag } from '../lag.js';
import { movedBookings } from '../move.js';
import { laterCannotHelp, nextCandidate } from '../slot-finder.js';
import { DAY_MS } from '../time-zone.js';
import type { Booking, Instant, Resource, Stage, Violation } from '../types.js';
import type { PlacedStage, PlanCosts, UnplacedStage } from '../auto-place.js';

/**
 * Placing stages for real, one at a time, with the engine's own checks: the serial scheme the
 * single pass has always used, with the choice of the next stage (and, for the planner, a
 * preference for the crew a job already has) given by the caller. Bookings go into the index as
 * they are made, so later stages see them; `undo` takes them out again so the next candidate
 * plan starts from the same board.
 */

/** How the next stage is chosen among those whose predecessors all have bookings. */
export type Before = (a: Stage, b: Stage) => boolean;

/** A placement done on the index, to read and then undo. */
export interface Placement {
  bookings: Booking[];
  placed: PlacedStage[];
  unplaced: UnplacedStage[];
  order: string[];
  undo: () => void;
}

function insertBooking(index: BoardIndex, b: Booking): void {
  const info = index.stages.get(b.stageId);
  if (info !== undefined) info.bookings = [...info.bookings, b].sort((x, y) => (x.id < y.id ? -1 : 1));
  let rb = index.bookingsByResource.get(b.resourceId);
  if (rb === undefined) {
    rb = { list: [], maxLength: 0 };
    index.bookingsByResource.set(b.resourceId, rb);
  }
  const list = rb.list;
  let lo = 0,
    hi = list.length;
  while (lo < hi) {
    const mid = (lo + hi) >> 1;
    if (compareBookings(list[mid] as Booking, b) < 0) lo = mid + 1;
    else hi = mid;
  }
  list.splice(lo, 0, b);
  rb.maxLength = Math.max(rb.maxLength, b.end - b.start);
}

function removeBooking(index: BoardIndex, b: Booking): void {
  const info = index.stages.get(b.stageId);
  if (info !== undefined) info.bookings = info.bookings.filter((x) => x !== b);
  const rb = index.bookingsByResource.get(b.resourceId);
  if (rb !== undefined) {
    const i = rb.list.indexOf(b);
    if (i >= 0) rb.list.splice(i, 1);
    // maxLength stays: it only bounds a scan, a larger value is still correct.
  }
}

function candidatesFor(
  index: BoardIndex,
  kind: string,
  firmId: string | undefined,
  preferred: ReadonlySet<string> | undefined,
): Resource[] {
  // The job's own firm first, owned before hired, then by id: cheapest and closest first. The
  // planner puts a job's own crew of that kind before the rest, so a job keeps its people.
  return (index.resourcesByKind.get(kind) ?? [])
    .slice()
    .sort(
      (a, b) =>
        (preferred === undefined ? 0 : Number(!preferred.has(a.id)) - Number(!preferred.has(b.id))) ||
        Number(a.firmId !== firmId) - Number(b.firmId !== firmId) ||
        Number(a.hired === true) - Number(b.hired === true) ||
        (a.id < b.id ? -1 : 1),
    );
}

/** Tries every requirement at one start; returns the bookings or the refusals met. */
function tryAt(
  index: BoardIndex,
  stage: Stage,
  t: Instant,
  firmId: string,
  seq: { n: number },
  preferred: ReadonlySet<string> | undefined,
): { bookings: Booking[] | null; refusals: Violation[] } {
  const chosen: Booking[] = [];
  const refusals: Violation[] = [];
  for (const req of stage.requirements) {
    let got = 0;
    for (const r of candidatesFor(index, req.kind, index.jobs.get(stage.jobId)?.firmId, preferred)) {
      if (got >= req.count) break;
      if (chosen.some((b) => b.resourceId === r.id)) continue;
      const cal = resourceCalendarOf(index, r.id);
      // Cheap refusals first (not working, not on hire, already booked); the full check follows.
      if (!isWorkingInstant(cal, t)) continue;
      const end = addWorkingMinutes(cal, t, stage.durationMinutes);
      if (r.hired === true && !(index.hireByResource.get(r.id) ?? []).some((p) => p.onHire <= t && end <= p.offHire))
        continue;
      const busy = overlappingOnResource(index, r.id, t, end, stage.id);
      if (busy.length > 0) {
        const until = Math.max(...busy.map((o) => o.end));
        refusals.push(
          makeViolation(
            'clash',
            'error',
            [stage.id],
            [r.id],
            [],
            `${capitalise(resourceLabel(index, r.id))} is busy until ${formatInstant(until, cal.timeZone)}`,
            { to: until },
          ),
        );
        continue;
      }
      const b: Booking = {
        id: `auto:${stage.id}:${seq.n + chosen.length}`,
        stageId: stage.id,
        resourceId: r.id,
        start: t,
        end: end > t ? end : t + 60_000,
        state: 'pencilled',
        installerFirmId: firmId,
      };
      const trial = [...chosen, b];
      const errs = checkStageBookings(index, stage.id, trial, { errorsOnly: true }).filter(
        (v) => v.kind !== 'capacity',
      );
      if (errs.length === 0) {
        chosen.push(b);
        got++;
      } else refusals.push(...errs);
    }
    if (got < req.count) return { bookings: null, refusals };
  }
  const final = checkStageBookings(index, stage.id, chosen, { errorsOnly: true });
  return final.length === 0 ? { bookings: chosen, refusals: [] } : { bookings: null, refusals: final };
}

/**
 * The earliest start the engine allows a stage from now, its booked predecessors and its notice,
 * as the single pass works it out before looking for free resources.
 */
export function firstPossibleStart(index: BoardIndex, stage: Stage): Instant {
  const firmId = index.jobs.get(stage.jobId)?.firmId ?? '';
  const first = candidatesFor(index, stage.requirements[0]?.kind ?? '', firmId, undefined)[0];
  const bookingsOf: BookingsOf = (id) => bookingsOfStage(index, id);
  let t0 = index.now;
  if (first !== undefined) {
    const probe: Booking = {
      id: 'probe',
      stageId: stage.id,
      resourceId: first.id,
      start: t0,
      end: t0 + 1,
      state: 'pencilled',
      installerFirmId: firmId,
    };
    t0 = Math.max(
      t0,
      earliestStartFromPredecessors(index, stage.id, first.id, bookingsOf),
      leadTimeEarliest(index, probe),
    );
  }
  return t0;
}

/**
 * Places `stages` (all unbooked, with requirements, outside cycles) on the index with the serial
 * scheme: repeatedly the eligible stage that comes `before` the others, at the earliest start
 * where every requirement gets enough resources and no error check fails.
 */
export function placeStages(
  index: BoardIndex,
  stages: readonly Stage[],
  horizonDays: number,
  before: Before,
  options: { keepCrew?: boolean } = {},
): Placement {
  const horizon = horizonDays * DAY_MS;
  const pending = new Map(stages.map((s) => [s.id, s]));
  const out: Placement = {
    bookings: [],
    placed: [],
    unplaced: [],
    order: [],
    undo: () => {
      for (const b of out.bookings) removeBooking(index, b);
    },
  };
  const failed = new Set<string>();
  const late = new Map(stages.filter((s) => s.justInTime === true).map((s) => [s.id, s]));
  const booked = (id: string): boolean => bookingsOfStage(index, id).length > 0;
  const seq = { n: 0 };
  const crewOf = new Map<string, Set<string>>();
  if (options.keepCrew === true) {
    const jobs = new Set(stages.map((s) => s.jobId));
    for (const info of index.stageList) {
      if (!jobs.has(info.stage.jobId)) continue;
      for (const b of info.bookings) {
        const set = crewOf.get(info.stage.jobId) ?? new Set<string>();
        set.add(b.resourceId);
        crewOf.set(info.stage.jobId, set);
      }
    }
  }
  while (pending.size > 0) {
    let best: Stage | undefined;
    let blocked: { stage: Stage; reason: string } | undefined;
    for (const s of pending.values()) {
      const preds = index.stages.get(s.id)?.depsIn ?? [];
      const waiting = preds.find((l) => !booked(l.from.stage.id));
      if (waiting !== undefined) {
        const p = waiting.from.stage.id;
        if (!pending.has(p) && blocked === undefined) {
          const name = index.stages.get(p)?.stage.name ?? p;
          blocked = {
            stage: s,
            reason: failed.has(p)
              ? `It waits for '${name}', which couldn't be placed`
              : `It waits for '${name}', which has no booking`,
          };
        }
        continue;
      }
      if (best === undefined || before(s, best)) best = s;
    }
    if (best === undefined) {
      if (blocked === undefined) break;
      pending.delete(blocked.stage.id);
      failed.add(blocked.stage.id);
      out.unplaced.push({ stageId: blocked.stage.id, reason: blocked.reason });
      continue;
    }
    const stage = best;
    pending.delete(stage.id);
    out.order.push(stage.id);
    const firmId = index.jobs.get(stage.jobId)?.firmId ?? '';
    const cal = stageCalendarOf(index, stage.id, []);
    const t0 = firstPossibleStart(index, stage);
    // Starts a person would book: on the step, and within one working day when the stage must be.
    const fit = mustFitInOneDay(stage, cal) ? { fitMinutes: stage.durationMinutes } : {};
    const at = (x: Instant): Instant => bookableStart(cal, x, { stepMinutes: index.stepMinutes, ...fit });
    let t = at(t0);
    const limit = t + horizon;
    let placed: Booking[] | null = null;
    let lastRefusals: Violation[] = [];
    const preferred = options.keepCrew === true ? crewOf.get(stage.jobId) : undefined;
    while (t < limit) {
      const tried = tryAt(index, stage, t, firmId, seq, preferred);
      if (tried.bookings !== null) {
        placed = tried.bookings;
        break;
      }
      lastRefusals = tried.refusals;
      if (laterCannotHelp(stage.id, tried.refusals)) break;
      t = at(nextCandidate(cal, t, tried.refusals));
    }
    if (placed === null) {
      failed.add(stage.id);
      const why =
        lastRefusals[0]?.message ??
        `no ${stage.requirements.map((r) => r.kind.replace(/_/g, ' ')).join(' and ')} on the board`;
      out.unplaced.push({ stageId: stage.id, reason: `No slot within ${horizonDays} days; the last refusal: ${why}` });
      continue;
    }
    seq.n += placed.length;
    for (const b of placed) {
      insertBooking(index, b);
      out.bookings.push(b);
      if (options.keepCrew === true) {
        const set = crewOf.get(stage.jobId) ?? new Set<string>();
        set.add(b.resourceId);
        crewOf.set(stage.jobId, set);
      }
    }
    out.placed.push({
      stageId: stage.id,
      start: t,
      end: Math.max(...placed.map((b) => b.end)),
      resourceIds: placed.map((b) => b.resourceId),
    });
    // A stage wanted just in time goes as late as the stages after it allow as soon as they are
    // all placed: before anything after them is, so the one after it may still move later that
    // morning to have both on one day (togetherThatMorning).
    for (const l of index.stages.get(stage.id)?.depsIn ?? []) {
      const wanted = late.get(l.from.stage.id);
      if (wanted === undefined || !l.from.depsOut.every((o) => o.to.bookings.length > 0)) continue;
      late.delete(wanted.id);
      const k = out.placed.findIndex((x) => x.stageId === wanted.id);
      if (k >= 0) pullLater(index, wanted, k, out, seq);
    }
  }
  // Last, from the end back: those whose stages after them were not all placed.
  for (let k = out.placed.length - 1; k >= 0 && late.size > 0; k--) {
    const stage = late.get((out.placed[k] as PlacedStage).stageId);
    if (stage !== undefined) pullLater(index, stage, k, out, seq);
  }
  return out;
}

/**
 * Moves a just-in-time stage of a placement (the delivery) as late as the stages after it allow:
 * on the latest working day, as late in it as it fits, where it ends by the latest its links to
 * every stage after it allow (see latestEnd) and the engine's checks all pass; failing that on each
 * day back to where the serial scheme put it, it stays there. The stages after it must all be booked.
 */
function pullLater(index: BoardIndex, stage: Stage, k: number, out: Placement, seq: { n: number }): void {
  const p = out.placed[k] as PlacedStage;
  const links = index.stages.get(stage.id)?.depsOut ?? [];
  if (links.length === 0 || links.some((l) => l.to.bookings.length === 0)) return;
  const cal = compileCalendar(stageCalendarOf(index, stage.id, []));
  const deadline = latestEnd(index, links, cal, stage.durationMinutes);
  if (deadline <= p.end) return;
  const old = out.bookings.filter((b) => b.stageId === stage.id);
  for (const b of old) removeBooking(index, b);
  const firmId = index.jobs.get(stage.jobId)?.firmId ?? '';
  if (togetherThatMorning(index, stage, k, out, seq, old, deadline, cal, firmId)) return;
  for (let day = cal.dayOf(deadline - 1); day >= cal.dayOf(p.start); day--) {
    const ivs = cal.dayIntervals(day);
    if (ivs.length === 0) continue;
    const latestEnd = Math.min(deadline, ivs[ivs.length - 1] as number);
    const t = roundDownToStep(
      addWorkingMinutes(cal, latestEnd, -stage.durationMinutes),
      cal.timeZone,
      index.stepMinutes,
    );
    if (t <= p.start) break;
    const tried = tryAt(index, stage, t, firmId, seq, undefined);
    if (tried.bookings === null) continue;
    if (tried.bookings.length !== old.length) continue;
    takePlaces(index, out, k, stage.id, t, old, tried.bookings);
    return;
  }
  for (const b of old) insertBooking(index, b);
}

/**
 * The latest a stage may end and still keep its links to the stages after it (all booked): a link
 * counts from the stage's finish (finish to start, finish to finish) or its start (start to start,
 * start to finish, the end then its duration later), to the next stage's start or finish, less the
 * link's gap counted on that stage's calendar, as the order check counts it. A gap counted back
 * from a working day's start can come out a little early; the engine's checks at each try decide.
 */
function latestEnd(index: BoardIndex, links: readonly DepLink[], cal: CompiledCalendar, minutes: number): Instant {
  let deadline = Number.POSITIVE_INFINITY;
  for (const l of links) {
    const { dep, to } = l;
    const subject = dep.type === 'FS' || dep.type === 'SS' ? spanStart(to.bookings) : spanEnd(to.bookings);
    const anchor =
      dep.lag.amount === 0 ? subject : reverseLag(stageCalendarOf(index, to.stage.id, to.bookings), subject, dep.lag);
    const end = dep.type === 'FS' || dep.type === 'FF' ? anchor : addWorkingMinutes(cal, anchor, minutes);
    deadline = Math.min(deadline, end);
  }
  return deadline;
}

/**
 * The delivery and the lift on one morning ("delivery and lift day: lorry, crane and crew on site
 * together"): where the one stage after the just-in-time stage starts as its working day begins,
 * so no room is left before it that day, and was placed in this same run, it moves later that
 * day by the just-in-time stage's length and the just-in-time stage goes first, from the start of
 * the day. Both must pass every engine check where they land (the stage after it with its own
 * successors, resources and hire); otherwise both stay as they were and the caller tries the
 * days before. The just-in-time stage's bookings are out of the index when this is called.
 */
function togetherThatMorning(
  index: BoardIndex,
  stage: Stage,
  k: number,
  out: Placement,
  seq: { n: number },
  old: readonly Booking[],
  deadline: Instant,
  cal: CompiledCalendar,
  firmId: string,
): boolean {
  const links = index.stages.get(stage.id)?.depsOut ?? [];
  const link = links[0];
  if (links.length !== 1 || link === undefined || link.dep.type !== 'FS' || link.dep.lag.amount !== 0) return false;
  const next = link.to.stage;
  const kNext = out.placed.findIndex((x) => x.stageId === next.id);
  if (kNext < 0) return false;
  const ivs = cal.dayIntervals(cal.dayOf(deadline));
  const dayStart = ivs[0];
  // Room before it on its day already: the latest-slot search finds it.
  if (
    dayStart === undefined ||
    deadline < dayStart ||
    workingMinutesBetween(cal, dayStart, deadline) >= stage.durationMinutes
  )
    return false;
  const start = roundUpToStep(dayStart, cal.timeZone, index.stepMinutes);
  const nextStart = roundUpToStep(
    addWorkingMinutes(cal, start, stage.durationMinutes),
    cal.timeZone,
    index.stepMinutes,
  );
  const was = out.bookings.filter((b) => b.stageId === next.id);
  const moved = movedBookings(index, { stageId: next.id, start: nextStart });
  if (checkStageBookings(index, next.id, moved, { errorsOnly: true }).length > 0) return false;
  for (const b of was) removeBooking(index, b);
  for (const b of moved) insertBooking(index, b);
  const tried = tryAt(index, stage, start, firmId, seq, undefined);
  if (tried.bookings === null || tried.bookings.length !== old.length) {
    for (const b of moved) removeBooking(index, b);
    for (const b of was) insertBooking(index, b);
    return false;
  }
  for (const b of moved) out.bookings[out.bookings.findIndex((x) => x.id === b.id)] = b;
  out.placed[kNext] = {
    ...(out.placed[kNext] as PlacedStage),
    start: nextStart,
    end: Math.max(...moved.map((b) => b.end)),
  };
  takePlaces(index, out, k, stage.id, start, old, tried.bookings);
  return true;
}

/**
 * A stage's new bookings into the index and the placement, in its old bookings' places and under
 * their ids (the placement's order of bookings stands), and its place at `start`.
 */
function takePlaces(
  index: BoardIndex,
  out: Placement,
  k: number,
  stageId: string,
  start: Instant,
  old: readonly Booking[],
  bookings: Booking[],
): void {
  bookings.forEach((b, i) => {
    const was = old[i] as Booking;
    b.id = was.id;
    out.bookings[out.bookings.indexOf(was)] = b;
    insertBooking(index, b);
  });
  out.placed[k] = {
    stageId,
    start,
    end: Math.max(...bookings.map((b) => b.end)),
    resourceIds: bookings.map((b) => b.resourceId),
  };
}

/**
 * What a placement costs, read while its bookings are in the index: stages left unplaced, jobs
 * past their promised date and by how much, each job's finish from now, idle paid hire on the
 * machines of the kinds placed, and changes of crew within a job (a job whose stages of one crew
 * kind use two crews counts one change).
 */
export function planCosts(index: BoardIndex, stages: readonly Stage[], unplaced: number): PlanCosts {
  const jobIds = new Set(stages.map((s) => s.jobId));
  const finish = new Map<string, number>();
  const crews = new Map<string, Set<string>>();
  for (const info of index.stageList) {
    const jobId = info.stage.jobId;
    if (!jobIds.has(jobId)) continue;
    for (const b of info.bookings) {
      finish.set(jobId, Math.max(finish.get(jobId) ?? Number.NEGATIVE_INFINITY, b.end));
      const r = index.resources.get(b.resourceId);
      if (r !== undefined && (r.category === 'crew' || r.category === 'person')) {
        const key = `${jobId}\u0000${r.kind}`;
        const set = crews.get(key) ?? new Set<string>();
        set.add(r.id);
        crews.set(key, set);
      }
    }
  }
  let lateJobs = 0,
    latenessMinutes = 0,
    finishMinutes = 0;
  for (const [jobId, f] of finish) {
    finishMinutes += Math.max(0, Math.round((f - index.now) / 60_000));
    const p = index.jobs.get(jobId)?.promisedBy;
    if (p !== undefined && p !== null && f > p) {
      lateJobs++;
      latenessMinutes += Math.round((f - p) / 60_000);
    }
  }
  const kinds = new Set(stages.flatMap((s) => s.requirements.map((r) => r.kind)));
  let idleHirePence = 0;
  for (const p of index.board.hirePeriods) {
    if (kinds.has(index.resources.get(p.resourceId)?.kind ?? '')) idleHirePence += idleHireDays(index, p).costPence;
  }
  let crewChanges = 0;
  for (const set of crews.values()) crewChanges += set.size - 1;
  return { unplacedStages: unplaced, lateJobs, latenessMinutes, finishMinutes, idleHirePence, crewChanges };
}

/**
 * How many of the jobs in `keep` the placement (its bookings in the index) finishes later than
 * `keep` says, and by how many minutes in all.
 */
export function laterThanKept(
  index: BoardIndex,
  stages: readonly Stage[],
  keep: Readonly<Record<string, Instant>>,
): [number, number] {
  const jobIds = new Set(stages.map((s) => s.jobId));
  const finish = new Map<string, number>();
  for (const info of index.stageList) {
    const jobId = info.stage.jobId;
    if (!jobIds.has(jobId) || keep[jobId] === undefined) continue;
    for (const b of info.bookings) finish.set(jobId, Math.max(finish.get(jobId) ?? Number.NEGATIVE_INFINITY, b.end));
  }
  let jobs = 0,
    minutes = 0;
  for (const [jobId, f] of finish) {
    const kept = keep[jobId] as Instant;
    if (f > kept) {
      jobs++;
      minutes += Math.round((f - kept) / 60_000);
    }
  }
  return [jobs, minutes];
}

/** Negative when `a` is the better plan: fewer unplaced stages, then the order of {@link PlanCosts}. */
export function comparePlanCosts(a: PlanCosts, b: PlanCosts): number {
  return (
    a.unplacedStages - b.unplacedStages ||
    a.lateJobs - b.lateJobs ||
    a.latenessMinutes - b.latenessMinutes ||
    a.finishMinutes - b.finishMinutes ||
    a.idleHirePence - b.idleHirePence ||
    a.crewChanges - b.crewChanges
  );
}
