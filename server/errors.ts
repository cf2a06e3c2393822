import type { ErrorRequestHandler, RequestHandler } from 'express';
import { ZodError } from 'zod';
import { ConstraintViolationError, ForeignKeyViolationError, NotNullViolationError, UniqueViolationError, CheckViolationError, DataError } from 'objection';

export interface FieldError { field: string; message: string }

/** An error with a stable code and HTTP status, sent as RFC 9457 problem+json. */
export class HttpError extends Error {
  constructor(
    readonly status: number,
    readonly code: string,
    readonly title: string,
    readonly detail?: string,
    readonly extra: Record<string, unknown> = {},
  ) {
    super(detail ?? title);
  }
}
export class BadRequestError extends HttpError {
  constructor(detail: string, readonly errors: FieldError[] = []) {
    super(400, 'bad-request', 'The request is not valid', detail, { errors });
  }
}
export class UnauthorizedError extends HttpError {
  constructor() { super(401, 'unauthorized', 'Sign in to continue'); }
}
export class ForbiddenError extends HttpError {
  constructor(detail = 'Your role does not allow this.') { super(403, 'forbidden', 'Not allowed', detail); }
}
export class NotFoundError extends HttpError {
  constructor(what = 'resource') { super(404, 'not-found', 'Not found', `No such ${what}.`); }
}
export class ConflictError extends HttpError {
  constructor(detail: string, extra: Record<string, unknown> = {}) { super(409, 'conflict', 'Conflict', detail, extra); }
}
export class UnprocessableError extends HttpError {
  constructor(detail: string, extra: Record<string, unknown> = {}) { super(422, 'rule-violation', 'The change breaks a scheduling rule', detail, extra); }
}

export function fieldErrorsOf(error: ZodError, prefix?: string): FieldError[] {
  return error.issues.map((i) => ({
    field: [prefix, ...i.path.map(String)].filter(Boolean).join('.') || '(body)',
    message: i.message,
  }));
}

function toHttpError(err: unknown): HttpError | null {
  if (err instanceof HttpError) return err;
  if (err instanceof ZodError) return new BadRequestError('Some fields are not valid.', fieldErrorsOf(err));
  // Unique, foreign-key and check violations are ConstraintViolationErrors too: test them first.
  if (err instanceof UniqueViolationError) {
    return new ConflictError(`That ${err.columns?.join(', ') || 'value'} is already in use.`, { errors: (err.columns ?? []).map((c) => ({ field: c, message: 'is already in use' })) });
  }
  if (err instanceof ForeignKeyViolationError) return new HttpError(422, 'reference', 'A referenced record does not exist', 'A referenced record does not exist or is still in use.');
  if (err instanceof NotNullViolationError) return new BadRequestError(`${err.column} is required.`, [{ field: err.column, message: 'is required' }]);
  if (err instanceof CheckViolationError) return new BadRequestError('A value is out of range.', [{ field: err.constraint, message: 'is out of range' }]);
  if (err instanceof DataError) return new BadRequestError('A value has the wrong form.');
  const sqlState = (err as { nativeError?: { code?: string }; code?: string })?.nativeError?.code ?? (err as { code?: string })?.code;
  if (sqlState === '23P01' || err instanceof ConstraintViolationError) {
    return new ConflictError('That resource already has a confirmed booking at that time.', { code: 'double-booked' });
  }
  const e = err as { type?: string; status?: number; statusCode?: number; expose?: boolean; message?: string };
  // body-parser errors (malformed JSON, too large) carry their own status.
  if (e?.expose && typeof (e.status ?? e.statusCode) === 'number') {
    return new HttpError(e.status ?? e.statusCode ?? 400, e.type ?? 'bad-request', 'The request is not valid', e.message);
  }
  return null;
}

export function problemBody(err: HttpError, instance?: string): Record<string, unknown> {
  return {
    type: `/problems/${err.code}`,
    title: err.title,
    status: err.status,
    ...(err.detail ? { detail: err.detail } : {}),
    ...(instance ? { instance } : {}),
    ...err.extra,
  };
}

/** The one error handler: problem+json, never a stack trace or SQL. */
export const errorHandler: ErrorRequestHandler = (err, req, res, _next) => {
  const http = toHttpError(err);
  if (!http) {
    req.log?.error({ err }, 'unhandled error');
    res.status(500).type('application/problem+json').json({ type: '/problems/internal', title: 'Something went wrong on our side', status: 500 });
    return;
  }
  if (http.status >= 500) req.log?.error({ err }, http.title);
  res.status(http.status).type('application/problem+json').json(problemBody(http, req.originalUrl));
};

export const notFoundHandler: RequestHandler = (req, _res, next) => {
  next(new NotFoundError(`route ${req.method} ${req.path}`));
};
