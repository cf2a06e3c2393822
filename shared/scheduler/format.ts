import { timeZoneOffset } from './time-zone.js';
import type { Instant } from './types.js';

const WEEKDAYS = ['Sun', 'Mon', 'Tue', 'Wed', 'Thu', 'Fri', 'Sat'];
const MONTHS = ['Jan', 'Feb', 'Mar', 'Apr', 'May', 'Jun', 'Jul', 'Aug', 'Sep', 'Oct', 'Nov', 'Dec'];

/**
 * A short local date and time for messages, e.g. "Tue 12 May 14:00" (English words, 24-hour
 * clock; worked out from the zone offset rather than Intl formatting, which is far slower).
 *
 * @example
 * formatInstant(Date.UTC(2026, 4, 12, 13, 0), 'Europe/London') // 'Tue 12 May 14:00'
 */
export function formatInstant(instant: Instant, timeZone: string): string {
  const d = new Date(instant + timeZoneOffset(timeZone, instant));
  const hh = String(d.getUTCHours()).padStart(2, '0'), mm = String(d.getUTCMinutes()).padStart(2, '0');
  return `${WEEKDAYS[d.getUTCDay()] ?? ''} ${d.getUTCDate()} ${MONTHS[d.getUTCMonth()] ?? ''} ${hh}:${mm}`;
}
/**
 * Pence as pounds for messages.
 *
 * @example
 * formatPence(45000) // '£450.00'
 */
export function formatPence(pence: number): string {
  return `£${(pence / 100).toFixed(2)}`;
}
