import { topologicalOrder } from './graph.js';
import type { Dependency, DependencyType } from './types.js';

/** An activity of an abstract network: any consistent time unit (weeks, minutes, …). */
export interface NetworkActivity {
  id: string;
  duration: number;
}

/** A precedence link in the same unit as the durations. */
export interface NetworkLink {
  from: string;
  to: string;
  type?: DependencyType;
  lag?: number;
}

/** Early/late times and floats of one activity. */
export interface ActivityTimes {
  id: string;
  es: number;
  ef: number;
  ls: number;
  lf: number;
  totalFloat: number;
  freeFloat: number;
  critical: boolean;
}

export interface CriticalPathOptions {
  /** Time of the project start; default 0. */
  start?: number;
  /** Required finish; default the computed finish. A deadline before it gives negative float. */
  deadline?: number;
}

export interface CriticalPathResult {
  /** In input order. */
  activities: ActivityTimes[];
  start: number;
  finish: number;
  /** Critical activities (least total float) in precedence order. */
  criticalPath: string[];
}

const EPS = 1e-9;

/**
 * Classic critical path method on an abstract network: forward pass (ES, EF), backward pass
 * (LS, LF), total float (LS − ES) and free float. FS/SS/FF/SF with lags (negative allowed).
 * Critical = the least total float (0 without a deadline). Throws SchedulerError('cycle').
 *
 * @example
 * computeCriticalPath([{ id: 'A', duration: 2 }, { id: 'B', duration: 4 }], [{ from: 'A', to: 'B' }])
 * // finish 4+2 = 6, criticalPath ['A', 'B']
 */
export function computeCriticalPath(
  activities: readonly NetworkActivity[],
  links: readonly NetworkLink[],
  options: CriticalPathOptions = {},
): CriticalPathResult {
  const start = options.start ?? 0;
  const byId = new Map<string, NetworkActivity>();
  for (const a of activities) {
    if (!(a.duration >= 0)) throw new RangeError(`Activity ${a.id} has a negative or missing duration`);
    byId.set(a.id, a);
  }
  const deps: Dependency[] = links.map((l, i) => ({
    id: String(i),
    fromStageId: l.from,
    toStageId: l.to,
    type: l.type ?? 'FS',
    lag: { amount: l.lag ?? 0, unit: 'elapsed_hours' },
  }));
  const order = topologicalOrder(
    activities.map((a) => a.id),
    deps,
  );
  const preds = new Map<string, NetworkLink[]>();
  const succs = new Map<string, NetworkLink[]>();
  for (const l of links) {
    if (!byId.has(l.from) || !byId.has(l.to)) continue;
    (preds.get(l.to) ?? (preds.set(l.to, []).get(l.to) as NetworkLink[])).push(l);
    (succs.get(l.from) ?? (succs.set(l.from, []).get(l.from) as NetworkLink[])).push(l);
  }
  const es = new Map<string, number>(),
    ef = new Map<string, number>();
  for (const id of order) {
    const d = (byId.get(id) as NetworkActivity).duration;
    let t = start;
    for (const l of preds.get(id) ?? []) {
      const lag = l.lag ?? 0;
      const pes = es.get(l.from) as number,
        pef = ef.get(l.from) as number;
      switch (l.type ?? 'FS') {
        case 'FS':
          t = Math.max(t, pef + lag);
          break;
        case 'SS':
          t = Math.max(t, pes + lag);
          break;
        case 'FF':
          t = Math.max(t, pef + lag - d);
          break;
        case 'SF':
          t = Math.max(t, pes + lag - d);
          break;
      }
    }
    es.set(id, t);
    ef.set(id, t + d);
  }
  let finish = start;
  for (const v of ef.values()) finish = Math.max(finish, v);
  const end = options.deadline ?? finish;
  const ls = new Map<string, number>(),
    lf = new Map<string, number>();
  for (let i = order.length - 1; i >= 0; i--) {
    const id = order[i] as string;
    const d = (byId.get(id) as NetworkActivity).duration;
    let t = end;
    for (const l of succs.get(id) ?? []) {
      const lag = l.lag ?? 0;
      const sls = ls.get(l.to) as number,
        slf = lf.get(l.to) as number;
      switch (l.type ?? 'FS') {
        case 'FS':
          t = Math.min(t, sls - lag);
          break;
        case 'SS':
          t = Math.min(t, sls - lag + d);
          break;
        case 'FF':
          t = Math.min(t, slf - lag);
          break;
        case 'SF':
          t = Math.min(t, slf - lag + d);
          break;
      }
    }
    lf.set(id, t);
    ls.set(id, t - d);
  }
  const times = activities.map((a): ActivityTimes => {
    const aes = es.get(a.id) as number,
      aef = ef.get(a.id) as number;
    let free = end - aef;
    for (const l of succs.get(a.id) ?? []) {
      const lag = l.lag ?? 0;
      const ses = es.get(l.to) as number,
        sef = ef.get(l.to) as number;
      const slack = (() => {
        switch (l.type ?? 'FS') {
          case 'FS':
            return ses - lag - aef;
          case 'SS':
            return ses - lag - aes;
          case 'FF':
            return sef - lag - aef;
          case 'SF':
            return sef - lag - aes;
        }
      })();
      free = Math.min(free, slack);
    }
    const als = ls.get(a.id) as number;
    return {
      id: a.id,
      es: aes,
      ef: aef,
      ls: als,
      lf: lf.get(a.id) as number,
      totalFloat: als - aes,
      freeFloat: free,
      critical: false,
    };
  });
  const minFloat = times.reduce((m, t) => Math.min(m, t.totalFloat), Number.POSITIVE_INFINITY);
  for (const t of times) t.critical = t.totalFloat <= minFloat + EPS;
  const critical = new Set(times.filter((t) => t.critical).map((t) => t.id));
  return { activities: times, start, finish, criticalPath: order.filter((id) => critical.has(id)) };
}
