import { describe, expect, it } from 'vitest';
import { addMonths, DEFAULT_SERVICE_PLAN, monthName, serviceVisitDates } from '../../shared/service-plan.ts';

describe('service visit dates', () => {
  it('count calendar months, ending on the last day of a shorter month', () => {
    expect(addMonths('2026-06-01', 3)).toBe('2026-09-01');
    expect(addMonths('2026-11-30', 3)).toBe('2027-02-28');
    expect(addMonths('2027-11-30', 3)).toBe('2028-02-29'); // 2028 is a leap year
    expect(addMonths('2026-10-31', 15)).toBe('2028-01-31');
  });

  it('follow the default plan from a handover: 3 months, then every 12, two ahead, promised ± 14 days', () => {
    expect(serviceVisitDates('2026-05-31', DEFAULT_SERVICE_PLAN)).toEqual([
      { number: 1, dueOn: '2026-08-31', promisedFrom: '2026-08-17', promisedTo: '2026-09-14' },
      { number: 2, dueOn: '2027-08-31', promisedFrom: '2027-08-17', promisedTo: '2027-09-14' },
    ]);
    expect(
      serviceVisitDates('2026-12-15', { firstAfterMonths: 6, everyMonths: 6, visitsAhead: 3 }).map((v) => v.dueOn),
    ).toEqual(['2027-06-15', '2027-12-15', '2028-06-15']);
    expect(monthName('2027-06-15')).toBe('June 2027');
  });
});
