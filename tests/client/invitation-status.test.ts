import { describe, expect, it } from 'vitest';
import { invitationStatus, type InvitationRow } from '@/components/invitation-status';

// 1 June 2026 is a Monday (the tests' today); London is on BST (UTC+1).
const NOW = Date.parse('2026-06-01T09:00:00Z');
const inv = (over: Partial<InvitationRow>): InvitationRow => ({
  id: '1',
  email: 'rory.fitter@tideway.example',
  role: 'crew',
  expiresAt: '2026-06-15T09:00:00Z',
  acceptedAt: null,
  withdrawnAt: null,
  ...over,
});

describe("an invitation's standing in words", () => {
  it('one whose link still works can be withdrawn, and says until which day', () => {
    expect(invitationStatus(inv({}), NOW, 'Europe/London', 2026)).toEqual({
      text: 'Not accepted yet: the link works until Mon 15 Jun',
      open: true,
    });
  });

  it('accepted, withdrawn or run out: said with the day (the firm’s day: 23:30 UTC is the next day in London)', () => {
    expect(invitationStatus(inv({ acceptedAt: '2026-05-28T23:30:00Z' }), NOW, 'Europe/London', 2026)).toEqual({
      text: 'Accepted Fri 29 May',
      open: false,
    });
    expect(invitationStatus(inv({ withdrawnAt: '2026-05-30T10:00:00Z' }), NOW, 'Europe/London', 2026)).toEqual({
      text: 'Withdrawn Sat 30 May',
      open: false,
    });
    // Withdrawn by inviting the same address again: said so, not left looking withdrawn by hand.
    expect(
      invitationStatus(inv({ withdrawnAt: '2026-05-30T10:00:00Z', replacedBy: '7' }), NOW, 'Europe/London', 2026),
    ).toEqual({ text: 'Sent again Sat 30 May: this link no longer works', open: false });
    expect(invitationStatus(inv({ expiresAt: '2026-05-31T10:00:00Z' }), NOW, 'Europe/London', 2026)).toEqual({
      text: 'Not accepted; the link ran out Sun 31 May',
      open: false,
    });
  });
});
