import { describe, expect, it } from 'vitest';
import type { RowInput } from '@/components/board/board-events';
import { linesOf, windowOf, WINDOW_ABOVE_LINES } from '@/components/board/row-window';

/** 300 rows in three groups of 100 (our crews, then two partners), names numbered 000–299. */
const rows: RowInput[] = Array.from({ length: 300 }, (_, i) => {
  const group = i < 100 ? '0|Our crews' : i < 200 ? '2 Fellside|Fellside Crane Hire' : '3 Millstone|Millstone Groundworks';
  return { id: `r${i}`, title: `Resource ${String(i).padStart(3, '0')}`, group, groupOrder: group.split('|')[0]!, kind: 'Install crew', firmId: 'f', businessHours: [] };
});
const heights = { row: () => 40, group: 30 };
const ids = (list: readonly RowInput[]) => list.map((r) => Number(r.id.slice(1)));

describe('the lines of the timeline', () => {
  it("follow the timeline's order (group, kind, title), a heading before each group's rows", () => {
    const shuffled = [...rows].reverse();
    const lines = linesOf(shuffled, () => true);
    expect(lines).toHaveLength(303);
    expect(lines[0]).toMatchObject({ kind: 'group', group: '0|Our crews' });
    expect(lines[1]).toMatchObject({ kind: 'row', row: { id: 'r0' } });
    expect(lines[101]).toMatchObject({ kind: 'group', group: '2 Fellside|Fellside Crane Hire' });
    expect(lines[302]).toMatchObject({ kind: 'row', row: { id: 'r299' } });
  });

  it('hold only the heading of a folded group', () => {
    const lines = linesOf(rows, (g) => g !== '2 Fellside|Fellside Crane Hire');
    expect(lines).toHaveLength(203);
    expect(lines.filter((l) => l.kind === 'group')).toHaveLength(3);
    // A board folded as it opens is short enough to draw whole.
    expect(linesOf(rows, () => false).length).toBeLessThan(WINDOW_ABOVE_LINES);
  });
});

describe('the window of rows drawn', () => {
  const lines = linesOf(rows, () => true);
  const total = 3 * 30 + 300 * 40;

  it('at the top: the rows in view and the margin below, the rest as padding below', () => {
    const w = windowOf(lines, heights, 0, 800, 400, rows);
    expect(w.first).toBe(0);
    // 1200 px: the heading (30) and rows 0–29 (to 1230 px).
    expect(ids(w.rows)).toEqual(Array.from({ length: 30 }, (_, i) => i));
    expect([w.padTop, w.padBottom, w.total]).toEqual([0, total - 1230, total]);
  });

  it('scrolled into the middle of a group: its heading drawn just above the first row, the scrollbar as long as the board', () => {
    // Row n of the first group starts at 30 + 40n; in view 4000–4800 px, with 400 px either side.
    const w = windowOf(lines, heights, 4000, 800, 400, rows);
    expect(ids(w.rows)[0]).toBe(89); // row 89 spans 3590–3630 px
    expect(ids(w.rows)).toContain(100); // the next group, from its heading at 4030 px
    const drawn = 30 + (100 - 89) * 40 + 30 + (ids(w.rows).length - 11) * 40;
    expect(w.padTop).toBe(30 + 89 * 40 - 30);
    expect(w.padTop + drawn + w.padBottom).toBe(total);
    expect([...w.shown].length).toBe(w.rows.length);
  });

  it('at the foot: the last rows, nothing below', () => {
    const w = windowOf(lines, heights, total - 800, 800, 400, rows);
    expect(ids(w.rows).at(-1)).toBe(299);
    expect(w.padBottom).toBe(0);
    expect(w.padTop + 30 + w.rows.length * 40).toBe(total);
  });

  it('a folded group in the window hands over one row (so its heading is drawn) and none of its events', () => {
    const folded = linesOf(rows, (g) => g !== '2 Fellside|Fellside Crane Hire');
    const w = windowOf(folded, heights, 3600, 800, 400, rows);
    expect(w.rows.map((r) => r.id)).toContain('r100');
    expect(w.shown.has('r100')).toBe(false);
    expect(ids(w.rows).filter((n) => n >= 100 && n < 200)).toEqual([100]);
    expect(w.shown.has('r200')).toBe(true); // the group after it, open, starts in view
  });

  it('a scroll past the end (a filter just shortened the board) shows its foot', () => {
    const w = windowOf(lines, heights, 999_999, 800, 400, rows);
    expect(ids(w.rows).at(-1)).toBe(299);
  });
});
