import { formatPence as formatWholePence } from '../money.js';
import { isFourDigitYearDay, packedCivilDate, timeZoneOffset } from './time-zone.js';
import type { Instant } from './types.js';

const WEEKDAYS = ['Sun', 'Mon', 'Tue', 'Wed', 'Thu', 'Fri', 'Sat'];
const MONTHS = ['Jan', 'Feb', 'Mar', 'Apr', 'May', 'Jun', 'Jul', 'Aug', 'Sep', 'Oct', 'Nov', 'Dec'];

const TWO_DIGITS = Array.from({ length: 60 }, (_, i) => String(i).padStart(2, '0'));
const DAY_MS = 86_400_000;

/**
 * A short local date and time for messages, e.g. "Tue 12 May 14:00" (English words, 24-hour
 * clock; worked out from the zone offset and plain arithmetic rather than Intl formatting or a
 * Date, which are far slower on the analysis's hot path).
 *
 * @example
 * formatInstant(Date.UTC(2026, 4, 12, 13, 0), 'Europe/London') // 'Tue 12 May 14:00'
 */
export function formatInstant(instant: Instant, timeZone: string): string {
  // A Date drops a fraction of a millisecond towards zero; so does this.
  const local = Math.trunc(instant + timeZoneOffset(timeZone, instant));
  if (!Number.isFinite(local) || Math.abs(local) > 8.64e15) {
    // What a Date makes of an instant it can't hold, as before.
    const d = new Date(local);
    return `${WEEKDAYS[d.getUTCDay()] ?? ''} ${d.getUTCDate()} ${MONTHS[d.getUTCMonth()] ?? ''} ${String(d.getUTCHours()).padStart(2, '0')}:${String(d.getUTCMinutes()).padStart(2, '0')}`;
  }
  const day = Math.floor(local / DAY_MS);
  const minuteOfDay = Math.floor((local - day * DAY_MS) / 60_000);
  // Civil date from a day number (days since 1970-01-01), proleptic Gregorian, after H. Hinnant's
  // days_from_civil inverse ("chrono-Compatible Low-Level Date Algorithms").
  const z = day + 719_468;
  const era = Math.floor(z / 146_097);
  const doe = z - era * 146_097;
  const yoe = Math.floor((doe - Math.floor(doe / 1460) + Math.floor(doe / 36_524) - Math.floor(doe / 146_096)) / 365);
  const doy = doe - (365 * yoe + Math.floor(yoe / 4) - Math.floor(yoe / 100));
  const mp = Math.floor((5 * doy + 2) / 153);
  const date = doy - Math.floor((153 * mp + 2) / 5) + 1;
  const month = mp < 10 ? mp + 2 : mp - 10; // 0 = January
  const weekday = (((day + 4) % 7) + 7) % 7;
  return `${WEEKDAYS[weekday] as string} ${date} ${MONTHS[month] as string} ${TWO_DIGITS[Math.floor(minuteOfDay / 60)] as string}:${TWO_DIGITS[minuteOfDay % 60] as string}`;
}
/**
 * "Tue 12 May" for a local day number (the date part of {@link formatInstant}), or undefined
 * outside the years 1000 to 9999.
 *
 * @example
 * formatDayOfWeek(dayNumber(2026, 5, 12)) // 'Tue 12 May'
 */
export function formatDayOfWeek(day: number): string | undefined {
  if (!isFourDigitYearDay(day)) return undefined;
  const c = packedCivilDate(day);
  return `${WEEKDAYS[(((day + 4) % 7) + 7) % 7] as string} ${c & 31} ${MONTHS[((c >> 5) & 15) - 1] as string}`;
}

/**
 * Pence as pounds for messages, as money reads everywhere else (shared/money.ts): to the nearest
 * penny of a worked-out amount, with thousands separators.
 *
 * @example
 * formatPence(130500) // '£1,305.00'
 */
export function formatPence(pence: number): string {
  return formatWholePence(Math.round(pence));
}

/**
 * Working time in words: minutes under an hour, otherwise hours to two places.
 *
 * @example
 * workWords(45)  // '45 min'
 * workWords(270) // '4.5 h'
 */
export function workWords(minutes: number): string {
  if (minutes < 60) return `${Math.round(minutes)} min`;
  return `${Math.round((minutes / 60) * 100) / 100} h`;
}
