// PSPLIB single-mode instances (Kolisch & Sprecher, "PSPLIB — A project scheduling problem library",
// EJOR 96 (1996) 205–216): the parser, the mapping onto a board, an independent feasibility check
// and the critical-path lower bound. Used by bench/plan.ts and tests/shared/planner.test.ts.
import { weeklyHours, type Board, type Booking, type Dependency, type Resource, type Stage } from '../../shared/scheduler/index.js';

/** One activity of an instance (the dummy source and sink included). */
export interface PsplibActivity {
  id: number;
  duration: number;
  demand: number[];
  successors: number[];
}

/** A parsed single-mode instance. */
export interface PsplibInstance {
  activities: PsplibActivity[];
  capacity: number[];
}

/** Parses the `.sm` text (precedence relations, requests/durations, resource availabilities). */
export function parseSm(text: string): PsplibInstance {
  const lines = text.split(/\r?\n/);
  const at = (title: string): number => {
    const i = lines.findIndex((l) => l.startsWith(title));
    if (i < 0) throw new Error(`No '${title}' section`);
    return i;
  };
  const nums = (l: string): number[] => l.trim().split(/\s+/).filter((x) => x !== '').map(Number);
  const byId = new Map<number, PsplibActivity>();
  for (let i = at('PRECEDENCE RELATIONS') + 2; i < lines.length && !(lines[i] ?? '').startsWith('*'); i++) {
    const n = nums(lines[i] ?? '');
    if (n.length < 3) continue;
    const [id, , count] = n as [number, number, number];
    byId.set(id, { id, duration: 0, demand: [], successors: n.slice(3, 3 + count) });
  }
  for (let i = at('REQUESTS/DURATIONS') + 3; i < lines.length && !(lines[i] ?? '').startsWith('*'); i++) {
    const n = nums(lines[i] ?? '');
    if (n.length < 4) continue;
    const a = byId.get(n[0] as number);
    if (a === undefined) throw new Error(`Activity ${n[0]} has a duration but no precedence line`);
    a.duration = n[2] as number;
    a.demand = n.slice(3);
  }
  const capacity = nums(lines[at('RESOURCEAVAILABILITIES') + 2] ?? '');
  return { activities: [...byId.values()].sort((a, b) => a.id - b.id), capacity };
}

/** 2026-01-05 00:00 UTC: the instances start at period 0 here. */
export const PSPLIB_NOW = Date.UTC(2026, 0, 5, 0);
/** One period is one hour. */
export const PERIOD_MS = 3_600_000;

const stageId = (n: number): string => `a${String(n).padStart(3, '0')}`;
const kindOf = (k: number): string => `R${k + 1}`;

/**
 * The instance as a board: one machine row per unit of each resource's capacity, a stage per
 * real activity needing `demand` distinct rows of that kind, finish-to-start links, a
 * round-the-clock calendar in UTC, one period = one hour. The dummy source and sink are left out
 * (they take no time), so the makespan is the latest finish.
 */
export function psplibBoard(inst: PsplibInstance): Board {
  const first = inst.activities[0]?.id ?? 1;
  const last = inst.activities[inst.activities.length - 1]?.id ?? 1;
  const real = (n: number): boolean => n !== first && n !== last;
  const resources: Resource[] = inst.capacity.flatMap((cap, k) => Array.from({ length: cap }, (_, u) => ({
    id: `${kindOf(k)}-${String(u + 1).padStart(2, '0')}`, firmId: 'firm', category: 'machine' as const, kind: kindOf(k), calendarId: 'all-hours',
  })));
  const stages: Stage[] = inst.activities.filter((a) => real(a.id)).map((a) => ({
    id: stageId(a.id), jobId: 'project', kind: 'activity', name: `Activity ${a.id}`, durationMinutes: a.duration * 60,
    requirements: a.demand.flatMap((d, k) => (d > 0 ? [{ kind: kindOf(k), count: d }] : [])), mayContinueNextDay: true,
  }));
  const dependencies: Dependency[] = inst.activities.filter((a) => real(a.id)).flatMap((a) => a.successors.filter(real).map((s) => ({
    id: `${stageId(a.id)}-${stageId(s)}`, fromStageId: stageId(a.id), toStageId: stageId(s), type: 'FS' as const, lag: { amount: 0, unit: 'working_hours' as const },
  })));
  return {
    stages, dependencies, bookings: [], resources, hirePeriods: [], leadTimeRules: [], jobs: [{ id: 'project', firmId: 'firm' }],
    calendars: [{ id: 'all-hours', timeZone: 'UTC', weekly: weeklyHours([0, 1, 2, 3, 4, 5, 6], [[0, 1440]]), holidayRegion: null }],
  };
}

