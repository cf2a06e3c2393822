import { ApiError, type FieldProblem } from '@/api/client';
import { humanise } from '@/utils/labels';

export interface ProblemSummary {
  title: string;
  detail: string | undefined;
  fields: FieldProblem[];
}

/**
 * What to tell a person about a failure, whatever was thrown.
 * @example problemSummary(new ApiError({ status: 409, title: 'Crane already booked' })).title // 'Crane already booked'
 */
export function problemSummary(error: unknown): ProblemSummary {
  if (error instanceof ApiError) return { title: error.title, detail: error.detail, fields: error.errors };
  return {
    title: 'Something went wrong',
    detail: 'Try again; if it keeps happening, tell whoever runs Waterline for your firm.',
    fields: [],
  };
}

/**
 * One line of text for a field problem, the field named in words by the last part of its path
 * and its unit in brackets (`quantities.perimeterGapMm` → "Perimeter gap (mm)", see fieldWords), or
 * just the message when no field is named.
 * A form that knows its labels says it better under the box (fieldSentence); this is the fallback.
 *
 * @example fieldProblemText({ field: 'siteTown', message: 'is required' }) // 'Site town is required'
 */
export function fieldProblemText(problem: FieldProblem): string {
  // The request as a whole ("(body)"): the message alone, as a sentence.
  if (!problem.field || problem.field === '(body)') return fieldSentence('', problem.message)!.trim();
  const last =
    problem.field
      .split('.')
      .filter((part) => !/^\d+$/.test(part))
      .pop() ?? problem.field;
  return fieldSentence(fieldWords(last), problem.message) as string;
}

/** A field name's unit, as its last part says it (`…Mm`, `…Pence`), in the words a form would use. */
const UNITS: [RegExp, string][] = [
  [/TPerM3$/, 't/m³'],
  [/M3$/, 'm³'],
  [/Mm$/, 'mm'],
  [/Kg$/, 'kg'],
  [/Kw$/, 'kW'],
  [/Pence$/, 'pence'],
  [/Percent$/, '%'],
  [/Minutes$/, 'minutes'],
  [/Hours$/, 'hours'],
  [/Days$/, 'days'],
  [/(?<=[a-z])C$/, '°C'],
  [/(?<=[a-z])M$/, 'm'],
  [/(?<=[a-z])T$/, 't'],
];

/**
 * A field's code in words, its unit in brackets: `perimeterGapMm` → "Perimeter gap (mm)",
 * `dayRatePence` → "Day rate (pence)", `siteTown` → "Site town".
 *
 * @example fieldWords('subBaseDensityTPerM3') // 'Sub base density (t/m³)'
 */
export function fieldWords(code: string): string {
  for (const [suffix, unit] of UNITS) {
    const name = code.replace(suffix, '');
    if (name !== code && name !== '') return `${fieldWords(name)} (${unit})`;
  }
  return humanise(code.replace(/([a-z0-9])([A-Z])/g, '$1 $2').toLowerCase());
}

/**
 * A field's error as the sentence shown under it. The API words its field messages to follow the
 * field's name ("is required", "must be a UK postcode such as LS6 2AB"), so the box's label goes
 * first; any other message only gets its capital.
 *
 * @example fieldSentence('Customer', 'is required') // 'Customer is required'
 * @example fieldSentence('Installation', 'pick an installation type') // 'Pick an installation type'
 */
export function fieldSentence(label: string, message: string | undefined): string | undefined {
  if (!message) return undefined;
  if (/^(is|are|must|can|can't|cannot|needs?)\b/.test(message)) return `${label} ${message}`;
  return message.charAt(0).toUpperCase() + message.slice(1);
}
