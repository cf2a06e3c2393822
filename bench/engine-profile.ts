// Profile helper for the engine's full analysis at 20,000 stages (not a test):
//   node --import tsx bench/engine-profile.ts                              CPU time per phase, the floor, the calendar arithmetic alone
//   node --cpu-prof --cpu-prof-dir=/tmp/prof --import tsx bench/engine-profile.ts   a .cpuprofile for DevTools
import { analyseBoard, boardCriticalPath, boardViolations, createBoardIndex } from '../shared/scheduler/index.js';
import { calendarInput, calendarPass, floorInput, floorPass } from './floor.js';
import { BENCH_NOW, generateBoard } from './generate.js';

const { board } = generateBoard(2000, 2000);
const runs = Number(process.env.RUNS ?? 30);

/** Process CPU time (user + system) of each run, sorted. */
function cpu(fn: () => void): number[] {
  const out: number[] = [];
  for (let i = 0; i < runs; i++) {
    const c = process.cpuUsage();
    fn();
    const d = process.cpuUsage(c);
    out.push((d.user + d.system) / 1000);
  }
  return out.sort((a, b) => a - b);
}
const median = (t: number[]) => t[t.length >> 1] as number;
const show = (what: string, t: number[]) =>
  console.log(`${what.padEnd(20)} cpu median ${median(t).toFixed(1)} ms, min ${(t[0] as number).toFixed(1)} ms`);

for (let i = 0; i < 3; i++) analyseBoard(board, { now: BENCH_NOW });
const index = createBoardIndex(board, { now: BENCH_NOW });
const input = floorInput(board);
for (let i = 0; i < 5; i++) floorPass(input);
const floor = cpu(() => floorPass(input));
show('floor', floor);
show(
  'createBoardIndex',
  cpu(() => createBoardIndex(board, { now: BENCH_NOW })),
);
show(
  'boardViolations',
  cpu(() => boardViolations(index)),
);
show(
  'boardCriticalPath',
  cpu(() => boardCriticalPath(index)),
);
const full = cpu(() => analyseBoard(board, { now: BENCH_NOW }));
show('analyseBoard', full);
console.log(`ratio (cpu medians) ${(median(full) / median(floor)).toFixed(1)}×`);
show(
  'floor + reading in',
  cpu(() => floorPass(floorInput(board))),
);

// The calendar arithmetic an analysis cannot avoid, alone (see calendarPass).
const calendars = calendarInput(board, BENCH_NOW);
let sink = 0;
show(
  'calendar arithmetic',
  cpu(() => {
    sink += calendarPass(calendars);
  }),
);
if (Number.isNaN(sink)) console.log('(never printed: keeps the sums alive)');
