import { describe, expect, it } from 'vitest';
import { plural } from '../../shared/plural.ts';

describe('plural', () => {
  it('says "1 day" and "2 days", never "1 days"', () => {
    expect([plural(1, 'day'), plural(2, 'day'), plural(0, 'booking'), plural(1.5, 'working day')]).toEqual([
      '1 day',
      '2 days',
      '0 bookings',
      '1.5 working days',
    ]);
  });

  it('follows the regular English endings, and takes an irregular plural when given', () => {
    expect([
      plural(3, 'lorry'),
      plural(2, 'pass'),
      plural(4, 'skip'),
      plural(2, 'day'),
      plural(2, 'person', 'people'),
      plural(1, 'person', 'people'),
    ]).toEqual(['3 lorries', '2 passes', '4 skips', '2 days', '2 people', '1 person']);
  });

  it('gives the noun alone when asked', () => {
    expect([plural(2, 'day', undefined, false), plural(1, 'day', undefined, false)]).toEqual(['days', 'day']);
  });
});
