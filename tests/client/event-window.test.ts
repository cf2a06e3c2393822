import { describe, expect, it } from 'vitest';
import {
  eventsToDraw,
  firstRows,
  mostCommon,
  needsRedraw,
  reservedHeight,
  rowsToDraw,
  stackDepths,
  type LaneBox,
} from '@/components/board/event-window';

/** 300 rows of 40 px, one under the other, as the timeline lays out a board with every group open. */
const lanes: LaneBox[] = Array.from({ length: 300 }, (_, i) => ({ id: `r${i}`, top: i * 40, height: 40 }));
const HOUR = 3_600_000;

describe('the rows whose bookings a large board draws', () => {
  it('are those in view and one viewport above and below, not the other 270', () => {
    // View 4,000–4,800 px: rows 100–119; a viewport (800 px, 20 rows) either side: rows 80–139.
    const drawn = rowsToDraw(lanes, { top: 4000, height: 800 });
    expect(drawn.size).toBe(60);
    expect(drawn.has('r80')).toBe(true);
    expect(drawn.has('r139')).toBe(true);
    expect(drawn.has('r79')).toBe(false);
    expect(drawn.has('r140')).toBe(false);
  });

  it('at the top of the board: the rows in view and the viewport below', () => {
    expect([...rowsToDraw(lanes, { top: 0, height: 800 })]).toEqual(Array.from({ length: 40 }, (_, i) => `r${i}`));
  });

  it('a row touching the view only at its edge is not in it', () => {
    // Rows 20–39 drawn; a 400 px view at 1,000 px looks 200 px either side: 800–1,600 px, rows 20–39.
    const drawn = new Set(Array.from({ length: 20 }, (_, i) => `r${20 + i}`));
    expect(needsRedraw(lanes, drawn, { top: 1000, height: 400 })).toBe(false);
    expect(needsRedraw(lanes, drawn, { top: 999, height: 400 })).toBe(true); // row 19 ends at 800 px
  });

  it('scrolling within the drawn rows draws nothing new; coming within half a view of an undrawn row does', () => {
    const drawn = rowsToDraw(lanes, { top: 4000, height: 800 }); // rows 80–139, 3,200–5,600 px
    expect(needsRedraw(lanes, drawn, { top: 4000, height: 800 })).toBe(false);
    expect(needsRedraw(lanes, drawn, { top: 4400, height: 800 })).toBe(false); // looks at 4,000–5,600 px
    expect(needsRedraw(lanes, drawn, { top: 4440, height: 800 })).toBe(true); // row 140 is near
    expect(needsRedraw(lanes, drawn, { top: 3600, height: 800 })).toBe(false); // looks at 3,200–4,800 px
    expect(needsRedraw(lanes, drawn, { top: 3560, height: 800 })).toBe(true); // row 79, above
  });
});

describe('the rows at the top of a board opening with its groups open', () => {
  it('are the first in the timeline’s order: group, then kind, then name', () => {
    const rows = [
      { id: 'p1', group: '2 Fellside Crane Hire|Fellside Crane Hire', kind: 'crane', title: 'Crane 40 t' },
      { id: 'm2', group: '1|Our machines', kind: 'pallet_truck', title: 'Pallet truck B' },
      { id: 'm1', group: '1|Our machines', kind: 'excavator', title: 'Excavator 3 t' },
      { id: 'c2', group: '0|Our crews', kind: 'install_crew', title: 'Crew Wren' },
      { id: 'c1', group: '0|Our crews', kind: 'install_crew', title: 'Crew Heron' },
    ];
    expect(firstRows(rows, 4)).toEqual(['c1', 'c2', 'm1', 'm2']);
    expect(firstRows(rows, 0)).toEqual([]);
  });
});

describe('how deep a row stacks its bookings', () => {
  const DAY = 24 * HOUR;
  const mon = Date.UTC(2027, 1, 1);

  it('counts the most bookings overlapping at once on each row', () => {
    const depths = stackDepths([
      { resourceId: 'a', start: mon + 8 * HOUR, end: mon + 12 * HOUR },
      { resourceId: 'a', start: mon + 10 * HOUR, end: mon + 14 * HOUR },
      { resourceId: 'a', start: mon + 11 * HOUR, end: mon + 13 * HOUR },
      { resourceId: 'b', start: mon + 8 * HOUR, end: mon + 12 * HOUR },
    ]);
    expect(depths.get('a')).toBe(3);
    expect(depths.get('b')).toBe(1);
    expect(depths.has('c')).toBe(false);
  });

  it('one booking ending as the next starts takes one level, not two', () => {
    // The later one listed first: the order on the board must not matter.
    const depths = stackDepths([
      { resourceId: 'a', start: mon + 12 * HOUR, end: mon + 16 * HOUR },
      { resourceId: 'a', start: mon + 8 * HOUR, end: mon + 12 * HOUR },
    ]);
    expect(depths.get('a')).toBe(1);
  });

  it('with whole-day slots a morning and an afternoon booking stack, as the month view draws them', () => {
    const spans = [
      { resourceId: 'a', start: mon + 8 * HOUR, end: mon + 12 * HOUR },
      { resourceId: 'a', start: mon + 13 * HOUR, end: mon + 17 * HOUR },
      { resourceId: 'a', start: mon + DAY + 8 * HOUR, end: mon + DAY + 12 * HOUR },
    ];
    const toDays = (s: number, e: number): [number, number] => [Math.floor(s / DAY) * DAY, Math.ceil(e / DAY) * DAY];
    expect(stackDepths(spans).get('a')).toBe(1);
    expect(stackDepths(spans, toDays).get('a')).toBe(2);
  });
});

describe('the height an undrawn row keeps', () => {
  const known = {
    measured: new Map([['a', 79]]),
    depths: new Map([
      ['a', 1],
      ['b', 1],
      ['c', 3],
      ['d', 0],
    ]),
    byDepth: new Map([[1, 79]]),
    levelHeight: 69,
  };

  it('is what it measured when its bookings were drawn', () => {
    expect(reservedHeight('a', { ...known, measured: new Map([['a', 95]]) })).toBe(95);
  });
  it('else what a drawn row as deep measured', () => {
    expect(reservedHeight('b', known)).toBe(79);
  });
  it('else its depth times one level', () => {
    expect(reservedHeight('c', known)).toBe(207);
  });
  it('nothing for a row without bookings', () => {
    expect(reservedHeight('d', known)).toBe(0);
    expect(reservedHeight('unknown', { ...known, byDepth: new Map() })).toBe(0);
  });
});

describe('the height most rows of a depth had', () => {
  it('is the one counted most, not the last or the tallest', () => {
    expect(
      mostCommon(
        new Map([
          [95, 3],
          [79, 20],
          [111, 1],
        ]),
      ),
    ).toBe(79);
  });
  it('a tie goes to the smaller', () => {
    expect(
      mostCommon(
        new Map([
          [95, 2],
          [79, 2],
        ]),
      ),
    ).toBe(79);
  });
});

describe('the bookings handed to the timeline', () => {
  const events = [
    { id: '1', resourceId: 'r1', classNames: ['wl-booking'] },
    { id: '2', resourceId: 'r200', classNames: ['wl-booking'] },
    { id: '3', resourceId: 'r250', classNames: ['wl-booking', 'wl-pointed'] },
  ];
  it('are the drawn rows’ and any a report points at, wherever its row is', () => {
    expect(eventsToDraw(events, new Set(['r1']), ['wl-pointed']).map((e) => e.id)).toEqual(['1', '3']);
  });
});
