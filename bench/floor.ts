// The engine benchmark's floor (bench/engine.ts): the same graph and bookings in plain typed arrays.
import {
  addWorkingMinutes,
  compileCalendar,
  isWorkingEnd,
  isWorkingInstant,
  workingMinutesBetween,
  type Board,
  type BoardAnalysis,
  type Booking,
  type CompiledCalendar,
  type Stage,
} from '../shared/scheduler/index.js';

/** The board read into typed arrays: what any implementation has to hold, ids turned into numbers. */
export interface FloorInput {
  n: number;
  /** Duration in minutes of each stage (booked: its booked span, unbooked: durationMinutes). */
  dur: Float64Array;
  /** Dependencies as from/to stage numbers, type (0 FS, 1 SS, 2 FF, 3 SF) and lag in minutes. */
  from: Int32Array;
  to: Int32Array;
  type: Uint8Array;
  lag: Float64Array;
  /** Active bookings: resource number, start and end in minutes. */
  res: Int32Array;
  start: Float64Array;
  end: Float64Array;
  resources: number;
}

const LAG_MINUTES = { working_hours: 60, working_days: 480, elapsed_hours: 60, elapsed_days: 1440 } as const;
const TYPE = { FS: 0, SS: 1, FF: 2, SF: 3 } as const;

export function floorInput(board: Board): FloorInput {
  const stageNo = new Map<string, number>();
  board.stages.forEach((s, i) => stageNo.set(s.id, i));
  const n = board.stages.length;
  const dur = new Float64Array(n);
  board.stages.forEach((s, i) => {
    dur[i] = s.durationMinutes;
  });
  const m = board.dependencies.length;
  const from = new Int32Array(m),
    to = new Int32Array(m),
    type = new Uint8Array(m),
    lag = new Float64Array(m);
  board.dependencies.forEach((d, k) => {
    from[k] = stageNo.get(d.fromStageId) as number;
    to[k] = stageNo.get(d.toStageId) as number;
    type[k] = TYPE[d.type];
    lag[k] = d.lag.amount * LAG_MINUTES[d.lag.unit];
  });
  const resNo = new Map<string, number>();
  board.resources.forEach((r, i) => resNo.set(r.id, i));
  const active = board.bookings.filter((b) => b.state !== 'declined');
  const res = new Int32Array(active.length),
    start = new Float64Array(active.length),
    end = new Float64Array(active.length);
  active.forEach((b, k) => {
    res[k] = resNo.get(b.resourceId) as number;
    start[k] = b.start / 60_000;
    end[k] = b.end / 60_000;
  });
  return { n, dur, from, to, type, lag, res, start, end, resources: board.resources.length };
}

/**
 * The floor: the least a full analysis must do on the same graph and bookings, in plain typed
 * arrays. Dependencies into adjacency lists (counting sort), Kahn's order, a CPM forward and
 * backward pass with total and free float (lags in minutes), then bookings bucketed by resource
 * (counting sort), each bucket sorted by start and swept for overlaps. Returns the overlap count
 * (checked against the engine's sweep), the least total float and the sum of free floats (so
 * nothing is optimised away).
 */
