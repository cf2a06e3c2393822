// Profile helper for the engine's full analysis at 20,000 stages (not a test):
//   node --import tsx bench/engine-profile.ts                              CPU time per phase, the floor, the calendar arithmetic alone
//   node --cpu-prof --cpu-prof-dir=/tmp/prof --import tsx bench/engine-profile.ts   a .cpuprofile for DevTools
import {
  addWorkingMinutes,
  analyseBoard,
  boardCriticalPath,
  boardViolations,
  compileCalendar,
  createBoardIndex,
  isWorkingEnd,
  isWorkingInstant,
  workingMinutesBetween,
  type Booking,
  type CompiledCalendar,
  type Stage,
} from '../shared/scheduler/index.js';
import { floorInput, floorPass } from './floor.js';
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

// The calendar arithmetic an analysis cannot avoid, alone: for each active booking its working
// minutes, whether it starts and ends in working time and which local days it touches; for each
// stage an early finish, a float to a date three weeks on, a duration and a late start. No objects,
// no checks: what a typed-array engine would still spend on calendars.
const cals = board.calendars.map((c) => compileCalendar(c));
const active = board.bookings.filter((b) => b.state !== 'declined');
let sink = 0;
show(
  'calendar arithmetic',
  cpu(() => {
    for (let i = 0; i < active.length; i++) {
      const b = active[i] as Booking;
      const c = cals[i % cals.length] as CompiledCalendar;
      sink += workingMinutesBetween(c, b.start, b.end);
      sink += isWorkingInstant(c, b.start) ? 1 : 0;
      sink += isWorkingEnd(c, b.end) ? 1 : 0;
      sink += c.dayOf(b.start) - c.dayOf(b.end - 1);
    }
    for (let i = 0; i < board.stages.length; i++) {
      const c = cals[i % cals.length] as CompiledCalendar;
      const t = BENCH_NOW + (i % 500) * 3_600_000;
      const ef = addWorkingMinutes(c, t, (board.stages[i] as Stage).durationMinutes);
      sink += workingMinutesBetween(c, ef, t + 21 * 86_400_000);
      sink += workingMinutesBetween(c, t, ef);
      sink += addWorkingMinutes(c, ef + 86_400_000, -240);
    }
  }),
);
if (Number.isNaN(sink)) console.log('(never printed: keeps the sums alive)');