/**
 * Checks a plan against the instance itself, not the engine: every real activity booked once on
 * `demand` distinct rows of each kind, for exactly its duration, starting on a whole period at or
 * after period 0; every successor starting no earlier than its predecessor's finish; no row used
 * twice at once; and per hour no more rows of a kind in use than its capacity. Returns the
 * makespan in periods and the problems found (none when feasible).
 */
export function checkPsplibPlan(inst: PsplibInstance, bookings: readonly Booking[]): { makespan: number; problems: string[] } {
  const problems: string[] = [];
  const first = inst.activities[0]?.id ?? 1;
  const last = inst.activities[inst.activities.length - 1]?.id ?? 1;
  const start = new Map<number, number>();
  let makespan = 0;
  const rowsBusy = new Map<string, [number, number][]>();
  const use: number[][] = inst.capacity.map(() => []);
  for (const a of inst.activities) {
    if (a.id === first || a.id === last) continue;
    const mine = bookings.filter((b) => b.stageId === stageId(a.id));
    if (mine.length === 0) { problems.push(`activity ${a.id} has no booking`); continue; }
    const s = (mine[0] as Booking).start;
    const p0 = (s - PSPLIB_NOW) / PERIOD_MS;
    if (!Number.isInteger(p0) || p0 < 0) problems.push(`activity ${a.id} starts off the period grid or before period 0`);
    start.set(a.id, p0);
    makespan = Math.max(makespan, p0 + a.duration);
    for (const b of mine) {
      if (b.start !== s || b.end - b.start !== a.duration * PERIOD_MS) problems.push(`activity ${a.id}: booking ${b.id} is not [start, start + ${a.duration} h)`);
      const spans = rowsBusy.get(b.resourceId) ?? [];
      for (const [x, y] of spans) if (x < b.end && b.start < y) problems.push(`row ${b.resourceId} holds two activities at once`);
      spans.push([b.start, b.end]);
      rowsBusy.set(b.resourceId, spans);
    }
    a.demand.forEach((d, k) => {
      const rows = new Set(mine.filter((b) => b.resourceId.startsWith(`${kindOf(k)}-`)).map((b) => b.resourceId));
      if (rows.size !== d) problems.push(`activity ${a.id} holds ${rows.size} rows of ${kindOf(k)}, needs ${d}`);
      for (let t = p0; t < p0 + a.duration; t++) { const u = use[k] as number[]; u[t] = (u[t] ?? 0) + d; }
    });
  }
  for (const a of inst.activities) {
    const sa = start.get(a.id);
    if (sa === undefined) continue;
    for (const s of a.successors) {
      const ss = start.get(s);
      if (ss !== undefined && ss < sa + a.duration) problems.push(`activity ${s} starts at ${ss}, before ${a.id} finishes at ${sa + a.duration}`);
    }
  }
  use.forEach((u, k) => u.forEach((x, t) => { if (x > (inst.capacity[k] as number)) problems.push(`${kindOf(k)} over capacity in period ${t}: ${x} > ${inst.capacity[k]}`); }));
  return { makespan, problems };
}

/** The critical-path length (precedence only), the usual lower bound for the larger sets. */
export function criticalPathBound(inst: PsplibInstance): number {
  const finish = new Map<number, number>();
  const preds = new Map<number, number[]>();
  for (const a of inst.activities) for (const s of a.successors) preds.set(s, [...(preds.get(s) ?? []), a.id]);
  const byId = new Map(inst.activities.map((a) => [a.id, a]));
  const visit = (id: number): number => {
    const known = finish.get(id);
    if (known !== undefined) return known;
    const es = Math.max(0, ...(preds.get(id) ?? []).map(visit));
    const f = es + (byId.get(id)?.duration ?? 0);
    finish.set(id, f);
    return f;
  };
  return Math.max(0, ...inst.activities.map((a) => visit(a.id)));
}
