// Larger instances of our own in the PSPLIB single-mode format (the parser reads them like the
// library's): a random network where every activity has a predecessor and a successor, durations of
// 1–10 periods, 4 renewable resources each needed by about half the activities, demands of 1–10
// and capacities a fifth to a half of the way from the largest demand to the peak of the unconstrained profile. Fixed seed,
// so every run gets the same instances. Not the library's generator (ProGen); its own rules.
import { seededRandom } from '../../shared/scheduler/planner/search.js';

/** One instance with `n` real activities (plus the dummy source and sink), as `.sm` text. */
export function generateSm(n: number, seed: number): string {
  const rnd = seededRandom(seed);
  const int = (a: number, b: number): number => a + Math.floor(rnd() * (b - a + 1));
  const total = n + 2;
  const succ: Set<number>[] = Array.from({ length: total + 1 }, () => new Set<number>());
  const hasPred = new Array<boolean>(total + 1).fill(false);
  // Activities 2..n+1 in rough layers: links only go forward, so the network has no circle.
  for (let j = 2; j <= n + 1; j++) {
    const count = int(1, 3);
    for (let c = 0; c < count && j < n + 1; c++) {
      const to = Math.min(n + 1, j + int(1, Math.max(2, Math.round(n / 6))));
      succ[j]?.add(to);
      hasPred[to] = true;
    }
  }
  for (let j = 2; j <= n + 1; j++) {
    if (!hasPred[j]) succ[1]?.add(j);
    if ((succ[j]?.size ?? 0) === 0) succ[j]?.add(total);
  }
  const dur = Array.from({ length: total + 1 }, (_, j) => (j <= 1 || j === total ? 0 : int(1, 10)));
  const demand = Array.from({ length: total + 1 }, (_, j) => {
    if (j <= 1 || j === total) return [0, 0, 0, 0] as number[];
    const d: number[] = [0, 1, 2, 3].map((): number => (rnd() < 0.5 ? int(1, 10) : 0));
    if (!d.some((x) => x > 0)) d[int(0, 3)] = int(1, 10);
    return d;
  });
  // Peak of each resource in the earliest-start schedule without limits.
  const es = new Array<number>(total + 1).fill(0);
  for (let j = 1; j <= total; j++) for (const s of succ[j] ?? []) es[s] = Math.max(es[s] as number, (es[j] as number) + (dur[j] as number));
  // Resource strength (Kolisch, Sprecher and Drexl 1995, from memory) between 0.2 and 0.5: tight.
  const strength = 0.2 + 0.3 * rnd();
  const capacity = [0, 1, 2, 3].map((k) => {
    const use = new Map<number, number>();
    let most = 0, peak = 0;
    for (let j = 2; j <= n + 1; j++) {
      const d = (demand[j] as number[])[k] as number;
      most = Math.max(most, d);
      for (let t = es[j] as number; t < (es[j] as number) + (dur[j] as number); t++) { const u = (use.get(t) ?? 0) + d; use.set(t, u); peak = Math.max(peak, u); }
    }
    return Math.max(most, Math.round(most + strength * (peak - most)));
  });
  const pad = (x: number | string, w: number): string => String(x).padStart(w);
  const lines = [
    '*'.repeat(72), `generated instance: ${n} activities, seed ${seed}`, '*'.repeat(72),
    `jobs (incl. supersource/sink ):  ${total}`, 'RESOURCES', '  - renewable                 :  4   R', '*'.repeat(72),
    'PRECEDENCE RELATIONS:', 'jobnr.    #modes  #successors   successors',
    ...Array.from({ length: total }, (_, i) => {
      const j = i + 1, s = [...(succ[j] ?? [])].sort((a, b) => a - b);
      return `${pad(j, 4)}${pad(1, 9)}${pad(s.length, 11)}     ${s.map((x) => pad(x, 3)).join(' ')}`;
    }),
    '*'.repeat(72), 'REQUESTS/DURATIONS:', 'jobnr. mode duration  R 1  R 2  R 3  R 4', '-'.repeat(72),
    ...Array.from({ length: total }, (_, i) => {
      const j = i + 1;
      return `${pad(j, 3)}${pad(1, 7)}${pad(dur[j] as number, 6)}${(demand[j] as number[]).map((x) => pad(x, 5)).join('')}`;
    }),
    '*'.repeat(72), 'RESOURCEAVAILABILITIES:', '  R 1  R 2  R 3  R 4', capacity.map((c) => pad(c, 5)).join(''), '*'.repeat(72),
  ];
  return `${lines.join('\n')}\n`;
}
