import { describe, expect, it } from 'vitest';
import { formatPence } from '../../../shared/scheduler/index.ts';

describe("the engine's money in messages", () => {
  it('reads as the invoices and the payments card read it: thousands separated, to the penny', () => {
    expect(formatPence(130_500)).toBe('£1,305.00');
    expect(formatPence(14_500)).toBe('£145.00');
    expect(formatPence(0)).toBe('£0.00');
  });

  it('rounds a worked-out amount to the nearest penny rather than refusing it', () => {
    expect(formatPence(45_000.4)).toBe('£450.00');
    expect(formatPence(45_000.5)).toBe('£450.01');
  });
});