export function floorPass(x: FloorInput): { overlaps: number; minFloat: number; freeSum: number } {
  const { n, dur, from, to, type, lag } = x;
  const m = from.length;
  const outStart = new Int32Array(n + 1),
    inStart = new Int32Array(n + 1);
  for (let k = 0; k < m; k++) {
    const f = (from[k] as number) + 1,
      t = (to[k] as number) + 1;
    outStart[f] = (outStart[f] as number) + 1;
    inStart[t] = (inStart[t] as number) + 1;
  }
  for (let i = 0; i < n; i++) {
    outStart[i + 1] = (outStart[i + 1] as number) + (outStart[i] as number);
    inStart[i + 1] = (inStart[i + 1] as number) + (inStart[i] as number);
  }
  const outEdge = new Int32Array(m),
    inEdge = new Int32Array(m);
  const oFill = outStart.slice(0, n),
    iFill = inStart.slice(0, n);
  for (let k = 0; k < m; k++) {
    const f = from[k] as number,
      t = to[k] as number;
    const o = oFill[f] as number,
      i = iFill[t] as number;
    outEdge[o] = k;
    inEdge[i] = k;
    oFill[f] = o + 1;
    iFill[t] = i + 1;
  }
  const indeg = new Int32Array(n);
  for (let i = 0; i < n; i++) indeg[i] = (inStart[i + 1] as number) - (inStart[i] as number);
  const order = new Int32Array(n);
  let head = 0,
    tail = 0;
  for (let i = 0; i < n; i++) if (indeg[i] === 0) order[tail++] = i;
  while (head < tail) {
    const i = order[head++] as number;
    for (let e = outStart[i] as number; e < (outStart[i + 1] as number); e++) {
      const s = to[outEdge[e] as number] as number;
      const left = (indeg[s] as number) - 1;
      indeg[s] = left;
      if (left === 0) order[tail++] = s;
    }
  }
  const es = new Float64Array(n),
    ef = new Float64Array(n),
    ls = new Float64Array(n),
    lf = new Float64Array(n);
  let finish = 0;
  for (let o = 0; o < tail; o++) {
    const i = order[o] as number,
      d = dur[i] as number;
    let t = 0;
    for (let e = inStart[i] as number; e < (inStart[i + 1] as number); e++) {
      const k = inEdge[e] as number,
        p = from[k] as number,
        l = lag[k] as number;
      const b =
        type[k] === 0
          ? (ef[p] as number) + l
          : type[k] === 1
            ? (es[p] as number) + l
            : type[k] === 2
              ? (ef[p] as number) + l - d
              : (es[p] as number) + l - d;
      if (b > t) t = b;
    }
    es[i] = t;
    ef[i] = t + d;
    if (t + d > finish) finish = t + d;
  }
  let minFloat = Number.POSITIVE_INFINITY,
    freeSum = 0;
  for (let o = tail - 1; o >= 0; o--) {
    const i = order[o] as number,
      d = dur[i] as number;
    let t = finish,
      free = finish - (ef[i] as number);
    for (let e = outStart[i] as number; e < (outStart[i + 1] as number); e++) {
      const k = outEdge[e] as number,
        s = to[k] as number,
        l = lag[k] as number;
      const b =
        type[k] === 0
          ? (ls[s] as number) - l
          : type[k] === 1
            ? (ls[s] as number) - l + d
            : type[k] === 2
              ? (lf[s] as number) - l
              : (lf[s] as number) - l + d;
      if (b < t) t = b;
      // Free float: the successor's early start (FS, SS) or finish (FF, SF) less the lag, less this
      // stage's early finish (FS, FF) or start (SS, SF).
      const subject = type[k] === 0 || type[k] === 1 ? (es[s] as number) : (ef[s] as number);
      const own = type[k] === 0 || type[k] === 2 ? (ef[i] as number) : (es[i] as number);
      if (subject - l - own < free) free = subject - l - own;
    }
    lf[i] = t;
    ls[i] = t - d;
    const total = t - d - (es[i] as number);
    if (total < minFloat) minFloat = total;
    freeSum += free;
  }
  // Bookings: bucket by resource, sort each bucket by start (insertion sort: buckets are small), sweep.
  const { res, start, end, resources } = x;
  const b = res.length;
  const bStart = new Int32Array(resources + 1);
  for (let k = 0; k < b; k++) {
    const r = (res[k] as number) + 1;
    bStart[r] = (bStart[r] as number) + 1;
  }
  for (let r = 0; r < resources; r++) bStart[r + 1] = (bStart[r + 1] as number) + (bStart[r] as number);
  const fill = bStart.slice(0, resources);
  const s0 = new Float64Array(b),
    e0 = new Float64Array(b);
  for (let k = 0; k < b; k++) {
    const r = res[k] as number,
      at = fill[r] as number;
    fill[r] = at + 1;
    s0[at] = start[k] as number;
    e0[at] = end[k] as number;
  }
  const activeEnd = new Float64Array(b);
  let overlaps = 0;
  for (let r = 0; r < resources; r++) {
    const lo = bStart[r] as number,
      hi = bStart[r + 1] as number;
    for (let i = lo + 1; i < hi; i++) {
      const sv = s0[i] as number,
        ev = e0[i] as number;
      let j = i - 1;
      while (j >= lo && (s0[j] as number) > sv) {
        s0[j + 1] = s0[j] as number;
        e0[j + 1] = e0[j] as number;
        j--;
      }
      s0[j + 1] = sv;
      e0[j + 1] = ev;
    }
    let live = 0;
    for (let i = lo; i < hi; i++) {
      const sv = s0[i] as number;
      let keep = 0;
      for (let a = 0; a < live; a++) {
        const ea = activeEnd[a] as number;
        if (ea > sv) {
          activeEnd[keep++] = ea;
          overlaps++;
        }
      }
      activeEnd[keep] = e0[i] as number;
      live = keep + 1;
    }
  }
  return { overlaps, minFloat, freeSum };
}

