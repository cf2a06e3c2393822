import { describe, expect, it } from 'vitest';
import { parseReading } from '@/components/commissioning/readings';

describe('a reading typed on a phone', () => {
  it('takes a decimal point or comma, and an empty field as not taken', () => {
    expect([' 7,4 ', '7.45', '110', '', '  '].map(parseReading)).toEqual([7.4, 7.45, 110, null, null]);
  });

  it('refuses what is not a reading rather than guessing', () => {
    expect(['7.4.1', '-1', '7e1', 'seven', '7.456', '12345'].map(parseReading)).toEqual(Array(6).fill('invalid'));
  });
});
