import { describe, expect, it } from 'vitest';
import { depositOf, formatPence } from '../../shared/money.ts';

describe('money in pence', () => {
  it('reads as pounds with two decimals and thousands separators', () => {
    expect(formatPence(0)).toBe('£0.00');
    expect(formatPence(5)).toBe('£0.05');
    expect(formatPence(123_456)).toBe('£1,234.56');
    expect(formatPence(1_000_000_00)).toBe('£1,000,000.00');
    expect(formatPence(-500)).toBe('-£5.00');
  });

  it('refuses a fraction of a penny', () => {
    expect(() => formatPence(10.5)).toThrow(RangeError);
  });

  it('works out a deposit to the nearest penny, half a penny up', () => {
    expect(depositOf(1_249_900, 25)).toBe(312_475);
    expect(depositOf(999, 50)).toBe(500);
    expect(depositOf(1_000_000, 100)).toBe(1_000_000);
  });
});
