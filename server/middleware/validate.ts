import type { z } from 'zod';
import { BadRequestError, fieldErrorsOf } from '../errors.ts';

/** Parses one part of a request with a shared schema; bad input → 400 naming each field. */
export function parse<S extends z.ZodType>(schema: S, value: unknown, part: 'body' | 'query' | 'params' = 'body'): z.infer<S> {
  const result = schema.safeParse(value ?? {});
  if (!result.success) {
    throw new BadRequestError(`The ${part === 'body' ? 'request body' : part} has fields that are not valid.`, fieldErrorsOf(result.error, part === 'body' ? undefined : part));
  }
  return result.data;
}
