import { formatInstant } from './scheduler/format.ts';
import { localDateOf } from './local-dates.ts';

/**
 * When the unit arrives, said on the visit of the stage the delivery comes before (the lift, the
 * placement), so the crew is ready to take it off the lorry: the times alone when it comes that day,
 * the day and times when it comes before.
 *
 * @example
 * // Lift Mon 7 Dec 10:00 London, delivery 08:00–10:00 the same morning:
 * unitArrivalLine({ startsAt: '2026-12-07T08:00:00Z', endsAt: '2026-12-07T10:00:00Z', firmName: 'Carrow Haulage' },
 *   '2026-12-07T10:00:00Z', 'Europe/London') // 'The unit arrives 08:00–10:00 on Carrow Haulage’s lorry'
 */
export function unitArrivalLine(
  arrives: { startsAt: string; endsAt: string; firmName: string } | null,
  visitStartsAt: string,
  timeZone: string,
): string | null {
  if (arrives === null) return null;
  const from = formatInstant(Date.parse(arrives.startsAt), timeZone);
  const to = formatInstant(Date.parse(arrives.endsAt), timeZone).slice(-5);
  const sameDay =
    localDateOf(Date.parse(arrives.startsAt), timeZone) === localDateOf(Date.parse(visitStartsAt), timeZone);
  return `The unit arrives ${sameDay ? from.slice(-5) : from}–${to} on ${arrives.firmName}’s lorry`;
}
