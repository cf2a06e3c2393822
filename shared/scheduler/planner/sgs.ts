import type { PlanModel } from './model.js';

/**
 * Schedule generation on the quick model: the serial scheme (each activity of a list, in turn, at
 * its earliest start where its predecessors allow and enough units of each kind are free), and
 * forward–backward improvement (justification: every activity right as far as it goes in order of
 * latest finish, then left again in order of start; Valls, Ballestín and Quintanilla 2005, from
 * memory), which never lengthens any job.
 */

/** A schedule on the quick model: start per activity (grid units) and what it costs. */
export interface Schedule {
  start: Int32Array;
  cost: number[];
}

/** Counts the inner work done, so budgets are counted in work and every run is repeatable. */
export interface Work {
  done: number;
}

function earliestFit(m: PlanModel, free: Int32Array, j: number, t: number, work: Work): number {
  const d = m.dur[j] as number;
  const needs = m.needs[j] as [number, number][];
  if (d === 0 || needs.length === 0) return t;
  const H = m.horizon;
  for (;;) {
    if (t + d > H) return t; // past the model's horizon: nothing more to count
    let clash = -1;
    for (let x = t + d - 1; x >= t && clash < 0; x--) {
      for (const [k, c] of needs)
        if ((free[k * H + x] as number) < c) {
          clash = x;
          break;
        }
    }
    work.done += d;
    if (clash < 0) return t;
    t = clash + 1;
  }
}

function latestFit(m: PlanModel, free: Int32Array, j: number, t: number, lo: number, work: Work): number {
  const d = m.dur[j] as number;
  const needs = m.needs[j] as [number, number][];
  if (d === 0 || needs.length === 0) return t;
  const H = m.horizon;
  if (t + d > H) return lo; // the model cannot count out there; stay put
  for (;;) {
    if (t <= lo) return lo;
    let clash = -1;
    for (let x = t; x < t + d && clash < 0; x++) {
      for (const [k, c] of needs)
        if ((free[k * H + x] as number) < c) {
          clash = x;
          break;
        }
    }
    work.done += d;
    if (clash < 0) return t;
    t = clash - d;
  }
}

function take(m: PlanModel, free: Int32Array, j: number, t: number): void {
  const d = m.dur[j] as number,
    H = m.horizon;
  if (t + d > H) return;
  for (const [k, c] of m.needs[j] as [number, number][])
    for (let x = t; x < t + d; x++) free[k * H + x] = (free[k * H + x] as number) - c;
}

/**
 * What a schedule costs, in order: jobs past their promised date, total lateness, sum of job
 * finishes (grid units from now). Compared lexicographically by {@link compareCost}.
 */
export function scheduleCost(m: PlanModel, start: Int32Array): number[] {
  const finish = m.bookedFinish.slice();
  for (let j = 0; j < m.n; j++) {
    const f = (start[j] as number) + (m.dur[j] as number),
      g = m.job[j] as number;
    if (f > (finish[g] as number)) finish[g] = f;
  }
  let late = 0,
    lateness = 0,
    sum = 0;
  finish.forEach((f, g) => {
    const p = m.promised[g] as number;
    if (f > p) {
      late++;
      lateness += f - p;
    }
    sum += f;
  });
  return [late, lateness, sum];
}

/** Negative when `a` is the better cost. */
export function compareCost(a: readonly number[], b: readonly number[]): number {
  for (let i = 0; i < a.length; i++) if (a[i] !== b[i]) return (a[i] as number) - (b[i] as number);
  return 0;
}

/** Serial scheme over a precedence-feasible list. */
export function serialSchedule(m: PlanModel, list: readonly number[], work: Work): Int32Array {
  const free = m.avail.slice();
  const start = new Int32Array(m.n);
  for (const j of list) {
    let es = m.release[j] as number;
    for (const p of m.preds[j] as { from: number; delta: number }[])
      es = Math.max(es, (start[p.from] as number) + p.delta);
    const t = earliestFit(m, free, j, Math.max(0, es), work);
    start[j] = t;
    take(m, free, j, t);
  }
  return start;
}

function backwardPass(m: PlanModel, start: Int32Array, work: Work): Int32Array {
  const s = start.slice();
  const jobEnd = m.bookedFinish.map(() => 0);
  for (let j = 0; j < m.n; j++) {
    const g = m.job[j] as number;
    jobEnd[g] = Math.max(jobEnd[g] as number, (s[j] as number) + (m.dur[j] as number));
  }
  const ids = Array.from({ length: m.n }, (_, j) => j);
  ids.sort(
    (a, b) =>
      (s[b] as number) + (m.dur[b] as number) - ((s[a] as number) + (m.dur[a] as number)) ||
      (s[b] as number) - (s[a] as number) ||
      b - a,
  );
  const free = m.avail.slice();
  for (const j of ids) {
    let lim = (jobEnd[m.job[j] as number] as number) - (m.dur[j] as number);
    for (const q of m.succs[j] as { to: number; delta: number }[]) lim = Math.min(lim, (s[q.to] as number) - q.delta);
    const t = latestFit(m, free, j, Math.max(lim, s[j] as number), s[j] as number, work);
    s[j] = t;
    take(m, free, j, t);
  }
  return s;
}

function forwardPass(m: PlanModel, start: Int32Array, work: Work): Int32Array {
  const s = start.slice();
  const list = startOrder(m, s);
  const free = m.avail.slice();
  for (const j of list) {
    let es = m.release[j] as number;
    for (const p of m.preds[j] as { from: number; delta: number }[]) es = Math.max(es, (s[p.from] as number) + p.delta);
    const t = earliestFit(m, free, j, Math.max(0, Math.min(es, s[j] as number)), work);
    s[j] = Math.min(t, s[j] as number);
    take(m, free, j, s[j] as number);
  }
  return s;
}

/** Activities by start, ties in topological order: a list the serial scheme turns back into the same or a better schedule. */
export function startOrder(m: PlanModel, start: Int32Array): number[] {
  const rank = new Int32Array(m.n);
  m.topo.forEach((j, i) => {
    rank[j] = i;
  });
  return Array.from({ length: m.n }, (_, j) => j).sort(
    (a, b) => (start[a] as number) - (start[b] as number) || (rank[a] as number) - (rank[b] as number),
  );
}

/** Forward–backward improvement, repeated while it helps (at most `rounds` times). */
export function justify(m: PlanModel, start: Int32Array, work: Work, rounds = 4): Schedule {
  let best: Schedule = { start, cost: scheduleCost(m, start) };
  for (let r = 0; r < rounds; r++) {
    const next = forwardPass(m, backwardPass(m, best.start, work), work);
    const cost = scheduleCost(m, next);
    if (compareCost(cost, best.cost) >= 0) break;
    best = { start: next, cost };
  }
  return best;
}
