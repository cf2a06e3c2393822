import { z } from 'zod';

/**
 * zod's own words for the checks a schema states without words of its own, set once for every
 * schema (client and server): worded, like the rest of the API's field messages, to follow the
 * field's name ("must be at least 15", "is required"), so a form puts its label first (the client's
 * fieldSentence) and problem+json keeps them plain. A schema's own message still wins.
 *
 * @example
 * z.number().min(15).safeParse(5).error?.issues[0]?.message // 'must be at least 15'
 */
function plainWords(issue: z.core.$ZodRawIssue): string | undefined {
  const n = (x: unknown) => (typeof x === 'bigint' || typeof x === 'number' ? x.toLocaleString('en-GB') : String(x));
  switch (issue.code) {
    case 'invalid_type':
      if (issue.input === undefined) return 'is required';
      if (issue.expected === 'int') return 'must be a whole number';
      if (issue.expected === 'number') return 'must be a number';
      if (issue.expected === 'string') return 'must be text';
      if (issue.expected === 'boolean') return 'must be true or false';
      if (issue.expected === 'array') return 'must be a list';
      if (issue.expected === 'object') return 'must be an object';
      return undefined;
    case 'too_small':
      if (issue.origin === 'string')
        return Number(issue.minimum) <= 1 ? 'is required' : `must be at least ${n(issue.minimum)} characters`;
      if (issue.origin === 'array') return `needs at least ${n(issue.minimum)}`;
      if (issue.origin === 'number' || issue.origin === 'int' || issue.origin === 'bigint')
        return issue.inclusive ? `must be at least ${n(issue.minimum)}` : `must be more than ${n(issue.minimum)}`;
      return undefined;
    case 'too_big':
      if (issue.origin === 'string') return `must be at most ${n(issue.maximum)} characters`;
      if (issue.origin === 'array') return `can have at most ${n(issue.maximum)}`;
      if (issue.origin === 'number' || issue.origin === 'int' || issue.origin === 'bigint')
        return issue.inclusive ? `must be at most ${n(issue.maximum)}` : `must be less than ${n(issue.maximum)}`;
      return undefined;
    case 'invalid_value':
      return issue.values.length <= 6
        ? `must be one of ${issue.values.map((v) => JSON.stringify(v)).join(', ')}`
        : 'is not one of the choices';
    default:
      return undefined;
  }
}

z.config({ customError: plainWords });