/**
 * A copy of an analysis's result, object for object (every violation with its three id lists and
 * details, every job's path with its stage timings) but reusing its words: what allocating the
 * result's shape costs on its own, the part of the full analysis no faster check can remove while
 * the engine answers in these objects.
 */
export function copyResult(a: BoardAnalysis): BoardAnalysis {
  const violations = a.violations.map((v) => ({
    ...v,
    stageIds: v.stageIds.slice(),
    resourceIds: v.resourceIds.slice(),
    bookingIds: v.bookingIds.slice(),
    ...(v.details === undefined ? {} : { details: { ...v.details } }),
  }));
  const criticalPaths = a.criticalPaths.map((p) => ({
    ...p,
    criticalStageIds: p.criticalStageIds.slice(),
    stages: p.stages.map((t) => ({ ...t })),
  }));
  return { ...a, violations, criticalPaths };
}

/** The board's calendars compiled and its active bookings, for {@link calendarPass}. */
export interface CalendarInput {
  cals: CompiledCalendar[];
  active: Booking[];
  stages: Stage[];
  now: number;
}

export function calendarInput(board: Board, now: number): CalendarInput {
  return {
    cals: board.calendars.map((c) => compileCalendar(c)),
    active: board.bookings.filter((b) => b.state !== 'declined'),
    stages: board.stages,
    now,
  };
}

/**
 * The calendar arithmetic an analysis cannot avoid, alone: for each active booking its working
 * minutes, whether it starts and ends in working time and which local days it touches; for each
 * stage an early finish, a float to a date three weeks on, a duration and a late start. No objects,
 * no checks: what any engine answering in working time still spends on calendars. Returns a sum
 * (so nothing is optimised away).
 */
export function calendarPass(x: CalendarInput): number {
  const { cals, active, stages, now } = x;
  let sink = 0;
  for (let i = 0; i < active.length; i++) {
    const b = active[i] as Booking;
    const c = cals[i % cals.length] as CompiledCalendar;
    sink += workingMinutesBetween(c, b.start, b.end);
    sink += isWorkingInstant(c, b.start) ? 1 : 0;
    sink += isWorkingEnd(c, b.end) ? 1 : 0;
    sink += c.dayOf(b.start) - c.dayOf(b.end - 1);
  }
  for (let i = 0; i < stages.length; i++) {
    const c = cals[i % cals.length] as CompiledCalendar;
    const t = now + (i % 500) * 3_600_000;
    const ef = addWorkingMinutes(c, t, (stages[i] as Stage).durationMinutes);
    sink += workingMinutesBetween(c, ef, t + 21 * 86_400_000);
    sink += workingMinutesBetween(c, t, ef);
    sink += addWorkingMinutes(c, ef + 86_400_000, -240);
  }
  return sink;
}
