import { describe, expect, it } from 'vitest';
import { IdMap } from '../../../shared/scheduler/id-map.js';
import { formatDayOfWeek } from '../../../shared/scheduler/format.js';
import { dayNumber, isoDateOfDay } from '../../../shared/scheduler/time-zone.js';

interface Item {
  id: string;
  n: number;
}
const idOf = (item: Item) => item.id;

describe('stages by id (IdMap, the board index’s `stages`)', () => {
  const items: Item[] = Array.from({ length: 5000 }, (_, n) => ({ id: `job-${n >> 3}-s${n & 7}`, n }));
  const byId = new IdMap(items, idOf);

  it('finds every item by its id and nothing else', () => {
    expect(byId.size).toBe(5000);
    expect(byId.get('job-0-s0')?.n).toBe(0);
    expect(byId.get('job-624-s7')?.n).toBe(4999);
    expect(byId.get('job-625-s0')).toBeUndefined();
    expect(byId.has('job-17-s3')).toBe(true);
    expect(byId.has('')).toBe(false);
  });

  it('keeps the last of two items with one id, in the place of the first, as a Map does', () => {
    const list: Item[] = [
      { id: 'a', n: 1 },
      { id: 'b', n: 2 },
      { id: 'a', n: 3 },
    ];
    const m = new IdMap(list, idOf);
    expect(m.size).toBe(2);
    expect(m.get('a')?.n).toBe(3);
    expect([...m].map(([id, item]) => `${id}${item.n}`)).toEqual(['a3', 'b2']);
  });

  it('iterates in list order, like the Map it replaces', () => {
    expect([...byId.keys()].slice(0, 3)).toEqual(['job-0-s0', 'job-0-s1', 'job-0-s2']);
    expect([...byId.values()].at(-1)?.n).toBe(4999);
    const seen: string[] = [];
    byId.forEach((item, id, map) => {
      if (item.n < 2) seen.push(`${id}:${map === byId}`);
    });
    expect(seen).toEqual(['job-0-s0:true', 'job-0-s1:true']);
  });
});

describe('dates of day numbers without a Date', () => {
  it('gives the ISO date and the words a Date would give across four-digit years', () => {
    // Every day from 1900 to 2100 and a stride through the rest of years 1000–9999, against the
    // Date-based text the engine used before (Date is the reference).
    const days: number[] = [];
    for (let d = dayNumber(1900, 1, 1); d <= dayNumber(2100, 12, 31); d++) days.push(d);
    for (let d = dayNumber(1000, 1, 1); d <= dayNumber(9999, 12, 31); d += 97) days.push(d);
    const wrong = days.filter((d) => {
      const iso = new Date(d * 86_400_000).toISOString().slice(0, 10);
      const words = new Date(`${iso}T12:00:00Z`).toUTCString().slice(0, 11).replace(',', ''); // "Tue 12 May"
      const [wd, dd, mon] = words.split(' ');
      return isoDateOfDay(d) !== iso || formatDayOfWeek(d) !== `${wd} ${Number(dd)} ${mon}`;
    });
    expect(wrong).toEqual([]);
  });

  it('names 29 February 2028 and 31 December 9999 (hand-checked: 2028 is a leap year, 9999-12-31 a Friday)', () => {
    expect(isoDateOfDay(dayNumber(2028, 2, 29))).toBe('2028-02-29');
    expect(formatDayOfWeek(dayNumber(2028, 2, 29))).toBe('Tue 29 Feb');
    expect(formatDayOfWeek(dayNumber(9999, 12, 31))).toBe('Fri 31 Dec');
  });

  it('leaves years outside 1000–9999 to a Date', () => {
    expect(formatDayOfWeek(dayNumber(10000, 1, 1))).toBeUndefined();
    expect(isoDateOfDay(dayNumber(999, 12, 31))).toBe('0999-12-31');
    expect(isoDateOfDay(1.5)).toBe('1970-01-02');
  });
});
