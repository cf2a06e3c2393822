import { formatInstant } from '@/utils/dates';
import type { AffectedBooking } from '@shared/schemas/absences';

/**
 * A booking the Resources page names (one left in time away, one keeping a resource on the books,
 * one a crew change would clash with): the firm's own job and stage, or only that an installer
 * booked it (the read policy tells a partner firm no more), and when, on the firm's clock.
 *
 * @example
 * affectedBookingText({ bookingId: '7', jobReference: 'TW-2402', stageName: 'Commission', startsAt: '2026-06-04T12:00:00Z', endsAt: '2026-06-04T15:00:00Z' }, 'Europe/London', 2026)
 * // 'TW-2402 · Commission · Thu 4 Jun, 13:00'
 */
export function affectedBookingText(b: AffectedBooking, timeZone: string, currentYear: number): string {
  const what = b.jobReference ? `${b.jobReference} · ${b.stageName} · ` : "An installer's booking · ";
  return `${what}${formatInstant(b.startsAt, timeZone, { currentYear })}`;
}
