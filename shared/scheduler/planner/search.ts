import type { PlanModel } from './model.js';
import { compareCost, justify, scheduleCost, serialSchedule, startOrder, type Schedule, type Work } from './sgs.js';

/**
 * The search over activity lists on the quick model: priority rules (latest finish, latest start,
 * most successors, greatest rank weight, least float), regret-biased random sampling on latest
 * finish (Drexl 1991, from memory), then a genetic search over activity lists (two-point
 * crossover, swap mutation: Hartmann 1998, from memory) where every child is justified forward and
 * backward and keeps the list of its improved schedule. Everything is counted in work units and
 * drawn from a seeded generator, so one seed and one budget give one answer.
 */

/** A small, fast seeded generator (mulberry32). */
export function seededRandom(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

/** What the search reports while it runs. */
export interface SearchProgress {
  /** Schedules generated so far. */
  schedules: number;
  /** Share of the budget used, 0–1. */
  used: number;
  /** The best plan's cost on the quick model: [late jobs, lateness, sum of finishes] in grid units. */
  best: number[];
}

/** Options for {@link searchPlans}. */
export interface SearchOptions {
  seed: number;
  /** Work units to spend (see {@link WORK_PER_MS}). */
  workLimit: number;
  /** Lists tried first (the engine's own order among them). */
  seedLists?: number[][];
  onProgress?: (p: SearchProgress) => void;
}

/** A plan the search found: its list (start order) and its schedule. */
export interface Candidate extends Schedule {
  list: number[];
  key: string;
}

/**
 * Work units per millisecond of budget, measured on the development machine (two shared cores,
 * CPU time) on the 30-activity benchmark: about 40,000 a CPU millisecond, of which some 60 % go to
 * the search and the rest is left for the single pass and for placing the plans for real. The
 * budget is counted in work, never on a clock, so a run is repeatable on any machine.
 */
export const WORK_PER_MS = 25_000;

interface Times {
  es: Int32Array;
  lf: Int32Array;
}

function timesOf(m: PlanModel): Times {
  const es = new Int32Array(m.n);
  for (const j of m.topo) {
    let t = m.release[j] as number;
    for (const p of m.preds[j] as { from: number; delta: number }[]) t = Math.max(t, (es[p.from] as number) + p.delta);
    es[j] = t;
  }
  const jobEnd = m.bookedFinish.slice();
  for (let j = 0; j < m.n; j++)
    jobEnd[m.job[j] as number] = Math.max(
      jobEnd[m.job[j] as number] as number,
      (es[j] as number) + (m.dur[j] as number),
    );
  const lf = new Int32Array(m.n);
  for (let i = m.topo.length - 1; i >= 0; i--) {
    const j = m.topo[i] as number;
    const g = m.job[j] as number;
    let t = Math.min(jobEnd[g] as number, Math.max(m.promised[g] as number, (es[j] as number) + (m.dur[j] as number)));
    for (const q of m.succs[j] as { to: number; delta: number }[])
      t = Math.min(t, (lf[q.to] as number) - (m.dur[q.to] as number) - q.delta + (m.dur[j] as number));
    lf[j] = t;
  }
  return { es, lf };
}

/** A precedence-feasible list: at each step the eligible activity with the least priority value (ties by index), or one drawn by regret. */
function listBy(m: PlanModel, prio: ArrayLike<number>, rnd?: () => number, alpha = 1): number[] {
  const left = new Int32Array(m.n);
  for (let j = 0; j < m.n; j++) left[j] = (m.preds[j] as unknown[]).length;
  const eligible: number[] = [];
  for (let j = 0; j < m.n; j++) if (left[j] === 0) eligible.push(j);
  const list: number[] = [];
  while (eligible.length > 0) {
    let pick = 0;
    if (rnd === undefined) {
      for (let i = 1; i < eligible.length; i++) {
        const a = eligible[i] as number,
          b = eligible[pick] as number;
        if ((prio[a] as number) < (prio[b] as number) || ((prio[a] as number) === (prio[b] as number) && a < b))
          pick = i;
      }
    } else {
      let worst = Number.NEGATIVE_INFINITY;
      for (const j of eligible) worst = Math.max(worst, prio[j] as number);
      let total = 0;
      const w = eligible.map((j) => {
        const x = (worst - (prio[j] as number) + 1) ** alpha;
        total += x;
        return x;
      });
      let r = rnd() * total;
      pick = w.length - 1;
      for (let i = 0; i < w.length; i++) {
        r -= w[i] as number;
        if (r < 0) {
          pick = i;
          break;
        }
      }
    }
    const j = eligible[pick] as number;
    eligible.splice(pick, 1);
    list.push(j);
    for (const q of m.succs[j] as { to: number }[]) if (--(left[q.to] as number) === 0) eligible.push(q.to);
  }
  return list;
}

/** Two-point crossover of activity lists; keeps precedence when both parents do. */
function crossover(mother: number[], father: number[], q1: number, q2: number): number[] {
  const n = mother.length;
  const taken = new Uint8Array(n);
  const child: number[] = [];
  for (let i = 0; i < q1; i++) {
    const j = mother[i] as number;
    child.push(j);
    taken[j] = 1;
  }
  for (const j of father) {
    if (child.length >= q2) break;
    if (taken[j] === 0) {
      child.push(j);
      taken[j] = 1;
    }
  }
  for (const j of mother)
    if (taken[j] === 0) {
      child.push(j);
      taken[j] = 1;
    }
  return child;
}

function linked(m: PlanModel): (a: number, b: number) => boolean {
  const set = new Set<number>();
  m.succs.forEach((qs, j) => {
    for (const q of qs) {
      set.add(j * m.n + q.to);
      set.add(q.to * m.n + j);
    }
  });
  return (a, b) => set.has(a * m.n + b);
}

function key(s: Int32Array): string {
  return s.join(',');
}

/**
 * A lower bound on the cost: every activity at its earliest start without resource limits.
 * A plan that reaches it cannot be beaten, so the search stops there.
 */
export function costBound(m: PlanModel): number[] {
  return scheduleCost(m, timesOf(m).es);
}

/** Runs the search; returns the best plans found, best first (at most `keep`). */
export function searchPlans(m: PlanModel, options: SearchOptions, keep = 3): Candidate[] {
  const work: Work = { done: 0 };
  const rnd = seededRandom(options.seed);
  const bound = costBound(m);
  const pool: Candidate[] = [];
  const seen = new Set<string>();
  let schedules = 0;
  let lastGain = 0;
  // A small problem is searched out long before a big budget is spent: stop when nothing better has
  // turned up for a while (common practice, no source).
  const stall = Math.max(100, 20 * m.n);
  const report = (): void =>
    options.onProgress?.({
      schedules,
      used: Math.min(1, work.done / Math.max(1, options.workLimit)),
      best: (pool[0]?.cost ?? []).slice(),
    });
  const consider = (list: number[]): Candidate => {
    schedules++;
    const improved = justify(m, serialSchedule(m, list, work), work);
    const k = key(improved.start);
    const c: Candidate = { ...improved, list: startOrder(m, improved.start), key: k };
    if (!seen.has(k)) {
      seen.add(k);
      // Only the best few distinct plans are kept for the engine to place.
      if (pool[0] === undefined || compareCost(c.cost, pool[0].cost) < 0) lastGain = schedules;
      if (pool.length < keep || compareCost(c.cost, (pool[pool.length - 1] as Candidate).cost) < 0) {
        pool.push(c);
        pool.sort((a, b) => compareCost(a.cost, b.cost));
        if (pool.length > keep) pool.pop();
      }
    }
    return c;
  };
  const done = (): boolean =>
    work.done >= options.workLimit ||
    schedules - lastGain > stall ||
    (pool[0] !== undefined && compareCost(pool[0].cost, bound) <= 0);

  const { es, lf } = timesOf(m);
  const ls = Int32Array.from(lf, (f, j) => f - (m.dur[j] as number));
  const slack = Int32Array.from(ls, (s, j) => s - (es[j] as number));
  // Most successors (all of them, counted once each) and greatest rank positional weight.
  const all = new Int32Array(m.n);
  const weight = new Int32Array(m.n);
  const reach: Set<number>[] = m.stages.map(() => new Set<number>());
  for (let i = m.topo.length - 1; i >= 0; i--) {
    const j = m.topo[i] as number;
    const r = reach[j] as Set<number>;
    for (const q of m.succs[j] as { to: number }[]) {
      r.add(q.to);
      if (m.n <= 400) for (const x of reach[q.to] as Set<number>) r.add(x);
    }
    all[j] = -r.size;
    weight[j] = -(
      (m.dur[j] as number) + (m.succs[j] as { to: number }[]).reduce((a, q) => a + (m.dur[q.to] as number), 0)
    );
  }
  const seedPop: Candidate[] = [];
  for (const l of options.seedLists ?? []) {
    // A partial list (stages the engine could not place are missing) is completed in link order.
    const rank = new Float64Array(m.n).fill(Number.POSITIVE_INFINITY);
    l.forEach((j, i) => {
      rank[j] = i;
    });
    seedPop.push(consider(listBy(m, rank)));
    if (done()) break;
  }
  for (const prio of [lf, ls, slack, all, weight]) {
    if (done()) break;
    seedPop.push(consider(listBy(m, prio)));
  }
  report();
  const popSize = Math.max(8, Math.min(40, 2 * m.n));
  while (!done() && seedPop.length < popSize) seedPop.push(consider(listBy(m, lf, rnd, 1 + rnd())));
  report();
  if (m.n < 2) return pool.slice(0, keep);
  const adjacent = linked(m);
  const population = [...seedPop].sort((a, b) => compareCost(a.cost, b.cost));
  let round = 0;
  while (!done()) {
    const pick = (): Candidate => {
      const a = population[Math.floor(rnd() * population.length)] as Candidate,
        b = population[Math.floor(rnd() * population.length)] as Candidate;
      return compareCost(a.cost, b.cost) <= 0 ? a : b;
    };
    const mother = pick(),
      father = pick();
    const q1 = Math.floor(rnd() * m.n),
      q2 = q1 + Math.floor(rnd() * (m.n - q1 + 1));
    const child = crossover(mother.list, father.list, q1, q2);
    for (let i = 0; i + 1 < child.length; i++) {
      if (rnd() < 0.05 && !adjacent(child[i] as number, child[i + 1] as number)) {
        const x = child[i] as number;
        child[i] = child[i + 1] as number;
        child[i + 1] = x;
      }
    }
    // Now and then a fresh sample keeps the population from closing in on one plan.
    const c = rnd() < 0.1 ? consider(listBy(m, lf, rnd, 1 + 2 * rnd())) : consider(child);
    // Steady state: the child takes the worst one's place when it is better and not already there.
    const worst = population[population.length - 1] as Candidate;
    if (compareCost(c.cost, worst.cost) < 0 && !population.some((p) => p.key === c.key)) {
      population[population.length - 1] = c;
      population.sort((a, b) => compareCost(a.cost, b.cost));
    }
    if (++round % 50 === 0) report();
  }
  report();
  return pool.slice(0, keep);
}
