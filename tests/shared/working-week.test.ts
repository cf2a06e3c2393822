import { describe, expect, it } from 'vitest';
import { weekWords } from '../../shared/working-week.ts';

/* The stored form: weekday number (0 = Sunday) → [start, end] minutes of the local day. */
const day = (from: number, to: number): [number, number][] => [[from * 60, to * 60]];

describe('a working week in a line', () => {
  it('runs days with the same hours together, Monday first', () => {
    const weekdays = Object.fromEntries([1, 2, 3, 4, 5].map((d) => [String(d), day(8, 17)]));
    expect(weekWords({ ...weekdays, '6': day(8, 12) })).toBe('Mon–Fri 08:00–17:00; Sat 08:00–12:00');
  });
  it('names two days in a row by both, and breaks a run at a day not worked', () => {
    expect(weekWords({ '6': day(9, 13), '0': day(9, 13) })).toBe('Sat, Sun 09:00–13:00');
    expect(weekWords({ '1': day(8, 17), '3': day(8, 17) })).toBe('Mon 08:00–17:00; Wed 08:00–17:00');
  });
  it('says both spans of a split day, and a finish at 24:00 as midnight', () => {
    expect(weekWords({ '1': [...day(7, 12), ...day(13, 16.5)], '5': day(16, 24) })).toBe(
      'Mon 07:00–12:00 and 13:00–16:30; Fri 16:00–midnight',
    );
  });
  it('says so when no day is worked', () => {
    expect(weekWords({})).toBe('No working days');
  });
});
