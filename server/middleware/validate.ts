import type { z } from 'zod';
import { BadRequestError, fieldErrorsOf, type FieldError } from '../errors.ts';

type Part = 'body' | 'query' | 'params';

// eslint-disable-next-line no-control-regex
const UNSTORABLE = /\u0000|[\uD800-\uDBFF](?![\uDC00-\uDFFF])|(?<![\uD800-\uDBFF])[\uDC00-\uDFFF]/;

/**
 * Strings no database column can hold: NUL (PostgreSQL text refuses it) and lone UTF-16 surrogates
 * (no UTF-8 encoding; jsonb refuses them, text quietly stores U+FFFD). The shared text schemas
 * refuse them with their own words; this catches them in any field a schema takes as a plain
 * string (record keys included), so they never reach the database, whose refusal names no field.
 */
function unstorable(value: unknown, path: string[], found: FieldError[], depth = 0): void {
  if (found.length || depth > 20) return;
  if (typeof value === 'string') {
    if (UNSTORABLE.test(value))
      found.push({
        field: path.join('.'),
        message: 'contains a character that cannot be stored (a NUL or a broken character)',
      });
    return;
  }
  if (Array.isArray(value)) {
    value.forEach((v, i) => unstorable(v, [...path, String(i)], found, depth + 1));
    return;
  }
  if (value && typeof value === 'object') {
    for (const [k, v] of Object.entries(value)) {
      if (UNSTORABLE.test(k))
        found.push({
          field: [...path, '(key)'].join('.'),
          message: 'has a name with a character that cannot be stored',
        });
      unstorable(v, [...path, k], found, depth + 1);
    }
  }
}

/** Where the bad values were, in words: the body, the address's query (?…) or its path. */
const PART_WORDS: Record<Part, string> = {
  body: 'The request body has',
  query: "The address's query has",
  params: "The address's path has",
};

/**
 * Parses one part of a request with a shared schema; bad input → 400 naming each field (the part
 * as the prefix for query and params: `query.search`, `params.id`).
 */
export function parse<S extends z.ZodType>(schema: S, value: unknown, part: Part = 'body'): z.infer<S> {
  const prefix = part === 'body' ? undefined : part;
  const whole = part === 'body' ? '(body)' : part;
  const result = schema.safeParse(value ?? {});
  if (!result.success) {
    throw new BadRequestError(`${PART_WORDS[part]} fields that are not valid.`, fieldErrorsOf(result.error, prefix));
  }
  const found: FieldError[] = [];
  unstorable(result.data, prefix ? [prefix] : [], found);
  if (found.length) {
    throw new BadRequestError(
      `${PART_WORDS[part]} fields that are not valid.`,
      found.map((f) => ({ ...f, field: f.field || whole })),
    );
  }
  return result.data;
}
