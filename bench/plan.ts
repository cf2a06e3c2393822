// The planner on the PSPLIB j30 set (Kolisch & Sprecher, "PSPLIB — A project scheduling problem
// library", EJOR 96 (1996) 205–216; instances and optima in bench/psplib/j30) and on larger
// generated instances (bench/psplib/generate.ts). Each instance becomes a board (bench/psplib/
// psplib.ts), autoPlace plans it, and an independent check (precedence, durations, capacity per
// hour; not the engine) confirms the plan before it is scored.
//   npm run bench:plan [-- --limit N] [--budget MS] [--large-budget MS] [--no-replan]
// Then the demo board re-planned at once (bench/replan.ts; needs PostgreSQL, else says it skipped).
import { readFileSync } from 'node:fs';
import { autoPlace } from '../shared/scheduler/index.js';
import {
  checkPsplibPlan,
  criticalPathBound,
  parseSm,
  psplibBoard,
  PSPLIB_NOW,
  type PsplibInstance,
} from './psplib/psplib.js';
import { generateSm } from './psplib/generate.js';
import { replanDemo } from './replan.js';

function arg(name: string, fallback: number): number {
  const i = process.argv.indexOf(`--${name}`);
  if (i < 0) return fallback;
  const v = Number(process.argv[i + 1]);
  if (!Number.isFinite(v) || v < 0) throw new Error(`--${name} needs a number`);
  return v;
}
const limit = arg('limit', Number.POSITIVE_INFINITY);
const budget = arg('budget', 300);
const largeBudget = arg('large-budget', 2000);
const cpuMs = (): number => {
  const u = process.cpuUsage();
  return (u.user + u.system) / 1000;
};

interface Run {
  makespan: number;
  wallMs: number;
  cpuMs: number;
  baseline: number;
}

function run(inst: PsplibInstance, name: string, budgetMs: number): Run {
  const board = psplibBoard(inst);
  const single = autoPlace(board, { now: PSPLIB_NOW, budgetMs: 0 });
  const baseline = checkPsplibPlan(inst, single.bookings);
  const w0 = performance.now(),
    c0 = cpuMs();
  const r = autoPlace(board, { now: PSPLIB_NOW, budgetMs, seed: 1 });
  const wallMs = performance.now() - w0,
    cpu = cpuMs() - c0;
  const check = checkPsplibPlan(inst, r.bookings);
  if (check.problems.length > 0 || r.unplaced.length > 0) {
    throw new Error(
      `${name}: the plan is not feasible: ${[...check.problems, ...r.unplaced.map((u) => u.reason)].slice(0, 5).join('; ')}`,
    );
  }
  return { makespan: check.makespan, wallMs, cpuMs: cpu, baseline: baseline.makespan };
}

const pct = (x: number, ref: number): number => (100 * (x - ref)) / ref;
const mean = (xs: number[]): number => xs.reduce((a, b) => a + b, 0) / Math.max(1, xs.length);
const median = (xs: number[]): number => {
  const s = xs.slice().sort((a, b) => a - b);
  return s[Math.floor(s.length / 2)] ?? 0;
};
const f = (x: number, d = 2): string => x.toFixed(d);

const dir = new URL('./psplib/j30/', import.meta.url);
const optima = readFileSync(new URL('optimum.csv', dir), 'utf8')
  .trim()
  .split(/\r?\n/)
  .slice(1)
  .map((l) => l.split(',') as [string, string]);
const chosen = optima.slice(0, Math.min(optima.length, limit));
const gaps: number[] = [],
  baseGaps: number[] = [],
  walls: number[] = [],
  cpus: number[] = [];
let atOptimum = 0;
for (const [file, opt] of chosen) {
  const r = run(parseSm(readFileSync(new URL(file, dir), 'utf8')), file, budget);
  const g = pct(r.makespan, Number(opt));
  if (g < -1e-9)
    throw new Error(`${file}: makespan ${r.makespan} is below the proven optimum ${opt}: the check is wrong`);
  gaps.push(g);
  baseGaps.push(pct(r.baseline, Number(opt)));
  walls.push(r.wallMs);
  cpus.push(r.cpuMs);
  if (g < 1e-9) atOptimum++;
}
console.log(
  `PSPLIB j30, ${chosen.length} instances, budget ${budget} ms (every plan checked: precedence, durations, capacity per hour)`,
);
console.log(
  `  planner:     ${f(mean(gaps))} % above optimum on average, worst ${f(Math.max(...gaps), 1)} %, ${atOptimum} at the optimum`,
);
console.log(
  `  single pass: ${f(mean(baseGaps))} % above optimum on average, worst ${f(Math.max(...baseGaps), 1)} %, ${baseGaps.filter((g) => g < 1e-9).length} at the optimum`,
);
console.log(
  `  time per instance: wall median ${f(median(walls), 0)} ms, mean ${f(mean(walls), 0)} ms, max ${f(Math.max(...walls), 0)} ms; CPU median ${f(median(cpus), 0)} ms, mean ${f(mean(cpus), 0)} ms`,
);

for (const n of [60, 120]) {
  const count = Math.min(5, limit);
  const g: number[] = [],
    b: number[] = [],
    w: number[] = [],
    c: number[] = [];
  for (let i = 0; i < count; i++) {
    const inst = parseSm(generateSm(n, 1000 * n + i));
    const lb = criticalPathBound(inst);
    const r = run(inst, `generated ${n}/${i}`, largeBudget);
    g.push(pct(r.makespan, lb));
    b.push(pct(r.baseline, lb));
    w.push(r.wallMs);
    c.push(r.cpuMs);
  }
  console.log(
    `Generated, ${n} activities, ${count} instances, budget ${largeBudget} ms: ${f(mean(g))} % above the critical-path bound ` +
      `(single pass ${f(mean(b))} %); wall mean ${f(mean(w), 0)} ms, CPU mean ${f(mean(c), 0)} ms`,
  );
}

if (!process.argv.includes('--no-replan')) await replanDemo(2000);
