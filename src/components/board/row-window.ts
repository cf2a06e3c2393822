/**
 * Which of the board's rows the timeline draws: on a board of many rows only those in view (and a
 * margin above and below), with the space of the rest kept as padding, so the scrollbar stays
 * true to the whole board. Pure, so it is tested without a browser; BoardTimeline.vue measures the
 * rows it draws and hands the sizes in.
 *
 * The timeline draws a group's heading whenever it draws any row of that group, so a window that
 * starts inside a group draws that heading just above its first row (the padding above is that
 * much shorter).
 */
import type { RowInput } from './board-events';

/** A line of the timeline: a group's heading, or a row (drawn only while its group is open). */
export type Line = { kind: 'group'; group: string; index: number } | { kind: 'row'; row: RowInput; group: string; index: number };

/** Above this many lines the timeline draws only the window in view. */
export const WINDOW_ABOVE_LINES = 80;

/** The timeline's own order for values ("flexible compare"): strings by locale, empty ones first. */
function compareValues(a: string, b: string): number {
  if (!a && !b) return 0;
  return a.localeCompare(b);
}

/**
 * The lines in the timeline's order (its `resourceOrder: 'group,kind,title'`): each group's heading,
 * then its rows when the group is open.
 *
 * @example
 * linesOf(rows, () => true) // [{ kind: 'group', group: '0|Our crews' }, { kind: 'row', row: heron }, …]
 */
export function linesOf(rows: readonly RowInput[], isOpen: (group: string) => boolean): Line[] {
  const sorted = [...rows].sort((a, b) => compareValues(a.group, b.group) || compareValues(a.kind, b.kind) || compareValues(a.title, b.title));
  const out: Line[] = [];
  let current: string | null = null;
  let open = false;
  for (const row of sorted) {
    if (row.group !== current) {
      current = row.group;
      open = isOpen(row.group);
      out.push({ kind: 'group', group: row.group, index: out.length });
    }
    if (open) out.push({ kind: 'row', row, group: row.group, index: out.length });
  }
  return out;
}

/** Heights in pixels: measured per row id, else the typical row's; a group's heading. */
export interface LineHeights {
  row: (rowId: string) => number;
  group: number;
}

/** What the timeline draws: the rows to hand it, and the padding above and below them. */
export interface RowWindow {
  /** First and last line drawn (inclusive), in {@link linesOf} order. */
  first: number;
  last: number;
  rows: RowInput[];
  /** The ids of the rows drawn (not a folded group's stand-in): their events are the ones to hand over. */
  shown: Set<string>;
  padTop: number;
  padBottom: number;
  total: number;
  /** The part of the board (pixels from the top) these lines cover, padding excluded. */
  top: number;
  bottom: number;
}

const heightOf = (line: Line, h: LineHeights) => (line.kind === 'group' ? h.group : h.row(line.row.id));

/**
 * The lines to draw for a viewport (`scrollTop`, `height`) with `overscan` pixels above and below.
 * A folded group in the window hands the timeline one of its rows, so it draws the heading (and no
 * rows); a window starting inside a group also draws the group's heading, just above its first row.
 *
 * @example
 * windowOf(lines, { row: () => 40, group: 32 }, 4000, 800, 600) // rows around 3400–5400 px, padTop ≈ 3400
 */
export function windowOf(lines: readonly Line[], h: LineHeights, scrollTop: number, height: number, overscan: number, allRows: readonly RowInput[]): RowWindow {
  const tops: number[] = new Array<number>(lines.length);
  let y = 0;
  for (let i = 0; i < lines.length; i++) { tops[i] = y; y += heightOf(lines[i]!, h); }
  const total = y;
  if (lines.length === 0) return { first: 0, last: -1, rows: [], shown: new Set(), padTop: 0, padBottom: 0, total: 0, top: 0, bottom: 0 };
  const from = Math.max(0, Math.min(scrollTop, total - height) - overscan);
  const to = Math.max(from, scrollTop + height + overscan);
  let first = 0;
  while (first < lines.length - 1 && tops[first]! + heightOf(lines[first]!, h) <= from) first++;
  let last = first;
  while (last < lines.length - 1 && tops[last + 1]! < to) last++;

  const byGroup = new Map<string, RowInput>();
  for (const r of allRows) if (!byGroup.has(r.group)) byGroup.set(r.group, r);
  const rows: RowInput[] = [];
  const shown = new Set<string>();
  let padTop = tops[first]!;
  const head = lines[first]!;
  // Starting inside a group: the timeline draws its heading too, right above the first row.
  if (head.kind === 'row') padTop -= h.group;
  for (let i = first; i <= last; i++) {
    const line = lines[i]!;
    if (line.kind === 'row') { rows.push(line.row); shown.add(line.row.id); } else if (lines[i + 1]?.kind !== 'row') {
      // A folded group (or one whose rows all lie past the window): one row, so the heading is drawn.
      const any = byGroup.get(line.group);
      if (any) rows.push(any);
    } else if (i === last) {
      // The heading is the last line in the window: its first row comes along (just past the window).
      const next = (lines[i + 1] as Extract<Line, { kind: 'row' }>).row;
      rows.push(next);
      shown.add(next.id);
      last = i + 1;
    }
  }
  const bottom = tops[last]! + heightOf(lines[last]!, h);
  return { first, last, rows, shown, padTop: Math.max(0, padTop), padBottom: Math.max(0, total - bottom), total, top: tops[first]!, bottom };
}
