/**
 * What the job page's stage list says of a stage's bookings: booked (declined bookings don't
 * count), a decline to book again (by whom, and where on the board), or not booked. Pure, so it is
 * tested without a browser.
 */
import type { JobStage, StageBooking } from '@/api/job-work';
import { humanise } from '@/utils/labels';
import { localDateOf } from '@shared/local-dates';
import { plural } from '@shared/plural';

export interface StageBookingStatus {
  /** Bookings that stand (every state but declined). */
  booked: number;
  /** "Declined by 60 t mobile crane — book again", or null when nothing was declined. */
  declined: string | null;
  /** The board at the first declined booking's day, for this job, with it outlined. */
  rebookLink: string | null;
}

/**
 * @example
 * stageBookingStatus('14', [{ id: '31', resourceName: '60 t mobile crane', state: 'declined', startsAt: '2026-06-09T07:00:00Z', … }], 'Europe/London')
 * // { booked: 0, declined: 'Declined by 60 t mobile crane — book again', rebookLink: '/board?view=day&date=2026-06-09&job=14&highlight=31' }
 */
export function stageBookingStatus(
  jobId: string,
  bookings: readonly Pick<StageBooking, 'id' | 'resourceName' | 'startsAt' | 'state'>[],
  timeZone: string,
): StageBookingStatus {
  const declined = bookings.filter((b) => b.state === 'declined');
  const first = declined[0];
  const who = [...new Set(declined.map((b) => b.resourceName))].join(', ');
  return {
    booked: bookings.length - declined.length,
    declined: first ? `Declined by ${who} — book again` : null,
    rebookLink: first
      ? `/board?${new URLSearchParams({ view: 'day', date: localDateOf(Date.parse(first.startsAt), timeZone), job: jobId, highlight: declined.map((b) => b.id).join(',') }).toString()}`
      : null,
  };
}

/**
 * The notice the engine checks before a stage (or one party's booking of it) may start, in words:
 * "10 working days' notice for the crane (time for a site visit and a lift plan), counted from booking".
 */
export function noticeText(n: NonNullable<JobStage['notice']>): string {
  const who = n.resourceKind ? ` for the ${humanise(n.resourceKind).toLowerCase()}` : '';
  const why = n.reason ? ` (${n.reason})` : '';
  const from = n.countedFrom === 'order' ? 'counted from the order date' : 'counted from booking';
  return `${plural(n.workingDays, "working day's", "working days'")} notice${who}${why}, ${from}`;
}
