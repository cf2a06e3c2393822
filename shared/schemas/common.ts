import { z } from 'zod';
import './messages.ts';

/** Database ids travel as decimal strings (bigint columns). */
export const Id = z.string().regex(/^[1-9][0-9]{0,17}$/, 'must be a numeric id');
export type Id = z.infer<typeof Id>;

/**
 * The years any date or instant may name. Wide enough for a householder's order history and a
 * long guarantee, narrow enough that nothing downstream (working calendars, bank holidays, time
 * zones) is ever asked about year 0 or year 9999. Common practice, no source.
 */
export const DATE_YEARS = { min: 1900, max: 2200 } as const;

/**
 * The years work can be planned in or looked up for: day sheets, reports, bookings' answers, hire
 * and a job's promised window. Common practice, no source.
 */
export const WORK_YEARS = { min: 2000, max: 2100 } as const;

type Years = { readonly min: number; readonly max: number };
const yearOf = (isoDate: string) => Number(isoDate.slice(0, 4));
const startOfYear = (year: number) => Date.UTC(year, 0, 1);
const yearsMessage = (what: string, years: Years) => `must be a ${what} between ${years.min} and ${years.max}`;

const isoDate = (years: Years) =>
  z.iso
    .date({ message: 'must be a date like 2026-05-12', abort: true })
    .refine((d) => yearOf(d) >= years.min && yearOf(d) <= years.max, yearsMessage('date', years));
// The instant itself (offset applied) must fall in the years, so 1900-01-01T00:30+01:00 is refused.
const isoInstant = (years: Years) =>
  z.iso
    .datetime({
      offset: true,
      abort: true,
      message: 'must be an ISO 8601 date-time with an offset, e.g. 2026-05-12T08:00:00Z',
    })
    .refine(
      (t) => {
        const ms = Date.parse(t);
        return ms >= startOfYear(years.min) && ms < startOfYear(years.max + 1);
      },
      yearsMessage('time', years),
    );

/** A calendar date (YYYY-MM-DD) that exists (no 2026-02-30) and falls within DATE_YEARS. */
export const IsoDate = isoDate(DATE_YEARS);
/** An ISO 8601 date-time with an offset that exists and falls within DATE_YEARS. */
export const IsoInstant = isoInstant(DATE_YEARS);
/** A date within WORK_YEARS: the day sheet's date, a promised window. */
export const WorkDate = isoDate(WORK_YEARS);
/** An instant within WORK_YEARS: a report's range, a partner's proposal, a hire period. */
export const WorkInstant = isoInstant(WORK_YEARS);

/*
 * Text people type. What no text field takes: C0 controls (NUL, TAB, CR, LF…), DEL and C1
 * controls, the bidirectional overrides and isolates that make "gpj.exe" read as "exe.jpg"
 * (U+202A–U+202E, U+2066–U+2069, Unicode TR #9), the line and paragraph separators
 * (U+2028, U+2029) and lone UTF-16 surrogates, which no UTF-8 database or file can hold.
 */
const LINE_BREAK = /[\n\r\u2028\u2029]/;
// eslint-disable-next-line no-control-regex
const CONTROL = /[\u0000-\u0009\u000b\u000c\u000e-\u001f\u007f-\u009f\u202a-\u202e\u2066-\u2069]/;
const LONE_SURROGATE = /[\uD800-\uDBFF](?![\uDC00-\uDFFF])|(?<![\uD800-\uDBFF])[\uDC00-\uDFFF]/;

export const TEXT_MESSAGES = {
  lineBreak: 'must be a single line (no line breaks)',
  control: 'must not contain tabs or hidden control characters',
  brokenCharacter: 'contains a broken character; type it again',
} as const;

/**
 * Why a piece of text is refused, or null when it is fine. One-line text takes no line breaks;
 * multi-line text takes LF and CRLF and nothing else from the list above.
 * @example textProblem('Crew\nHeron', 'one-line') // 'must be a single line (no line breaks)'
 */
export function textProblem(text: string, kind: 'one-line' | 'multi-line'): string | null {
  if (LONE_SURROGATE.test(text)) return TEXT_MESSAGES.brokenCharacter;
  if (kind === 'one-line' && LINE_BREAK.test(text)) return TEXT_MESSAGES.lineBreak;
  const rest = kind === 'multi-line' ? text.replace(/\r\n|\n/g, '') : text;
  if (CONTROL.test(rest) || (kind === 'multi-line' && LINE_BREAK.test(rest))) return TEXT_MESSAGES.control;
  return null;
}

// `abort` stops the length checks after it, so a field gets the one message that matters.
const refuse = (kind: 'one-line' | 'multi-line') => (value: string, ctx: z.RefinementCtx) => {
  const problem = textProblem(value, kind);
  if (problem) ctx.addIssue({ code: 'custom', message: problem, continue: false });
};

/** One line of text (a name, reference, town, phone number, title), trimmed. */
export const OneLine = z.string().trim().superRefine(refuse('one-line'));
/** Several lines of text (notes), trimmed; CRLF is kept as LF. */
export const MultiLine = z
  .string()
  .trim()
  .overwrite((s) => s.replace(/\r\n/g, '\n'))
  .superRefine(refuse('multi-line'));

/**
 * Words for a field that is missing, while a field of the wrong type still says what it must be
 * ("must be a number", from messages.ts): pass as a schema's params.
 *
 * @example
 * z.number(requiredAs('the version you loaded')).safeParse('3').error?.issues[0]?.message // 'must be a number'
 */
export const requiredAs = (what: string) => ({
  error: (issue: { input?: unknown }) => (issue.input === undefined ? `is required: ${what}` : undefined),
});

/** One line of at most `max` characters. @example oneLineText(40).min(1, 'is required') */
export const oneLineText = (max: number) => OneLine.max(max, `must be at most ${max} characters`);
/** Notes of at most `max` characters. */
export const multiLineText = (max: number) => MultiLine.max(max, `must be at most ${max} characters`);

/** An e-mail address, trimmed (RFC 5321 caps a path at 254 characters). */
export const EmailAddress = oneLineText(254).pipe(z.email('must be an e-mail address'));

export const IdParams = z.object({ id: Id });

export const Paging = z.object({
  page: z.coerce.number().int().min(1).default(1),
  pageSize: z.coerce.number().int().min(1).max(200).default(20),
});

/** RFC 9457 problem details as the API sends them. */
export const Problem = z.object({
  type: z.string(),
  title: z.string(),
  status: z.number(),
  detail: z.string().optional(),
  errors: z.array(z.object({ field: z.string(), message: z.string() })).optional(),
});
export type Problem = z.infer<typeof Problem>;

/**
 * The rule of a partial update (PATCH): it names at least one field besides the version, so an
 * empty or misspelt change is refused instead of saved as a change of nothing. Checked only when
 * nothing else is wrong (a field it doesn't take is the thing to say then).
 *
 * @example UpdateThing.strict().refine(...NAMES_A_CHANGE)
 */
export const NAMES_A_CHANGE = namesAChange();

/**
 * {@link NAMES_A_CHANGE} for an update that also takes fields which change nothing by themselves
 * (an answer to a question, such as "record it as well"): they do not count as the change.
 *
 * @example UpdateHire.strict().refine(...namesAChange('alsoOverlapping'))
 */
export function namesAChange(...besides: string[]) {
  return [
    (patch: object) => Object.keys(patch).some((k) => k !== 'version' && !besides.includes(k)),
    {
      message: 'names nothing to change: send at least one field with the version',
      when: (payload: { issues: readonly unknown[] }) => payload.issues.length === 0,
    },
  ] as const;
}
