import { describe, expect, it } from 'vitest';
import { unitArrivalLine } from '../../shared/unit-arrival.ts';

const carrow = (startsAt: string, endsAt: string) => ({ startsAt, endsAt, firmName: 'Carrow Haulage' });

describe('when the unit arrives, on the lift or placement visit', () => {
  it('gives the times alone when it comes that morning (London, GMT in December)', () => {
    expect(
      unitArrivalLine(carrow('2026-12-07T08:00:00Z', '2026-12-07T10:00:00Z'), '2026-12-07T10:00:00Z', 'Europe/London'),
    ).toBe('The unit arrives 08:00–10:00 on Carrow Haulage’s lorry');
  });

  it('gives the day too when it comes before (BST in June: 14:00 UTC is 15:00)', () => {
    expect(
      unitArrivalLine(carrow('2026-06-05T14:00:00Z', '2026-06-05T16:00:00Z'), '2026-06-08T07:00:00Z', 'Europe/London'),
    ).toBe('The unit arrives Fri 5 Jun 15:00–17:00 on Carrow Haulage’s lorry');
  });

  it('says nothing while the delivery is not booked', () => {
    expect(unitArrivalLine(null, '2026-12-07T10:00:00Z', 'Europe/London')).toBeNull();
  });
});
