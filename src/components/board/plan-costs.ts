import type { AutoPlaceResult } from '@shared/scheduler/index';
import { localDateOf } from '@shared/local-dates';
import { plural } from '@shared/plural';
import { currentYearIn, formatCalendarDate } from '@/utils/dates';

const DAY_MINUTES = 1440;

/**
 * Pence as pounds, without the pence when there are none: "£0", "£145", "£12.50".
 *
 * @example
 * pounds(14500) // '£145'
 */
export function pounds(pence: number): string {
  const whole = Math.round(pence) % 100 === 0;
  const value = (Math.round(pence) / 100).toLocaleString(
    'en-GB',
    whole ? { maximumFractionDigits: 0 } : { minimumFractionDigits: 2, maximumFractionDigits: 2 },
  );
  return `£${value}`;
}

/**
 * Minutes late, as the office counts it: whole days once past a day (a job promised for a day and
 * finished the next is a day late whatever the hour), hours below that.
 */
function lateness(minutes: number): string {
  if (minutes >= DAY_MINUTES) return plural(Math.ceil(minutes / DAY_MINUTES), 'day');
  return plural(Math.max(1, Math.ceil(minutes / 60)), 'hour');
}

/**
 * What an auto-place plan costs on each of the planner's objectives, one plain sentence each, in
 * the order the planner weighs them (stages placed, promised dates, finish, idle hire, crew changes),
 * then which plan won. The finish is the latest end among the placed stages, as a date in the
 * firm's zone (the year shown only when it is not this year's).
 *
 * @example
 * planCostLines(result, 'Europe/London', now)
 * // ['Every stage placed', 'No job past its promised date', 'Finishes Thu 18 Jun',
 * //  'Idle paid hire: £0', 'Crew changes within the job: 1', 'Best of the plans the search tried']
 */
export function planCostLines(
  result: Pick<AutoPlaceResult, 'costs' | 'placed' | 'source'>,
  timeZone: string,
  now: number,
): string[] {
  const { costs } = result;
  const lines: string[] = [];
  lines.push(
    costs.unplacedStages === 0 ? 'Every stage placed' : `${plural(costs.unplacedStages, 'stage')} could not be placed`,
  );
  if (costs.lateJobs === 0) lines.push('No job past its promised date');
  else if (costs.lateJobs === 1) lines.push(`1 job past its promised date, ${lateness(costs.latenessMinutes)} late`);
  else
    lines.push(
      `${plural(costs.lateJobs, 'job')} past their promised dates, ${lateness(costs.latenessMinutes)} late in all`,
    );
  if (result.placed.length > 0) {
    const finish = Math.max(...result.placed.map((p) => p.end));
    const currentYear = currentYearIn(timeZone, now);
    lines.push(`Finishes ${formatCalendarDate(localDateOf(finish, timeZone), { currentYear })}`);
  }
  lines.push(`Idle paid hire: ${pounds(costs.idleHirePence)}`);
  lines.push(`Crew changes within the job: ${costs.crewChanges}`);
  lines.push(
    result.source === 'search' ? 'Best of the plans the search tried' : 'The first plan: the search found none better',
  );
  return lines;
}
