import type { BookingState } from './schemas/bookings.ts';

/**
 * The booking state machine: the one table of who may take a booking from which state to which,
 * through which action. The server refuses anything not in it (409, in plain words); the board and
 * the partner and crew pages read it to decide which buttons exist.
 *
 * The parties:
 * - `office`: the installer's owner or scheduler, for a job of their own firm;
 * - `crew`: the installer's crew member on that booking (their own crew or person row);
 * - `partner`: the firm whose resource is booked, answering through its pages or an e-mailed link.
 *
 * Whose resource it is matters: the installer confirms its own crews and machines itself, but only
 * the partner's answer confirms a partner firm's resource.
 */
export type BookingParty = 'office' | 'crew' | 'partner';

/** Whose resource the booking holds, seen from the installer whose job it is. */
export type ResourceSide = 'own' | 'partner';

export type BookingAction =
  | 'book'
  | 'book-confirmed'
  | 'rebook'
  | 'move'
  | 'confirm'
  | 'unconfirm'
  | 'send'
  | 'withdraw'
  | 'take-proposal'
  | 'refuse-proposal'
  | 'accept'
  | 'decline'
  | 'propose'
  | 'assign'
  | 'arrive'
  | 'finish'
  | 'undo-arrive'
  | 'undo-finish'
  | 'unbook';

/** `null` as a from-state: the booking does not exist yet. `same`: the state stays. `removed`: the row goes. */
export interface BookingTransition {
  action: BookingAction;
  from: readonly (BookingState | null)[];
  to: BookingState | 'same' | 'removed';
  by: readonly BookingParty[];
  side: ResourceSide | 'any';
}

const OFFICE = ['office'] as const;
const PARTNER = ['partner'] as const;
const ON_SITE_PEOPLE = ['crew', 'office'] as const;

export const BOOKING_TRANSITIONS: readonly BookingTransition[] = [
  { action: 'book', from: [null], to: 'pencilled', by: OFFICE, side: 'any' },
  { action: 'book-confirmed', from: [null], to: 'confirmed', by: OFFICE, side: 'own' },
  // A declined booking stays on the board until the scheduler rebooks it (same or other time) or takes it off.
  { action: 'rebook', from: ['declined'], to: 'pencilled', by: OFFICE, side: 'any' },
  { action: 'move', from: ['pencilled', 'confirmed'], to: 'same', by: OFFICE, side: 'own' },
  { action: 'move', from: ['pencilled'], to: 'pencilled', by: OFFICE, side: 'partner' },
  // A partner agreed to a time, not to any time: a new time is asked again.
  { action: 'move', from: ['sent', 'confirmed'], to: 'sent', by: OFFICE, side: 'partner' },
  { action: 'confirm', from: ['pencilled'], to: 'confirmed', by: OFFICE, side: 'own' },
  { action: 'unconfirm', from: ['confirmed'], to: 'pencilled', by: OFFICE, side: 'own' },
  { action: 'send', from: ['pencilled', 'declined'], to: 'sent', by: OFFICE, side: 'partner' },
  { action: 'withdraw', from: ['sent', 'confirmed'], to: 'pencilled', by: OFFICE, side: 'partner' },
  { action: 'take-proposal', from: ['sent', 'confirmed'], to: 'sent', by: OFFICE, side: 'partner' },
  // The slot stands and the partner is asked again about it (a new request version).
  { action: 'refuse-proposal', from: ['sent', 'confirmed'], to: 'same', by: OFFICE, side: 'partner' },
  { action: 'accept', from: ['sent'], to: 'confirmed', by: PARTNER, side: 'partner' },
  { action: 'decline', from: ['sent', 'confirmed'], to: 'declined', by: PARTNER, side: 'partner' },
  { action: 'propose', from: ['sent', 'confirmed'], to: 'same', by: PARTNER, side: 'partner' },
  { action: 'assign', from: ['sent', 'confirmed'], to: 'same', by: PARTNER, side: 'partner' },
  { action: 'arrive', from: ['pencilled', 'confirmed'], to: 'on_site', by: ON_SITE_PEOPLE, side: 'own' },
  { action: 'arrive', from: ['confirmed'], to: 'on_site', by: OFFICE, side: 'partner' },
  { action: 'finish', from: ['on_site'], to: 'done', by: ON_SITE_PEOPLE, side: 'any' },
  { action: 'undo-arrive', from: ['on_site'], to: 'confirmed', by: ON_SITE_PEOPLE, side: 'any' },
  { action: 'undo-finish', from: ['done'], to: 'on_site', by: ON_SITE_PEOPLE, side: 'any' },
  { action: 'unbook', from: ['pencilled', 'sent', 'confirmed', 'declined'], to: 'removed', by: OFFICE, side: 'any' },
];

