import { describe, expect, it } from 'vitest';
import { actionsFor, MOVABLE_STATES, nextState } from '../../shared/booking-states.ts';

const office = { party: 'office', side: 'own' } as const;
const officeOnPartner = { party: 'office', side: 'partner' } as const;
const partner = { party: 'partner', side: 'partner' } as const;
const crew = { party: 'crew', side: 'own' } as const;

describe('the booking state machine', () => {
  it("never lets the installer confirm a partner firm's resource: only the partner's answer does", () => {
    expect(nextState('book-confirmed', null, officeOnPartner)).toEqual({
      ok: false,
      reason: 'Only the partner firm can confirm its own people and machines: send them a request instead.',
    });
    expect(nextState('confirm', 'pencilled', officeOnPartner).ok).toBe(false);
    expect(nextState('accept', 'sent', partner)).toEqual({ ok: true, to: 'confirmed' });
  });

  it('lets the office confirm its own crews and machines, and book them straight in as confirmed', () => {
    expect(nextState('confirm', 'pencilled', office)).toEqual({ ok: true, to: 'confirmed' });
    expect(nextState('book-confirmed', null, office)).toEqual({ ok: true, to: 'confirmed' });
  });

  it('makes a booking sent only by sending a request, from pencilled or after a decline', () => {
    expect(nextState('send', 'pencilled', officeOnPartner)).toEqual({ ok: true, to: 'sent' });
    expect(nextState('send', 'declined', officeOnPartner)).toEqual({ ok: true, to: 'sent' });
    expect(nextState('send', 'confirmed', officeOnPartner).ok).toBe(false);
    expect(nextState('send', 'pencilled', office).ok).toBe(false);
  });

  it('asks a partner again when a sent or confirmed slot moves; an own booking keeps its state', () => {
    expect(nextState('move', 'confirmed', officeOnPartner)).toEqual({ ok: true, to: 'sent' });
    expect(nextState('move', 'confirmed', office)).toEqual({ ok: true, to: 'confirmed' });
  });

  it('keeps progress in order: on site, then done, each by the crew or the office, each with its undo', () => {
    expect(nextState('finish', 'pencilled', crew)).toEqual({
      ok: false,
      reason: "A pencilled booking can't be marked done.",
    });
    expect(nextState('arrive', 'pencilled', crew)).toEqual({ ok: true, to: 'on_site' });
    expect(nextState('finish', 'on_site', crew)).toEqual({ ok: true, to: 'done' });
    expect(nextState('undo-finish', 'done', crew)).toEqual({ ok: true, to: 'on_site' });
    expect(nextState('arrive', 'sent', { party: 'crew', side: 'partner' }).ok).toBe(false);
    expect(nextState('finish', 'on_site', partner)).toEqual({
      ok: false,
      reason: "A partner firm can't have an on site booking marked done.",
    });
  });

  it('keeps a declined booking until the scheduler rebooks it or takes it off', () => {
    expect(nextState('rebook', 'declined', office)).toEqual({ ok: true, to: 'pencilled' });
    expect(nextState('unbook', 'declined', office)).toEqual({ ok: true, to: 'removed' });
    expect(nextState('move', 'declined', office).ok).toBe(false);
    expect(nextState('unbook', 'on_site', office).ok).toBe(false);
  });

  it('tells each party which buttons to show', () => {
    expect(actionsFor('sent', partner)).toEqual(['accept', 'decline', 'propose', 'assign']);
    expect(actionsFor('confirmed', partner)).toEqual(['decline', 'propose', 'assign']);
    expect(actionsFor('pencilled', officeOnPartner)).toEqual(['move', 'send', 'unbook']);
    expect(actionsFor('on_site', crew)).toEqual(['finish', 'undo-arrive']);
  });
});

describe('what the office may still move', () => {
  it('is every booking until the work starts: pencilled, asked, confirmed, and declined (booked again)', () => {
    expect([...MOVABLE_STATES].sort()).toEqual(['confirmed', 'declined', 'pencilled', 'sent']);
    expect(nextState('move', 'on_site', { party: 'office', side: 'own' }).ok).toBe(false);
  });
});
