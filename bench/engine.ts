// Engine benchmark: `npm run bench:engine` (not a test). Prints a compact table.
// Wall-clock times from performance.now(); the machine's load average is printed beside them,
// because other work on the same 2 cores moves the medians a lot.
import { loadavg } from 'node:os';
import { runInNewContext } from 'node:vm';
import { setFlagsFromString } from 'node:v8';
import {
  analyseBoard,
  autoPlace,
  checkMove,
  createBoardIndex,
  findSlots,
  overlappingPairs,
  type Board,
  type Booking,
  type StageMove,
} from '../shared/scheduler/index.js';
import { BENCH_NOW, generateBoard, prng } from './generate.js';
import { calendarInput, calendarPass, copyResult, floorInput, floorPass } from './floor.js';

interface Stats {
  median: number;
  p95: number;
  cpuMedian: number;
}

function quantile(samples: number[], q: number): number {
  const s = samples.slice().sort((a, b) => a - b);
  return s[Math.min(s.length - 1, Math.floor(q * s.length))] as number;
}

/** Wall-clock median and p95, and the median process CPU time (user + system) of each run. */
function time(runs: number, fn: (i: number) => void): Stats {
  const wall: number[] = [],
    cpu: number[] = [];
  for (let i = 0; i < runs; i++) {
    const c = process.cpuUsage();
    const t = performance.now();
    fn(i);
    wall.push(performance.now() - t);
    const d = process.cpuUsage(c);
    cpu.push((d.user + d.system) / 1000);
  }
  return { median: quantile(wall, 0.5), p95: quantile(wall, 0.95), cpuMedian: quantile(cpu, 0.5) };
}

/** The baseline: compare every booking with every other. */
function pairwiseClashes(bookings: readonly Booking[]): number {
  let n = 0;
  const active = bookings.filter((b) => b.state !== 'declined');
  for (let i = 0; i < active.length; i++) {
    const a = active[i] as Booking;
    for (let j = i + 1; j < active.length; j++) {
      const b = active[j] as Booking;
      if (a.resourceId === b.resourceId && a.start < b.end && b.start < a.end) n++;
    }
  }
  return n;
}

// A forced collection before reading the heap, so the figure is what stays alive (board, index,
// one analysis), not garbage waiting for the next scavenge. Benchmark only.
setFlagsFromString('--expose-gc');
const gc = runInNewContext('gc') as () => void;

const rows: string[][] = [];
const loadAtStart = loadavg()[0] ?? 0;
const ms = (x: number) => x.toFixed(x < 1 ? 3 : 1);

