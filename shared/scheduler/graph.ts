import { SchedulerError } from './errors.js';
import type { Dependency } from './types.js';

/**
 * Groups of stages that depend on each other in a circle (strongly connected components of more
 * than one stage, or a stage depending on itself), each sorted by id, in a stable order.
 *
 * @example
 * findCycles(['a', 'b', 'c'], [dep('a', 'b'), dep('b', 'a')]) // [['a', 'b']]
 */
export function findCycles(stageIds: readonly string[], dependencies: readonly Dependency[]): string[][] {
  const idx = new Map<string, number>();
  stageIds.forEach((id, i) => idx.set(id, i));
  const n = stageIds.length;
  const adj: number[][] = Array.from({ length: n }, () => []);
  const selfLoop = new Set<number>();
  for (const d of dependencies) {
    const a = idx.get(d.fromStageId),
      b = idx.get(d.toStageId);
    if (a === undefined || b === undefined) continue;
    if (a === b) selfLoop.add(a);
    (adj[a] as number[]).push(b);
  }
  // Tarjan's algorithm, iterative to survive long chains.
  const index = new Int32Array(n).fill(-1);
  const low = new Int32Array(n);
  const onStack = new Uint8Array(n);
  const stack: number[] = [];
  const out: string[][] = [];
  let counter = 0;
  for (let root = 0; root < n; root++) {
    if (index[root] !== -1) continue;
    const work: [number, number][] = [[root, 0]];
    while (work.length > 0) {
      const top = work[work.length - 1] as [number, number];
      const [v, i] = top;
      if (i === 0) {
        index[v] = low[v] = counter++;
        stack.push(v);
        onStack[v] = 1;
      }
      const edges = adj[v] as number[];
      if (i < edges.length) {
        top[1] = i + 1;
        const w = edges[i] as number;
        if (index[w] === -1) work.push([w, 0]);
        else if (onStack[w]) low[v] = Math.min(low[v] as number, index[w] as number);
        continue;
      }
      work.pop();
      const parent = work[work.length - 1];
      if (parent !== undefined) low[parent[0]] = Math.min(low[parent[0]] as number, low[v] as number);
      if (low[v] === index[v]) {
        const comp: number[] = [];
        let w: number;
        do {
          w = stack.pop() as number;
          onStack[w] = 0;
          comp.push(w);
        } while (w !== v);
        if (comp.length > 1 || selfLoop.has(v)) out.push(comp.map((c) => stageIds[c] as string).sort());
      }
    }
  }
  return out.sort((a, b) => ((a[0] ?? '') < (b[0] ?? '') ? -1 : 1));
}

/**
 * Stage ids ordered so every stage comes after the stages it depends on (Kahn's algorithm,
 * ties broken by input order). Throws `SchedulerError('cycle')` naming the stages in a cycle.
 *
 * @example
 * topologicalOrder(['lift', 'base'], [dep('base', 'lift')]) // ['base', 'lift']
 */
export function topologicalOrder(stageIds: readonly string[], dependencies: readonly Dependency[]): string[] {
  const idx = new Map<string, number>();
  stageIds.forEach((id, i) => idx.set(id, i));
  const n = stageIds.length;
  const indeg = new Int32Array(n);
  const adj: number[][] = Array.from({ length: n }, () => []);
  for (const d of dependencies) {
    const a = idx.get(d.fromStageId),
      b = idx.get(d.toStageId);
    if (a === undefined || b === undefined) continue;
    (adj[a] as number[]).push(b);
    indeg[b] = (indeg[b] as number) + 1;
  }
  const queue: number[] = [];
  for (let i = 0; i < n; i++) if (indeg[i] === 0) queue.push(i);
  const order: string[] = [];
  for (let q = 0; q < queue.length; q++) {
    const v = queue[q] as number;
    order.push(stageIds[v] as string);
    for (const w of adj[v] as number[]) {
      indeg[w] = (indeg[w] as number) - 1;
      if (indeg[w] === 0) queue.push(w);
    }
  }
  if (order.length < n) {
    const cycles = findCycles(stageIds, dependencies);
    const first = cycles[0] ?? [];
    throw new SchedulerError('cycle', `These stages wait for each other in a circle: ${first.join(' → ')}`, { cycles });
  }
  return order;
}

/** A topological order of the stages that are not caught in or behind a cycle, and the cycles. */
export interface OrderAndCycles {
  order: string[];
  /** Stages left out of `order` (in a cycle or waiting on one). */
  blocked: string[];
  cycles: string[][];
}

/**
 * Kahn's algorithm over every stage, then Tarjan's only over what Kahn could not order (so an
 * acyclic board pays for one pass).
 *
 * @example
 * orderAndCycles(['a', 'b'], [dep('a', 'b')]) // { order: ['a', 'b'], blocked: [], cycles: [] }
 */
export function orderAndCycles(stageIds: readonly string[], dependencies: readonly Dependency[]): OrderAndCycles {
  const idx = new Map<string, number>();
  for (let i = 0; i < stageIds.length; i++) idx.set(stageIds[i] as string, i);
  const n = stageIds.length;
  const indeg = new Int32Array(n);
  const head = new Int32Array(n).fill(-1);
  const next = new Int32Array(dependencies.length);
  const to = new Int32Array(dependencies.length);
  let e = 0;
  for (const d of dependencies) {
    const a = idx.get(d.fromStageId),
      b = idx.get(d.toStageId);
    if (a === undefined || b === undefined) continue;
    to[e] = b;
    next[e] = head[a] as number;
    head[a] = e;
    e++;
    indeg[b] = (indeg[b] as number) + 1;
  }
  const queue = new Int32Array(n);
  let qn = 0;
  for (let i = 0; i < n; i++) if (indeg[i] === 0) queue[qn++] = i;
  for (let q = 0; q < qn; q++) {
    const v = queue[q] as number;
    for (let k = head[v] as number; k !== -1; k = next[k] as number) {
      const w = to[k] as number;
      indeg[w] = (indeg[w] as number) - 1;
      if (indeg[w] === 0) queue[qn++] = w;
    }
  }
  const order: string[] = new Array<string>(qn);
  for (let q = 0; q < qn; q++) order[q] = stageIds[queue[q] as number] as string;
  if (qn === n) return { order, blocked: [], cycles: [] };
  const blocked: string[] = [];
  for (let i = 0; i < n; i++) if ((indeg[i] as number) > 0) blocked.push(stageIds[i] as string);
  const inBlocked = new Set(blocked);
  const cycles = findCycles(
    blocked,
    dependencies.filter((d) => inBlocked.has(d.fromStageId) && inBlocked.has(d.toStageId)),
  );
  return { order, blocked, cycles };
}