/** What an action does, in the words a refusal uses ("can't be <verb>"). */
const VERBS: Record<BookingAction, string> = {
  book: 'booked',
  'book-confirmed': 'booked as confirmed',
  rebook: 'rebooked',
  move: 'moved',
  confirm: 'confirmed by the office',
  unconfirm: 'put back to pencilled',
  send: 'sent as a request',
  withdraw: 'withdrawn',
  'take-proposal': 'moved to the proposed time',
  'refuse-proposal': 'kept against a proposal',
  accept: 'confirmed',
  decline: 'declined',
  propose: 'given another time',
  assign: 'given to another person',
  arrive: 'marked on site',
  finish: 'marked done',
  'undo-arrive': 'taken back from on site',
  'undo-finish': 'taken back from done',
  unbook: 'taken off the board',
};

export const STATE_WORDS: Record<BookingState, string> = {
  pencilled: 'pencilled',
  sent: 'sent and awaiting an answer',
  confirmed: 'confirmed',
  declined: 'declined',
  on_site: 'on site',
  done: 'done',
};

export interface TransitionContext {
  party: BookingParty;
  side: ResourceSide;
}

/**
 * The transition that lets `party` take `action` on a booking in state `from`, or undefined.
 *
 * @example
 * findTransition('confirm', 'pencilled', { party: 'office', side: 'partner' }) // undefined: only the partner's answer confirms
 */
export function findTransition(
  action: BookingAction,
  from: BookingState | null,
  ctx: TransitionContext,
): BookingTransition | undefined {
  return BOOKING_TRANSITIONS.find(
    (t) =>
      t.action === action &&
      t.from.includes(from) &&
      t.by.includes(ctx.party) &&
      (t.side === 'any' || t.side === ctx.side),
  );
}

/** Why a transition is refused, in plain words (the 409's detail). */
export function refusalOf(action: BookingAction, from: BookingState | null, ctx: TransitionContext): string {
  const verb = VERBS[action];
  const anyParty = BOOKING_TRANSITIONS.some(
    (t) => t.action === action && t.from.includes(from) && (t.side === 'any' || t.side === ctx.side),
  );
  if ((action === 'confirm' || action === 'book-confirmed') && ctx.side === 'partner') {
    return 'Only the partner firm can confirm its own people and machines: send them a request instead.';
  }
  if (from === null) return `A new booking can't be ${verb} here.`;
  const state = STATE_WORDS[from];
  const a = /^[aeiou]/.test(state) ? 'an' : 'a';
  if (anyParty) {
    const who = ctx.party === 'office' ? 'The office' : ctx.party === 'crew' ? 'A crew' : 'A partner firm';
    return `${who} can't have ${a} ${state} booking ${verb}.`;
  }
  return `${a === 'an' ? 'An' : 'A'} ${state} booking can't be ${verb}.`;
}

/**
 * The state after the action, or a refusal.
 *
 * @example
 * nextState('send', 'pencilled', { party: 'office', side: 'partner' }) // { ok: true, to: 'sent' }
 * nextState('finish', 'pencilled', { party: 'crew', side: 'own' })   // { ok: false, reason: "A pencilled booking can't be marked done." }
 */
export function nextState(
  action: BookingAction,
  from: BookingState | null,
  ctx: TransitionContext,
): { ok: true; to: BookingState | 'removed' } | { ok: false; reason: string } {
  const t = findTransition(action, from, ctx);
  if (!t) return { ok: false, reason: refusalOf(action, from, ctx) };
  if (t.to === 'same') {
    if (from === null) return { ok: false, reason: refusalOf(action, from, ctx) };
    return { ok: true, to: from };
  }
  return { ok: true, to: t.to };
}

/**
 * The actions a party may take on a booking now: the buttons a page shows.
 *
 * @example
 * actionsFor('sent', { party: 'partner', side: 'partner' }) // ['accept', 'decline', 'propose', 'assign']
 */
export function actionsFor(state: BookingState, ctx: TransitionContext): BookingAction[] {
  const out: BookingAction[] = [];
  for (const t of BOOKING_TRANSITIONS) {
    if (
      t.from.includes(state) &&
      t.by.includes(ctx.party) &&
      (t.side === 'any' || t.side === ctx.side) &&
      !out.includes(t.action)
    )
      out.push(t.action);
  }
  return out;
}

/** States in which a booking holds its resource's time against other installers (pencilled is private). */
export const OCCUPYING_STATES: readonly BookingState[] = ['sent', 'confirmed', 'on_site'];

/**
 * States in which the office may still move a booking to another time or resource (or, declined,
 * book it again): until the work starts. Read from the transitions above, for either side, so the
 * board's drag, the job panel's slot finder and the reports' fixes offer what the server allows.
 *
 * @example
 * MOVABLE_STATES.has('confirmed') // true
 * MOVABLE_STATES.has('on_site') // false: the crew are there
 */
export const MOVABLE_STATES: ReadonlySet<BookingState> = new Set(
  BOOKING_TRANSITIONS.filter((t) => (t.action === 'move' || t.action === 'rebook') && t.by.includes('office')).flatMap(
    (t) => t.from.filter((s): s is BookingState => s !== null),
  ),
);
