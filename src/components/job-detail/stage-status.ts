/**
 * What the job page's stage list says of a stage's bookings: how far its booked work has got, in
 * the board's words and symbols (declined bookings don't count), a decline to book again (by whom,
 * and where on the board), or not booked. Pure, so it is tested without a browser.
 */
import type { JobStage, StageBooking } from '@/api/job-work';
import { STATE_LABELS } from '@/components/board/board-events';
import { humanise } from '@/utils/labels';
import type { BookingState } from '@shared/schemas/bookings';
import type { KeptMark } from '@/components/my-work/kept-marks';
import { PROGRESS_WORDS } from '@/components/my-work/my-work';
import { dateWords, localDateOf, localTimeOf } from '@shared/local-dates';
import { plural } from '@shared/plural';

export interface StageBookingStatus {
  /** Bookings that stand (every state but declined). */
  booked: number;
  /**
   * How far the stage has got, from its standing bookings: done when all are done, on site once
   * any work has started, otherwise the least advanced of pencilled, asked and confirmed (a stage
   * is only confirmed when every crew, machine and partner on it is). Null when nothing stands.
   */
  progress: { state: BookingState; text: string } | null;
  /** "Declined by 60 t mobile crane — book again", or null when nothing was declined. */
  declined: string | null;
  /** The board at the first declined booking's day, for this job, with it outlined. */
  rebookLink: string | null;
}

/**
 * @example
 * stageBookingStatus('14', [{ id: '31', resourceName: '60 t mobile crane', state: 'declined', startsAt: '2026-06-09T07:00:00Z', … }], 'Europe/London')
 * // { booked: 0, progress: null, declined: 'Declined by 60 t mobile crane — book again', rebookLink: '/board?view=day&date=2026-06-09&job=14&highlight=31' }
 */
export function stageBookingStatus(
  jobId: string,
  bookings: readonly Pick<StageBooking, 'id' | 'resourceName' | 'startsAt' | 'state'>[],
  timeZone: string,
): StageBookingStatus {
  const declined = bookings.filter((b) => b.state === 'declined');
  const standing = bookings.filter((b) => b.state !== 'declined').map((b) => b.state as BookingState);
  const first = declined[0];
  const who = [...new Set(declined.map((b) => b.resourceName))].join(', ');
  return {
    booked: standing.length,
    progress: progressOf(standing),
    declined: first ? `Declined by ${who} — book again` : null,
    rebookLink: first
      ? `/board?${new URLSearchParams({ view: 'day', date: localDateOf(Date.parse(first.startsAt), timeZone), job: jobId, highlight: declined.map((b) => b.id).join(',') }).toString()}`
      : null,
  };
}

/** Before work starts, the least advanced state is where the stage stands. */
const BEFORE_WORK: readonly BookingState[] = ['pencilled', 'sent', 'confirmed'];

function progressOf(states: readonly BookingState[]): StageBookingStatus['progress'] {
  if (states.length === 0) return null;
  const state: BookingState = states.every((s) => s === 'done')
    ? 'done'
    : states.some((s) => s === 'on_site' || s === 'done')
      ? 'on_site'
      : (BEFORE_WORK.find((s) => states.includes(s)) ?? 'pencilled');
  const label = STATE_LABELS[state];
  // Asked of several firms, some may have said yes already.
  const confirmed = states.filter((s) => s === 'confirmed').length;
  const count = state === 'sent' && confirmed > 0 ? ` (${confirmed} of ${states.length} confirmed)` : '';
  return { state, text: `${label.symbol} ${label.label}${count}` };
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

/**
 * When the crew were marked on site, and done, on a booking that has got that far, said after its
 * state ("On site · since 09:30"): the time alone on the booking's first day, with the day on
 * another ("since Sun 31 May 09:30").
 *
 * @example
 * progressTimeWords({ state: 'done', startsAt: '2026-06-01T07:00:00Z', arrivedAt: '2026-06-01T07:10:00Z', doneAt: '2026-06-01T10:40:00Z', … }, 'Europe/London')
 * // 'from 08:10, done at 11:40'
 */
export function progressTimeWords(
  b: Pick<StageBooking, 'state' | 'startsAt' | 'arrivedAt' | 'doneAt'>,
  timeZone: string,
): string | null {
  const day = localDateOf(Date.parse(b.startsAt), timeZone);
  const when = (iso: string) => {
    const at = Date.parse(iso);
    return localDateOf(at, timeZone) === day
      ? localTimeOf(at, timeZone)
      : `${dateWords(localDateOf(at, timeZone))} ${localTimeOf(at, timeZone)}`;
  };
  if (b.state === 'on_site') return b.arrivedAt ? `since ${when(b.arrivedAt)}` : null;
  if (b.state !== 'done') return null;
  const parts: string[] = [];
  if (b.arrivedAt) parts.push(`from ${when(b.arrivedAt)}`);
  if (b.doneAt) parts.push(`done at ${when(b.doneAt)}`);
  return parts.length ? parts.join(', ') : null;
}

/**
 * Steps of a booking marked on this phone without a signal and not sent yet, said after its state
 * (which is still the server's): "on this phone, not sent yet: marked on site at 09:30".
 *
 * @example
 * keptStepWords('41', [{ bookingId: '41', action: 'arrive', markedAt: '2026-06-01T08:30:00Z', … }], 'Europe/London')
 * // 'on this phone, not sent yet: marked on site at 09:30'
 */
export function keptStepWords(bookingId: string, marks: readonly KeptMark[], timeZone: string): string | null {
  const own = marks.filter((m) => m.bookingId === bookingId);
  if (own.length === 0) return null;
  const steps = own.map((m) => `${PROGRESS_WORDS[m.action].done} at ${localTimeOf(Date.parse(m.markedAt), timeZone)}`);
  return `on this phone, not sent yet: ${steps.join(', then ')}`;
}
