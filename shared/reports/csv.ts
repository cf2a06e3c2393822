/** One CSV column: its heading and how to read the cell from a row. */
export interface CsvColumn<T> {
  header: string;
  value: (row: T) => string | number | boolean | null | undefined;
}

/**
 * One CSV field per RFC 4180: quoted when it holds a comma, a double quote, CR or LF, with
 * quotes doubled. Text starting with = + - @ (or a tab/CR) gets a leading apostrophe so a
 * spreadsheet does not run it as a formula (a plain number such as -5.00 is left alone).
 *
 * @example
 * csvField('Dig, then pour') // '"Dig, then pour"'
 * csvField('say "hi"')       // '"say ""hi"""'
 */
export function csvField(value: string | number | boolean | null | undefined): string {
  if (value === null || value === undefined) return '';
  if (typeof value === 'number') return Number.isFinite(value) ? String(value) : '';
  let text = String(value);
  if (/^[=+\-@\t\r]/.test(text) && !/^[-+]?\d+(\.\d+)?$/.test(text)) text = `'${text}`;
  return /[",\r\n]/.test(text) ? `"${text.replace(/"/g, '""')}"` : text;
}

/**
 * A whole CSV document: a header line, then one line per row, lines ending CRLF (RFC 4180).
 *
 * @example
 * toCsv([{ a: 1 }], [{ header: 'A', value: (r) => r.a }]) // 'A\r\n1\r\n'
 */
export function toCsv<T>(rows: readonly T[], columns: readonly CsvColumn<T>[]): string {
  const lines = [columns.map((c) => csvField(c.header)).join(',')];
  for (const row of rows) lines.push(columns.map((c) => csvField(c.value(row))).join(','));
  return `${lines.join('\r\n')}\r\n`;
}

/**
 * Pence as pounds with two decimals and no currency sign, for spreadsheets.
 *
 * @example
 * poundsCell(43500) // '435.00'
 */
export function poundsCell(pence: number): string {
  return (pence / 100).toFixed(2);
}

/**
 * The UTF-8 byte order mark. Common spreadsheet programs read a CSV without it in the machine's
 * legacy code page, so "£" arrives as "Â£"; with it they read UTF-8 (RFC 3629 §6 allows the mark
 * as a signature; common practice for CSV, no source).
 */
export const UTF8_BOM = '\uFEFF';

/**
 * A board link made absolute from the site's public address, so it still works from a spreadsheet.
 *
 * @example
 * absoluteLink('/board?view=day&date=2026-06-09', 'https://plan.example/') // 'https://plan.example/board?view=day&date=2026-06-09'
 */
export function absoluteLink(link: string, publicUrl: string): string {
  return new URL(link, publicUrl).toString();
}