for (const [jobs, resources, runs] of [
  [200, 200, 30],
  [2000, 2000, 21],
] as const) {
  const { board, unbookedJobIds } = generateBoard(jobs, resources);
  const n = board.stages.length;
  const label = `${n.toLocaleString('en-GB')} stages / ${resources.toLocaleString('en-GB')} res`;
  // Warm up (JIT; holiday tables and zone offsets are module caches, calendar day caches live on
  // the calendar objects, as they would between requests on the server).
  const first = analyseBoard(board, { now: BENCH_NOW });
  analyseBoard(board, { now: BENCH_NOW });
  analyseBoard(board, { now: BENCH_NOW });
  const full = time(runs, () => analyseBoard(board, { now: BENCH_NOW }));
  // The floor, over exactly this board's stages, dependencies and bookings.
  const input = floorInput(board);
  let floorOverlaps = 0;
  for (let i = 0; i < 5; i++) floorPass(input);
  const floor = time(runs * 3, () => {
    floorOverlaps = floorPass(input).overlaps;
  });
  const floorRead = time(runs * 3, () => floorPass(floorInput(board)));
  // The result's own objects, copied (its words reused): what any engine answering in them pays.
  const shape = time(runs, () => copyResult(first));
  // The calendar arithmetic alone: what any engine answering in working time spends on calendars.
  const calendars = calendarInput(board, BENCH_NOW);
  let calendarSum = 0;
  const calendarWork = time(runs, () => {
    calendarSum += calendarPass(calendars);
  });
  if (Number.isNaN(calendarSum)) throw new Error('the calendar pass gave no number');
  const checksOnly = time(runs, () => analyseBoard(board, { now: BENCH_NOW, skipCriticalPath: true }));
  // The generator books stages back to back whatever the hour, so many short stages run over a
  // night and are now reported as split. The same board with every stage allowed to continue next
  // day reports what it did before the one-day rule: the cost of the checks themselves.
  const overnight = { ...board, stages: board.stages.map((s) => ({ ...s, mayContinueNextDay: true })) };
  const withoutSplits = analyseBoard(overnight, { now: BENCH_NOW, skipCriticalPath: true }).violations.length;
  const fullNoSplit = time(runs, () => analyseBoard(overnight, { now: BENCH_NOW }));
  const checksNoSplit = time(runs, () => analyseBoard(overnight, { now: BENCH_NOW, skipCriticalPath: true }));
  const splitCount = first.violations.filter((v) => v.kind === 'split').length;
  const unbookedCount = first.violations.filter((v) => v.kind === 'unbooked_predecessor').length;
  const index = createBoardIndex(board, { now: BENCH_NOW });
  const rnd = prng(7);
  const booked = board.bookings.filter((b) => b.state !== 'declined');
  const moves: StageMove[] = Array.from({ length: 5000 }, () => {
    const b = booked[Math.floor(rnd() * booked.length)] as Booking;
    return {
      stageId: b.stageId,
      start: b.start + (Math.floor(rnd() * 21) - 10) * 86_400_000 + Math.floor(rnd() * 8) * 3_600_000,
    };
  });
  for (const m of moves.slice(0, 500)) checkMove(index, m);
  const move = time(moves.length, (i) => checkMove(index, moves[i] as StageMove));
  const slotStages = board.stages.filter((s) => s.kind === 'lift').slice(0, 50);
  const slot = time(slotStages.length, (i) => {
    const s = slotStages[i % slotStages.length];
    if (s)
      findSlots(
        index,
        { stageId: s.id, resourceKind: 'crane', earliest: BENCH_NOW },
        { alternatives: 3, horizonDays: 60 },
      );
  });
  const placeRuns = jobs >= 2000 ? 3 : 5;
  let placed = 0,
    unplaced = 0;
  const place = time(placeRuns, () => {
    // The single pass (budget 0): the search's budget is its own figure, measured by bench:plan.
    const r = autoPlace(board, { now: BENCH_NOW, jobIds: unbookedJobIds, horizonDays: 120, budgetMs: 0 });
    placed = r.placed.length;
    unplaced = r.unplaced.length;
  });
  const sweep = time(runs, () => overlappingPairs(board.bookings));
  const pairRuns = jobs >= 2000 ? 3 : 10;
  let pairCount = 0;
  const pairwise = time(pairRuns, () => {
    pairCount = pairwiseClashes(board.bookings);
  });
  const sweepCount = overlappingPairs(board.bookings).length;
  if (sweepCount !== pairCount) throw new Error(`sweep found ${sweepCount} overlaps, pairwise ${pairCount}`);
  if (floorOverlaps !== sweepCount)
    throw new Error(`the floor found ${floorOverlaps} overlaps, the sweep ${sweepCount}`);
  const heapAtEnd = process.memoryUsage().heapUsed / 1024 / 1024;
  const kept = analyseBoard(board, { now: BENCH_NOW });
  gc();
  const heap = process.memoryUsage().heapUsed / 1024 / 1024;
  void kept;
  const row = (what: string, st: Stats, note: string) =>
    rows.push([label, what, ms(st.median), ms(st.p95), ms(st.cpuMedian), note]);
  row(
    'full analysis (checks + CPM)',
    full,
    `${first.violations.length} violations (${splitCount} split, ${unbookedCount} unbooked pred.)`,
  );
  row(
    'floor: typed-array CPM + sweep',
    floor,
    `${n.toLocaleString('en-GB')} stages, ${board.dependencies.length.toLocaleString('en-GB')} links, ${input.res.length.toLocaleString('en-GB')} bookings`,
  );
  row('floor, reading the board in too', floorRead, 'ids → numbers, then the same pass');
  row(
    "the result's objects alone (copied)",
    shape,
    `${first.violations.length} violations, ${first.criticalPaths.reduce((n, p) => n + p.stages.length, 0).toLocaleString('en-GB')} stage timings`,
  );
  row(
    'calendar arithmetic alone',
    calendarWork,
    `each booking's working time and ends, each stage's CPM sums (${input.res.length.toLocaleString('en-GB')} + ${n.toLocaleString('en-GB')})`,
  );
  rows.push([
    label,
    'full analysis ÷ floor (cpu)',
    `${(full.cpuMedian / Math.max(floor.cpuMedian, 0.001)).toFixed(1)}×`,
    '',
    '',
    `÷ floor reading the board in: ${(full.cpuMedian / Math.max(floorRead.cpuMedian, 0.001)).toFixed(1)}×`,
  ]);
  // For information, not the target: the floor reading the board in, with the calendar arithmetic
  // and the result's objects that an engine answering in working time and in these objects adds.
  const least = floorRead.cpuMedian + calendarWork.cpuMedian + shape.cpuMedian;
  rows.push([
    label,
    'full analysis ÷ (floor + calendars + result)',
    `${(full.cpuMedian / Math.max(least, 0.001)).toFixed(1)}×`,
    '',
    '',
    `${ms(least)} ms cpu: the three rows above added (information, not the ≤ 4× target)`,
  ]);
  row(
    'full analysis, stages may run over a night',
    fullNoSplit,
    `${withoutSplits} violations (the same board, no split)`,
  );
  row('full checks only', checksOnly, '');
  row('full checks only, stages may run over', checksNoSplit, '');
  row('move check (checkMove)', move, `${moves.length} moves`);
  row('slot finder (crane, 1+3)', slot, `${slotStages.length} stages`);
  row(`auto-place ${unbookedJobIds.length} jobs`, place, `${placed} placed, ${unplaced} not`);
  row('clash sweep', sweep, `${sweepCount} overlaps`);
  row(
    'clash pairwise (baseline)',
    pairwise,
    `sweep ${(pairwise.median / sweep.median).toFixed(0)}× faster (wall), ${(pairwise.cpuMedian / Math.max(sweep.cpuMedian, 0.001)).toFixed(0)}× (cpu)`,
  );
  rows.push([label, 'heap used, live (after gc)', `${heap.toFixed(0)} MB`, '', '', 'board + index + one analysis']);
  rows.push([label, 'heap used, at end (no gc)', `${heapAtEnd.toFixed(0)} MB`, '', '', 'includes uncollected garbage']);
  void (board satisfies Board);
}

const head = ['board', 'measure', 'median ms', 'p95 ms', 'cpu ms (median)', 'note'];
const widths = head.map((h, i) => Math.max(h.length, ...rows.map((r) => (r[i] ?? '').length)));
const line = (r: string[]) => r.map((c, i) => c.padEnd(widths[i] as number)).join(' | ');
console.log(line(head));
console.log(widths.map((w) => '-'.repeat(w)).join('-|-'));
for (const r of rows) console.log(line(r));
console.log(
  `load average (1 min) at start ${loadAtStart.toFixed(2)}, at end ${(loadavg()[0] ?? 0).toFixed(2)}; Node ${process.version}`,
);
