import { bookingsOfStage, stageCalendarOf, type BoardIndex } from '../board-index.js';
import { longestWorkingDayMinutes } from '../booking-step.js';
import { workingMinutesBetween, type CompiledCalendar } from '../calendar.js';
import { cureElapsedDays } from '../cure.js';
import type { Dependency, Stage } from '../types.js';

/**
 * The planner's quick model of the stages to place: a resource-constrained project on one time
 * axis (working minutes of one reference calendar from `now`, in grid units), with counts of
 * interchangeable resources per kind whose availability drops where existing bookings and gaps
 * between hire periods are. It is a model for ranking plans quickly; the engine then places the
 * best-ranked plans for real, checking every rule.
 */
export interface PlanModel {
  n: number;
  stages: Stage[];
  /** Job index of each activity. */
  job: Int32Array;
  jobIds: string[];
  /** Promised date per job on the axis (Infinity: none). */
  promised: number[];
  /** Finish of each job's booked stages on the axis (0: none). */
  bookedFinish: number[];
  dur: Int32Array;
  release: Int32Array;
  /** Start-to-start bounds: S[to] ≥ S[from] + delta. */
  preds: { from: number; delta: number }[][];
  succs: { to: number; delta: number }[][];
  /** Per activity, the (kind index, count) pairs it needs. */
  needs: [number, number][][];
  kinds: string[];
  /** Units of each kind available per grid slot before any planned stage: kind-major, `horizon` slots each. */
  avail: Int32Array;
  horizon: number;
  /** Minutes per grid unit. */
  unitMinutes: number;
  /** Activities in an order that respects every link (stages in cycles left out before). */
  topo: number[];
}

function gcd(a: number, b: number): number {
  a = Math.abs(Math.round(a));
  b = Math.abs(Math.round(b));
  while (b > 0) [a, b] = [b, a % b];
  return a;
}

const MAX_SLOTS = 60_000;

/** Minutes of a lag on the axis (elapsed time counted at the calendar's share of working time). */
function lagMinutes(dep: Dependency, dayMinutes: number, workShare: number): number {
  const a = dep.lag.amount;
  switch (dep.lag.unit) {
    case 'working_hours':
      return a * 60;
    case 'working_days':
      return a * dayMinutes;
    case 'elapsed_hours':
      return a * 60 * workShare;
    case 'elapsed_days':
      return a * 1440 * workShare;
  }
}

/**
 * Builds the quick model for the stages to place. `earliest` gives each stage's first possible
 * start as the engine works it out (now, booked predecessors, notice), as an instant.
 */
