import { describe, expect, it } from 'vitest';
import { planCostLines, pounds } from '@/components/board/plan-costs';
import type { AutoPlaceResult } from '@shared/scheduler/index';

const NOW = Date.UTC(2026, 5, 1, 7); // TEST_TODAY: Monday 1 June 2026, 08:00 in London (BST)
const HOUR = 3_600_000;
const costs = (over: Partial<AutoPlaceResult['costs']> = {}): AutoPlaceResult['costs'] => ({
  unplacedStages: 0,
  lateJobs: 0,
  latenessMinutes: 0,
  finishMinutes: 0,
  idleHirePence: 0,
  crewChanges: 0,
  ...over,
});
const placed = (end: number) => ({ stageId: 's', start: end - 2 * HOUR, end, resourceIds: ['r'] });

describe('what an auto-place plan costs, in words', () => {
  it('says each objective plainly for a clean plan', () => {
    // The last stage ends Thursday 18 June 2026 at 16:00 in London (15:00 UTC).
    const result = {
      costs: costs({ crewChanges: 1 }),
      placed: [placed(Date.UTC(2026, 5, 9, 10)), placed(Date.UTC(2026, 5, 18, 15))],
      source: 'search' as const,
    };
    expect(planCostLines(result, 'Europe/London', NOW)).toEqual([
      'Every stage placed',
      'No job past its promised date',
      'Finishes Thu 18 Jun',
      'Idle paid hire: £0',
      'Crew changes within the job: 1',
      'Best of the plans the search tried',
    ]);
  });

  it('counts what is wrong, with plurals, and dates the finish on the firm’s calendar', () => {
    // 23:30 UTC on Wednesday 6 January 2027 is still Wednesday in London, already Thursday in Auckland;
    // the year shows because it is not this year's.
    const lateEnd = Date.UTC(2027, 0, 6, 23, 30);
    const result = {
      costs: costs({ unplacedStages: 2, lateJobs: 1, latenessMinutes: 1441, idleHirePence: 43_550, crewChanges: 0 }),
      placed: [placed(lateEnd)],
      source: 'single-pass' as const,
    };
    expect(planCostLines(result, 'Europe/London', NOW)).toEqual([
      '2 stages could not be placed',
      '1 job past its promised date, 2 days late',
      'Finishes Wed 6 Jan 2027',
      'Idle paid hire: £435.50',
      'Crew changes within the job: 0',
      'The first plan: the search found none better',
    ]);
    expect(planCostLines(result, 'Pacific/Auckland', NOW)[2]).toBe('Finishes Thu 7 Jan 2027');
  });

  it('speaks of several late jobs together, and of hours under a day', () => {
    const two = planCostLines(
      { costs: costs({ unplacedStages: 1, lateJobs: 2, latenessMinutes: 3000 }), placed: [], source: 'search' },
      'Europe/London',
      NOW,
    );
    expect(two.slice(0, 3)).toEqual([
      '1 stage could not be placed',
      '2 jobs past their promised dates, 3 days late in all',
      'Idle paid hire: £0',
    ]);
    const hours = planCostLines(
      { costs: costs({ lateJobs: 1, latenessMinutes: 61 }), placed: [], source: 'search' },
      'Europe/London',
      NOW,
    );
    expect(hours[1]).toBe('1 job past its promised date, 2 hours late');
  });

  it('writes pounds without pence when there are none', () => {
    expect([pounds(0), pounds(14_500), pounds(1_250), pounds(1_234_500)]).toEqual(['£0', '£145', '£12.50', '£12,345']);
  });
});
