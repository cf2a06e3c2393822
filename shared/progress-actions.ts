/**
 * The progress a crew may mark on one of its bookings, worked out the same way by the server (My
 * work's buttons, and the writer's refusals) and by a phone showing a step it kept without a signal.
 */
import { PROGRESS_ACTIONS, type BookingState, type ProgressAction } from './schemas/bookings.ts';
import { actionsFor, nextState, type ResourceSide } from './booking-states.ts';
import { localDateOf } from './local-dates.ts';

/** What the rule reads of a booking. */
export interface ProgressOf {
  state: string;
  /** Whose resource the booking is on: the installer's own, or a partner firm's. */
  side: ResourceSide;
  startsAt: string;
  endsAt: string;
}

/**
 * The state machine's crew actions on the booking now, with "arrive" only on a day the booking
 * covers in the firm's zone (the writer refuses it on any other day).
 *
 * @example
 * progressActions({ state: 'confirmed', side: 'own', startsAt: '2026-06-01T07:00:00Z', endsAt: '2026-06-01T11:00:00Z' }, '2026-06-01', 'Europe/London') // ['arrive']
 */
export function progressActions(booking: ProgressOf, today: string, timeZone: string): ProgressAction[] {
  const allowed = actionsFor(booking.state as BookingState, { party: 'crew', side: booking.side });
  const first = localDateOf(Date.parse(booking.startsAt), timeZone);
  const last = localDateOf(Date.parse(booking.endsAt) - 1, timeZone);
  return PROGRESS_ACTIONS.filter((a) => allowed.includes(a) && (a !== 'arrive' || (first <= today && today <= last)));
}

/**
 * The state after a crew's step, or null when the state machine refuses it.
 * @example stateAfterProgress('on_site', 'own', 'finish') // 'done'
 */
export function stateAfterProgress(state: string, side: ResourceSide, action: ProgressAction): BookingState | null {
  const next = nextState(action, state as BookingState, { party: 'crew', side });
  return next.ok && next.to !== 'removed' ? next.to : null;
}
