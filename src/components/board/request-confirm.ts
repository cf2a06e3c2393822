/**
 * The words of the confirmations before refusing a partner's proposed time or cancelling a request.
 * Neither goes on the board's undo stack: each sends the partner an e-mail (a refusal asks them
 * again to confirm the original time; a cancellation carries a calendar cancellation) that no undo
 * can take back, and a partner's confirmation cannot be restored without faking their answer. So
 * the board asks first, and says so. Pure, so it is tested without a browser.
 */
import type { BoardBooking, BoardResource } from '@shared/board-data';
import { formatInstant } from '@shared/scheduler/index';

export interface ConfirmWords {
  title: string;
  content: string;
  yes: string;
  no: string;
}

/**
 * Before refusing a proposed time.
 * @example refuseWords(booking, crane, 'Europe/London').yes // 'Refuse and ask again'
 */
export function refuseWords(
  b: Pick<BoardBooking, 'start' | 'proposal'>,
  resource: Pick<BoardResource, 'name' | 'firmName'> | undefined,
  timeZone: string,
): ConfirmWords {
  const firm = resource?.firmName ?? 'The partner';
  const proposed = b.proposal ? ` ${formatInstant(b.proposal.start, timeZone)}` : ' another time';
  return {
    title: 'Refuse the proposed time?',
    content: `${firm} proposed${proposed}. Refusing keeps ${resource?.name ?? 'the booking'} on ${formatInstant(b.start, timeZone)} and asks them by e-mail to confirm that time again. This can't be undone.`,
    yes: 'Refuse and ask again',
    no: 'Keep the proposal open',
  };
}

/**
 * Before cancelling a request (sent, or already confirmed).
 * @example cancelWords({ state: 'confirmed', start }, crane, 'Europe/London').title // 'Cancel the request to Fellside Crane Hire?'
 */
export function cancelWords(
  b: Pick<BoardBooking, 'start' | 'state'>,
  resource: Pick<BoardResource, 'name' | 'firmName'> | undefined,
  timeZone: string,
): ConfirmWords {
  const firm = resource?.firmName ?? 'the partner';
  const what = `${resource?.name ?? 'this booking'} on ${formatInstant(b.start, timeZone)}`;
  const asked = b.state === 'confirmed' ? `${firm} has confirmed ${what}` : `${firm} has been asked for ${what}`;
  return {
    title: `Cancel the request to ${firm}?`,
    content: `${asked}. Cancelling tells them by e-mail, with a calendar cancellation; the booking stays on the board as pencilled. This can't be undone: to ask them again, send the request again${b.state === 'confirmed' ? ' (they will have to confirm again)' : ''}.`,
    yes: 'Cancel the request and tell them',
    no: 'Keep the request',
  };
}
