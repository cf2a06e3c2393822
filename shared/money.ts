/**
 * Money as Waterline keeps it: whole pence (integers), pounds sterling only. Shown as pounds with
 * two decimals and thousands separators, the way a UK invoice reads.
 *
 * @example
 * formatPence(123456) // '£1,234.56'
 * formatPence(-500)   // '-£5.00'
 */
export function formatPence(pence: number): string {
  if (!Number.isInteger(pence)) throw new RangeError('an amount in pence must be a whole number');
  const sign = pence < 0 ? '-' : '';
  const abs = Math.abs(pence);
  const pounds = Math.floor(abs / 100)
    .toString()
    .replace(/\B(?=(\d{3})+(?!\d))/g, ',');
  return `${sign}£${pounds}.${String(abs % 100).padStart(2, '0')}`;
}

/**
 * The deposit a percentage of the price comes to, to the nearest penny (half a penny rounds up).
 *
 * @example
 * depositOf(1_249_900, 25) // 312475 (£3,124.75)
 */
export function depositOf(pricePence: number, percent: number): number {
  return Math.round((pricePence * percent) / 100);
}
