/**
 * The commissioning page's pure parts: a reading as typed on a phone's number pad, and what a
 * reading's verdict says beside it. Tested without a browser.
 */
import type { ReadingVerdict } from '@shared/water-balance';

/**
 * A reading as typed: empty → null, "7,4" or "7.4" → 7.4, anything else → 'invalid' (kept on the
 * field until corrected, never saved as a guess).
 * @example parseReading(' 7,4 ') // 7.4
 */
export function parseReading(text: string): number | null | 'invalid' {
  const t = text.trim().replace(',', '.');
  if (t === '') return null;
  if (!/^\d{1,4}(\.\d{1,2})?$/.test(t)) return 'invalid';
  return Number(t);
}

/** The words and tone beside a reading. */
export const VERDICT_WORDS: Record<ReadingVerdict, { text: string; tone: 'success' | 'warning' | 'default' }> = {
  'in-range': { text: 'In range', tone: 'success' },
  low: { text: 'Below range', tone: 'warning' },
  high: { text: 'Above range', tone: 'warning' },
  missing: { text: 'Not taken yet', tone: 'default' },
};
