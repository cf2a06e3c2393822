import { describe, expect, it } from 'vitest';
import { csvField, toCsv } from '../../../shared/reports/csv.ts';
import { hireSuggestions } from '../../../shared/reports/hire.ts';
import { weeksFrom, weekOfDate } from '../../../shared/reports/weeks.ts';
import { unionWithin } from '../../../shared/reports/utilisation.ts';

describe('CSV per RFC 4180', () => {
  it('quotes commas, quotes and newlines, doubles quotes, ends lines with CRLF', () => {
    expect(csvField('Dig, then pour')).toBe('"Dig, then pour"');
    expect(csvField('the "big" crane')).toBe('"the ""big"" crane"');
    expect(csvField('line one\nline two')).toBe('"line one\nline two"');
    expect(
      toCsv(
        [{ a: 'x', b: 2 }],
        [
          { header: 'A', value: (r) => r.a },
          { header: 'B', value: (r) => r.b },
        ],
      ),
    ).toBe('A,B\r\nx,2\r\n');
  });
  it('keeps spreadsheet formulas from running but leaves negative numbers alone', () => {
    expect(csvField('=SUM(A1:A9)')).toBe("'=SUM(A1:A9)");
    expect(csvField('-5.00')).toBe('-5.00');
    expect(csvField(null)).toBe('');
  });
});

describe('hire suggestions', () => {
  const week = ['2026-06-22', '2026-06-23', '2026-06-24', '2026-06-25', '2026-06-26'];
  const charges = { deliveryPence: 6000, collectionPence: 6000 };
  it('offers a later on-hire and an earlier off-hire for idle days at either end', () => {
    // Booked Tue and Wed only: Mon idle (1 × £145.00), Thu and Fri idle (2 × £145.00 = £290.00).
    const s = hireSuggestions(week, new Set(['2026-06-22', '2026-06-25', '2026-06-26']), 14500, charges, '2026-06-01');
    expect(s.map((x) => x.label)).toEqual([
      'On-hire 1 day later (first paid day Tue 23 Jun): saves £145.00',
      'Off-hire 2 days earlier (last paid day Wed 24 Jun): saves £290.00',
    ]);
    // Each names the day the hire's dates form is filled with: Tue 23 the first, Wed 24 the last.
    expect(s.map((x) => x.change)).toEqual([{ onHireDate: '2026-06-23' }, { offHireDate: '2026-06-24' }]);
  });
  it('offers to cancel a hire with nothing booked, delivery and collection included', () => {
    // 5 × £145.00 + £60.00 + £60.00 = £845.00
    expect(hireSuggestions(week, new Set(week), 14500, charges, '2026-06-01')).toEqual([
      {
        kind: 'end',
        savesPence: 84500,
        cancel: true,
        label: 'Nothing is booked on this hire: cancel it: saves £845.00',
      },
    ]);
    // Started on Mon 22 (today is Wed 24): Wed, Thu and Fri can still be saved, 3 × £145.00 = £435.00,
    // by an off-hire after Tue 23, the last day already paid.
    expect(hireSuggestions(week, new Set(week), 14500, charges, '2026-06-24')).toEqual([
      {
        kind: 'end',
        savesPence: 43500,
        change: { offHireDate: '2026-06-23' },
        label: 'Nothing is booked on this hire: off-hire it now: saves £435.00',
      },
    ]);
  });
  it('offers to off-hire over a middle gap only when it costs more than collecting and delivering again', () => {
    const fortnight = [...week, '2026-06-29', '2026-06-30', '2026-07-01', '2026-07-02', '2026-07-03'];
    const idle = new Set([
      '2026-06-23',
      '2026-06-24',
      '2026-06-25',
      '2026-06-26',
      '2026-06-29',
      '2026-06-30',
      '2026-07-01',
      '2026-07-02',
    ]);
    // 8 idle days × £145.00 = £1,160.00, less £120.00 collection and delivery = £1,040.00
    expect(hireSuggestions(fortnight, idle, 14500, charges, '2026-06-01')).toEqual([
      expect.objectContaining({ kind: 'split', savesPence: 104000 }),
    ]);
    // One idle day at £100.00 saves less than the £120.00 of another collection and delivery: nothing to suggest.
    expect(hireSuggestions(week, new Set(['2026-06-24']), 10000, charges, '2026-06-01')).toEqual([]);
  });
  it('counts only days still to come', () => {
    // Today is Thu 25 Jun: Mon 22 is paid already; Thu and Fri can still be saved.
    const s = hireSuggestions(week, new Set(['2026-06-22', '2026-06-25', '2026-06-26']), 14500, charges, '2026-06-25');
    expect(s.map((x) => x.kind)).toEqual(['shorten_end']);
  });
});

describe('report weeks and booked time', () => {
  it('starts weeks on the local Monday (BST in June)', () => {
    expect(weeksFrom(Date.parse('2026-06-03T12:00:00Z'), 'Europe/London', 2)).toEqual({
      from: '2026-05-31T23:00:00.000Z',
      to: '2026-06-14T23:00:00.000Z',
    });
    expect(weekOfDate('2026-06-28')).toBe('2026-06-22'); // a Sunday belongs to the week before
  });
  it('merges overlapping bookings so shared time counts once', () => {
    expect(
      unionWithin(
        [
          { start: 0, end: 10 },
          { start: 5, end: 20 },
          { start: 30, end: 40 },
        ],
        0,
        35,
      ),
    ).toEqual([
      { start: 0, end: 20 },
      { start: 30, end: 35 },
    ]);
  });
});