export function buildPlanModel(index: BoardIndex, stages: Stage[], earliest: (s: Stage) => number): PlanModel {
  const n = stages.length;
  const pos = new Map(stages.map((s, i) => [s.id, i]));
  const ref: CompiledCalendar = stageCalendarOf(index, stages[0]?.id ?? '', []);
  const dayMinutes = Math.max(1, longestWorkingDayMinutes(ref));
  const weekStart = index.now;
  const workShare = Math.max(1, workingMinutesBetween(ref, weekStart, weekStart + 7 * 86_400_000)) / (7 * 1440);
  const axis = (t: number): number => (t <= index.now ? 0 : workingMinutesBetween(ref, index.now, t));

  const kinds: string[] = [];
  const kindIx = new Map<string, number>();
  for (const s of stages)
    for (const r of s.requirements)
      if (!kindIx.has(r.kind)) {
        kindIx.set(r.kind, kinds.length);
        kinds.push(r.kind);
      }

  const releaseMin = stages.map((s) => axis(earliest(s)));
  const durMin = stages.map((s) => s.durationMinutes);
  const links: { from: number; to: number; deltaMin: number }[] = [];
  for (let j = 0; j < n; j++) {
    const s = stages[j] as Stage;
    for (const l of index.stages.get(s.id)?.depsIn ?? []) {
      const i = pos.get(l.from.stage.id);
      if (i === undefined || i === j) continue;
      const lag = lagMinutes(l.dep, dayMinutes, workShare);
      const cure =
        l.dep.waitsForCure === true && l.from.stage.cure ? cureElapsedDays(l.from.stage.cure) * 1440 * workShare : 0;
      const di = durMin[i] as number,
        dj = durMin[j] as number;
      const delta =
        l.dep.type === 'FS'
          ? di + Math.max(lag, cure)
          : l.dep.type === 'SS'
            ? lag
            : l.dep.type === 'FF'
              ? di - dj + lag
              : lag - dj;
      links.push({ from: i, to: j, deltaMin: delta });
    }
  }

  // Existing bookings and hire gaps, per kind, on the axis.
  const blocks: { k: number; from: number; to: number }[] = [];
  const capacity = new Array<number>(kinds.length).fill(0);
  kinds.forEach((kind, k) => {
    for (const r of index.resourcesByKind.get(kind) ?? []) {
      capacity[k] = (capacity[k] as number) + 1;
      for (const b of index.bookingsByResource.get(r.id)?.list ?? []) {
        if (b.end > index.now) blocks.push({ k, from: axis(b.start), to: axis(b.end) });
      }
      if (r.hired === true) {
        let t = 0;
        for (const p of index.hireByResource.get(r.id) ?? []) {
          const a = axis(p.onHire),
            z = axis(p.offHire);
          if (a > t) blocks.push({ k, from: t, to: a });
          t = Math.max(t, z);
        }
        blocks.push({ k, from: t, to: Number.POSITIVE_INFINITY });
      }
    }
  });

  let unit = index.stepMinutes;
  // Releases are rounded up to the grid rather than refining it: an odd minute must not make it fine.
  for (const x of [...durMin, ...links.map((l) => l.deltaMin)]) unit = gcd(unit, x);
  unit = Math.max(1, unit);
  const toUnits = (m: number): number => Math.ceil(m / unit - 1e-9);

  const jobIds: string[] = [];
  const jobIx = new Map<string, number>();
  const job = new Int32Array(n);
  stages.forEach((s, i) => {
    let j = jobIx.get(s.jobId);
    if (j === undefined) {
      j = jobIds.length;
      jobIx.set(s.jobId, j);
      jobIds.push(s.jobId);
    }
    job[i] = j;
  });
  const bookedFinishMin = jobIds.map(() => 0);
  for (const info of index.stageList) {
    const j = jobIx.get(info.stage.jobId);
    if (j === undefined) continue;
    for (const b of bookingsOfStage(index, info.stage.id))
      bookedFinishMin[j] = Math.max(bookedFinishMin[j] as number, axis(b.end));
  }
  const promisedMin = jobIds.map((id) => {
    const p = index.jobs.get(id)?.promisedBy;
    return p === undefined || p === null ? Number.POSITIVE_INFINITY : axis(p);
  });

  let lastBlock = 0;
  for (const b of blocks)
    if (Number.isFinite(b.to)) lastBlock = Math.max(lastBlock, b.to);
    else lastBlock = Math.max(lastBlock, b.from);
  const span =
    Math.max(0, ...releaseMin, lastBlock, ...bookedFinishMin) +
    durMin.reduce((a, b) => a + b, 0) +
    links.reduce((a, l) => a + Math.max(0, l.deltaMin), 0);
  // Coarsen the grid when the horizon would be too long to keep per-slot counts.
  while (toUnits(span) * Math.max(1, kinds.length) > MAX_SLOTS) unit *= 2;
  const horizon = toUnits(span) + 2;
  const avail = new Int32Array(horizon * kinds.length);
  kinds.forEach((_, k) => avail.fill(capacity[k] as number, k * horizon, (k + 1) * horizon));
  for (const b of blocks) {
    const a = Math.max(0, Math.floor(b.from / unit)),
      z = Math.min(horizon, Number.isFinite(b.to) ? toUnits(b.to) : horizon);
    for (let t = a; t < z; t++) avail[b.k * horizon + t] = Math.max(0, (avail[b.k * horizon + t] as number) - 1);
  }

  const preds: { from: number; delta: number }[][] = stages.map(() => []);
  const succs: { to: number; delta: number }[][] = stages.map(() => []);
  for (const l of links) {
    const delta = Math.sign(l.deltaMin) * toUnits(Math.abs(l.deltaMin));
    (preds[l.to] as { from: number; delta: number }[]).push({ from: l.from, delta });
    (succs[l.from] as { to: number; delta: number }[]).push({ to: l.to, delta });
  }
  const needs = stages.map((s) =>
    s.requirements.flatMap((r): [number, number][] => {
      const k = kindIx.get(r.kind) as number;
      const c = Math.min(r.count, capacity[k] as number);
      return c > 0 ? [[k, c]] : [];
    }),
  );

  // Topological order (Kahn, smallest index first for determinism).
  const indeg = preds.map((p) => p.length);
  const topo: number[] = [];
  const ready = indeg.flatMap((d, i) => (d === 0 ? [i] : []));
  while (ready.length > 0) {
    const i = ready.shift() as number;
    topo.push(i);
    for (const s of succs[i] as { to: number }[]) if (--(indeg[s.to] as number) === 0) ready.push(s.to);
  }
  for (let i = 0; i < n; i++) if (!topo.includes(i)) topo.push(i); // cannot happen without cycles; kept total

  return {
    n,
    stages,
    job,
    jobIds,
    dur: Int32Array.from(durMin, toUnits),
    release: Int32Array.from(releaseMin, toUnits),
    preds,
    succs,
    needs,
    kinds,
    avail,
    horizon,
    unitMinutes: unit,
    topo,
    promised: promisedMin.map((p) => (Number.isFinite(p) ? Math.floor(p / unit) : p)),
    bookedFinish: bookedFinishMin.map((m) => toUnits(m)),
  };
}
