import { localDateOf } from '@shared/local-dates';
import { formatCalendarDate } from '@/utils/dates';

export interface InvitationRow {
  id: string;
  email: string;
  role: string;
  expiresAt: string;
  acceptedAt: string | null;
  withdrawnAt: string | null;
  /** The invitation that replaced it, when the same address was invited again. */
  replacedBy?: string | null;
}

/**
 * Where an invitation stands, in words, and whether it can still be withdrawn (only one whose
 * link still works). Days are the firm's.
 *
 * @example invitationStatus({ …, expiresAt: '2026-06-15T09:00:00Z', acceptedAt: null, withdrawnAt: null }, Date.UTC(2026, 5, 1), 'Europe/London', 2026)
 * // { text: 'Not accepted yet: the link works until Mon 15 Jun', open: true }
 */
export function invitationStatus(
  inv: InvitationRow,
  now: number,
  timeZone: string,
  currentYear: number,
): { text: string; open: boolean } {
  const day = (iso: string) => formatCalendarDate(localDateOf(Date.parse(iso), timeZone), { currentYear });
  if (inv.acceptedAt) return { text: `Accepted ${day(inv.acceptedAt)}`, open: false };
  if (inv.withdrawnAt && inv.replacedBy)
    return { text: `Sent again ${day(inv.withdrawnAt)}: this link no longer works`, open: false };
  if (inv.withdrawnAt) return { text: `Withdrawn ${day(inv.withdrawnAt)}`, open: false };
  if (Date.parse(inv.expiresAt) <= now)
    return { text: `Not accepted; the link ran out ${day(inv.expiresAt)}`, open: false };
  return { text: `Not accepted yet: the link works until ${day(inv.expiresAt)}`, open: true };
}
