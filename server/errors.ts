import type { ErrorRequestHandler, Request, RequestHandler } from 'express';
import { ZodError } from 'zod';
import { SchedulerError } from '../shared/scheduler/errors.ts';
import { DBError } from 'objection';
import { problemTypeUri } from './problem-types.ts';

export interface FieldError {
  field: string;
  message: string;
}

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
  constructor(
    detail: string,
    readonly errors: FieldError[] = [],
  ) {
    super(400, 'bad-request', 'The request is not valid', detail, { errors });
  }
}
export class UnauthorizedError extends HttpError {
  constructor() {
    super(401, 'unauthorized', 'Sign in to continue');
  }
}
export class ForbiddenError extends HttpError {
  constructor(detail = 'Your role does not allow this.') {
    super(403, 'forbidden', 'Not allowed', detail);
  }
}
export class NotFoundError extends HttpError {
  constructor(what = 'resource') {
    super(404, 'not-found', 'Not found', `No such ${what}.`);
  }
}
export class ConflictError extends HttpError {
  constructor(detail: string, extra: Record<string, unknown> = {}) {
    super(409, 'conflict', 'Conflict', detail, extra);
  }
}
export class UnprocessableError extends HttpError {
  constructor(detail: string, extra: Record<string, unknown> = {}) {
    super(422, 'rule-violation', 'The change breaks a scheduling rule', detail, extra);
  }
}

/** The database cannot be reached (stopped, restarting, or every connection busy): nothing was saved. */
export class DatabaseUnavailableError extends HttpError {
  constructor() {
    super(
      503,
      'database-unavailable',
      'The database is not answering',
      'Nothing was saved from this request. The database is away for a moment; try again shortly.',
    );
  }
}

export function fieldErrorsOf(error: ZodError, prefix?: string): FieldError[] {
  const field = (path: readonly PropertyKey[]) => [prefix, ...path.map(String)].filter(Boolean).join('.') || '(body)';
  // A field the request doesn't take is named on its own (zod names the object that has it).
  return error.issues.flatMap((i) =>
    i.code === 'unrecognized_keys'
      ? i.keys.map((key) => ({ field: field([...i.path, key]), message: 'is not a field this request takes' }))
      : [{ field: field(i.path), message: i.message }],
  );
}

/** What a database refusal means, in the words of the person whose change it refused. */
interface PlainRefusal {
  detail: string;
  field?: string;
  message?: string;
}

const TRY_AGAIN = 'reload and try again';

/**
 * Every named unique, exclusion and check constraint in migrations/, as a plain sentence (and the
 * request field it concerns, where there is one). A constraint not listed gets its kind's plain
 * fallback below: never a table, column or constraint name.
 */
export const CONSTRAINT_REFUSALS: Record<string, PlainRefusal> = {
  // unique (→ 409)
  jobs_firm_id_reference_unique: {
    detail: 'Another job already has this reference.',
    field: 'reference',
    message: 'is already used by another job',
  },
  bookings_stage_id_resource_id_unique: {
    detail: 'This stage is already booked on that resource.',
    field: 'resourceId',
    message: 'already has this stage',
  },
  resources_firm_id_name_active_unique: {
    detail: 'Another resource of your firm already has this name.',
    field: 'name',
    message: 'is already used by another resource',
  },
  invitations_one_open_per_address: {
    detail: 'An invitation to this address was sent a moment ago: it is in the list.',
    field: 'email',
    message: 'is already invited: the invitation went a moment ago',
  },
  calendars_firm_id_name_unique: {
    detail: 'Another calendar of your firm already has this name.',
    field: 'name',
    message: 'is already used by another calendar',
  },
  units_firm_id_model_unique: {
    detail: 'Your firm already lists this model.',
    field: 'model',
    message: 'is already listed',
  },
  firms_name_unique: {
    detail: 'Another firm already has this name.',
    field: 'name',
    message: 'is already used by another firm',
  },
  users_email_lower_unique: {
    detail: 'Someone already uses this e-mail address.',
    field: 'email',
    message: 'is already in use',
  },
  users_google_sub_unique: { detail: 'This sign-in account is already linked to someone.' },
  memberships_user_id_firm_id_unique: { detail: 'This person is already a member of the firm.' },
  partnerships_installer_firm_id_partner_firm_id_unique: { detail: 'These firms already work together.' },
  dependencies_from_stage_id_to_stage_id_unique: { detail: 'These two stages are already linked.' },
  stages_job_id_sequence_unique: { detail: `Someone else changed this job's stages at the same moment; ${TRY_AGAIN}.` },
  stage_templates_firm_id_installation_type_unique: {
    detail: `Someone else saved this template at the same moment; ${TRY_AGAIN}.`,
  },
  surveys_job_id_unique: { detail: `Someone else saved a survey of this job at the same moment; ${TRY_AGAIN}.` },
  firm_settings_pkey: { detail: `Someone else saved the firm's settings at the same moment; ${TRY_AGAIN}.` },
  calendar_feeds_one_live: { detail: 'This resource already has a live calendar feed.' },
  calendar_feeds_token_hash_unique: { detail: 'The calendar feed could not be made; try again.' },
  booking_requests_booking_id_booking_version_unique: { detail: 'This booking request has already been sent.' },
  outbox_idempotency_key_unique: { detail: 'This message is already on its way.' },
  job_files_object_key_unique: { detail: 'The file could not be saved; try again.' },
  job_payments_one_open: { detail: 'A request of this kind is already open for this job.' },
  job_payments_one_paid: { detail: 'This job has already paid this.' },
  job_payments_checkout_session_id_unique: { detail: `The payment page could not be opened; ${TRY_AGAIN}.` },
  job_payments_payment_intent_id_unique: { detail: 'This payment is already recorded.' },
  webhook_events_provider_event_id_unique: { detail: 'This event was received before.' },
  commissioning_records_job_id_unique: {
    detail: `Someone else saved this job's commissioning record at the same moment; ${TRY_AGAIN}.`,
  },
  electrical_certificates_job_id_unique: {
    detail: `Another certificate for this job was saved at the same moment; ${TRY_AGAIN}.`,
  },
  handovers_job_id_unique: { detail: 'This job has already been handed over.' },
  jobs_service_visit_unique: { detail: `This service visit is already planned; ${TRY_AGAIN}.` },
  // exclusion (→ 409, code double-booked)
  bookings_no_confirmed_overlap: { detail: 'That resource already has a confirmed booking at that time.' },
  bookings_no_held_overlap: { detail: 'That resource already has a confirmed booking at that time.' },
  // check (→ 400)
  jobs_promised_order: {
    detail: 'The promised window ends before it starts.',
    field: 'promisedTo',
    message: 'must be on or after the start of the promised window',
  },
  bookings_time_order: {
    detail: 'A booking must end after it starts.',
    field: 'endsAt',
    message: 'must be after the start',
  },
  hire_periods_order: {
    detail: 'A hire period must end after it starts.',
    field: 'offHireAt',
    message: 'must be after the on-hire',
  },
  hire_periods_rate: {
    detail: 'The day rate cannot be negative.',
    field: 'dayRatePence',
    message: "can't be negative",
  },
  calendar_exceptions_order: { detail: 'A closure must end after it starts.' },
  calendar_exceptions_owner: { detail: 'A closure belongs to one calendar or to one resource.' },
  surveys_access_positive: {
    detail: 'The access width and height must be more than 0.',
    field: 'survey.accessWidthMm',
    message: 'must be more than 0',
  },
  surveys_counts: {
    detail: 'Steps and gates cannot be negative.',
    field: 'survey.steps',
    message: 'cannot be negative',
  },
  surveys_fuse_positive: {
    detail: 'The main fuse must be more than 0 A.',
    field: 'survey.mainFuseAmps',
    message: 'must be more than 0',
  },
  surveys_large_loads_positive: {
    detail: 'A large load on the supply must be more than 0 A; leave it empty when there is none.',
  },
  surveys_hose_flow_positive: {
    detail: 'The hose flow must be more than 0 litres a minute.',
    field: 'survey.hoseFlowLitresPerMinute',
    message: 'must be more than 0',
  },
  stages_duration_positive: { detail: 'A stage must take some time.' },
  job_files_size_positive: { detail: 'The file has no content.', field: 'file', message: 'is empty' },
  partnerships_distinct: { detail: 'A firm cannot be its own partner.' },
  dependencies_distinct: { detail: 'A stage cannot wait for itself.' },
  resources_user_only_for_people: { detail: 'Only a person can be linked to a sign-in account.' },
  lead_time_rules_target: { detail: 'A lead time applies to a kind of resource or a kind of stage, not both.' },
  booking_answers_proposal_times: {
    detail: 'A proposal needs a start and an end.',
    field: 'proposedStart',
    message: 'a proposal needs a start and an end',
  },
};

/** Foreign keys a request names directly: the field whose id points at nothing. */
const MISSING_REFERENCES: Record<string, { field: string; message: string }> = {
  jobs_unit_id_foreign: { field: 'unitId', message: 'is not a unit your firm lists' },
  bookings_stage_id_foreign: { field: 'stageId', message: 'is not a stage that still exists' },
  bookings_resource_id_foreign: { field: 'resourceId', message: 'is not a resource that still exists' },
  hire_periods_resource_id_foreign: { field: 'resourceId', message: 'is not a resource that still exists' },
  hire_periods_supplier_firm_id_foreign: { field: 'supplierFirmId', message: 'is not a firm that still exists' },
};

const DATA_REFUSALS: Record<string, string> = {
  '22001': 'A value is too long.',
  '22003': 'A number is too large.',
  '22007': 'A date or time is not valid.',
  '22008': 'A date or time is out of range.',
  '22021': 'A value contains a character that cannot be stored.',
  '22P05': 'A value contains a character that cannot be stored.',
};

interface PgLike {
  code?: unknown;
  constraint?: unknown;
  message?: unknown;
  severity?: unknown;
}

/** The PostgreSQL error under an Objection wrapper, or a raw one from a knex query. */
function postgresError(err: unknown): { code: string; constraint: string; message: string } | null {
  const native = ((err as { nativeError?: PgLike })?.nativeError ?? err) as PgLike | null;
  if (!native || typeof native.code !== 'string' || !/^[0-9A-Z]{5}$/.test(native.code)) return null;
  if (!(err instanceof DBError) && typeof native.severity !== 'string') return null;
  return {
    code: native.code,
    constraint: typeof native.constraint === 'string' ? native.constraint : '',
    message: typeof native.message === 'string' ? native.message : '',
  };
}

const withField = (r: PlainRefusal) => (r.field && r.message ? [{ field: r.field, message: r.message }] : []);

/**
 * Database refusals in the user's words: the status by kind (unique/exclusion → 409, a missing
 * reference → 422, one still in use → 409, not-null/check/data → 400), the sentence by constraint.
 */
function databaseError(err: unknown): HttpError | null {
  const pg = postgresError(err);
  if (!pg) return null;
  const known = CONSTRAINT_REFUSALS[pg.constraint];
  switch (pg.code) {
    case '23505':
      return new ConflictError(
        known?.detail ?? 'This would repeat something that is already recorded; reload to see it.',
        { code: 'duplicate', errors: known ? withField(known) : [] },
      );
    case '23P01':
      return new ConflictError(known?.detail ?? 'That clashes with a booking already made for that time.', {
        code: 'double-booked',
      });
    case '23503': {
      // PostgreSQL words the two directions differently: a row pointing at nothing, or a row still pointed at.
      if (/\bupdate or delete on table\b/.test(pg.message)) {
        return new ConflictError('This is still in use elsewhere, so it cannot be removed.', { code: 'still-in-use' });
      }
      const field = MISSING_REFERENCES[pg.constraint];
      return new HttpError(
        422,
        'reference',
        'A referenced record does not exist',
        'Something this refers to does not exist (it may just have been removed).',
        { errors: field ? [field] : [] },
      );
    }
    case '23502':
      return new BadRequestError('A required value is missing.');
    case '23514':
      return new BadRequestError(known?.detail ?? 'A value is outside what is allowed.', known ? withField(known) : []);
    // Two writers PostgreSQL had to choose between (a deadlock, a serialisation failure): whichever
    // route it was, the one it gave up on is told to try again, never a 500.
    case '40P01':
    case '40001':
      return new ConflictError('Another change was saved at the same moment: reload and try again.', {
        code: 'write-conflict',
      });
  }
  if (pg.code.startsWith('23'))
    return new ConflictError('The change conflicts with what is already recorded; reload and try again.');
  if (pg.code.startsWith('22')) return new BadRequestError(DATA_REFUSALS[pg.code] ?? 'A value has the wrong form.');
  return null;
}

/**
 * The route parameter whose %-escape cannot be decoded, found by laying the raw path over each
 * route's pattern in the order Express tries them; null if no route's pattern fits.
 */
function malformedParam(req: Request | undefined): string | null {
  const stack =
    (req?.app as { router?: { stack?: { route?: { path?: unknown } }[] } } | undefined)?.router?.stack ?? [];
  const segments = (req?.originalUrl ?? '').split('?')[0]!.split('/');
  const undecodable = (s: string) => {
    try {
      decodeURIComponent(s);
      return false;
    } catch {
      return true;
    }
  };
  for (const layer of stack) {
    const pattern = layer.route?.path;
    if (typeof pattern !== 'string') continue;
    const parts = pattern.split('/');
    if (parts.length !== segments.length) continue;
    if (!parts.every((p, i) => p.startsWith(':') || p === segments[i])) continue;
    const bad = parts.findIndex((p, i) => p.startsWith(':') && undecodable(segments[i]!));
    if (bad >= 0) return parts[bad]!.slice(1);
  }
  return null;
}

/** SQLSTATEs of a lost or refused connection: class 08, a server shutting down or starting up, too many connections. */
const CONNECTION_SQLSTATES = /^(08[0-9A-Z]{3}|57P0[123]|53300)$/;
/** Node's words for a socket that could not be made or was cut. */
const SOCKET_CODES = new Set([
  'ECONNREFUSED',
  'ECONNRESET',
  'EPIPE',
  'ETIMEDOUT',
  'EHOSTUNREACH',
  'ENETUNREACH',
  'EAI_AGAIN',
  'ENOTFOUND',
]);
/** node-postgres's and knex's own messages for a connection that was lost, timed out or never came. */
const CONNECTION_MESSAGES =
  /^(Connection terminated|Client has encountered a connection error|timeout exceeded when trying to connect|Knex: Timeout acquiring a connection)/;

/**
 * True when the database could not be reached: the error itself or the one Objection wrapped.
 * Other dependencies map their own outages (file storage → storage-unavailable; Redis never fails
 * a request), so a socket error that reaches the handler is the database's.
 */
export function isDatabaseUnreachable(err: unknown): boolean {
  for (const e of [err, (err as { nativeError?: unknown } | null)?.nativeError]) {
    if (!e || typeof e !== 'object') continue;
    const { code, name, message } = e as { code?: unknown; name?: unknown; message?: unknown };
    if (typeof code === 'string' && (CONNECTION_SQLSTATES.test(code) || SOCKET_CODES.has(code))) return true;
    if (name === 'KnexTimeoutError') return true;
    if (typeof message === 'string' && CONNECTION_MESSAGES.test(message)) return true;
  }
  return false;
}

function toHttpError(err: unknown, req?: Request): HttpError | null {
  if (err instanceof HttpError) return err;
  if (err instanceof ZodError) return new BadRequestError('Some fields are not valid.', fieldErrorsOf(err));
  // The router could not decode a %-escape in the path (e.g. /api/jobs/%zz); it marks the error 400.
  if (err instanceof URIError && (err as { status?: number }).status === 400) {
    const name = malformedParam(req);
    return new BadRequestError('The address has a broken %-escape.', [
      {
        field: name ? `params.${name}` : 'path',
        message: 'is not valid in an address (a % must be followed by two hexadecimal digits)',
      },
    ]);
  }
  if (isDatabaseUnreachable(err)) return new DatabaseUnavailableError();
  const database = databaseError(err);
  if (database) return database;
  // The engine refuses input it cannot plan with (a calendar with no working time, a span of decades).
  if (err instanceof SchedulerError)
    return new UnprocessableError(err.message, { code: `engine-${err.code.replace(/_/g, '-')}` });
  const e = err as { type?: string; status?: number; statusCode?: number; expose?: boolean; message?: string };
  // body-parser errors (malformed JSON, too large) carry their own status.
  if (e?.expose && typeof (e.status ?? e.statusCode) === 'number') {
    const status = e.status ?? e.statusCode ?? 400;
    const code =
      e.type === 'entity.too.large'
        ? 'body-too-large'
        : e.type === 'entity.parse.failed'
          ? 'malformed-body'
          : 'bad-request';
    // The parser's own words ("Unexpected token 'n'…") name no field and no fix: these do.
    const detail =
      code === 'malformed-body'
        ? 'The request body is not valid JSON: send one JSON object.'
        : code === 'body-too-large'
          ? `The request body is too large: at most ${sizeWords(Number((e as { limit?: number }).limit))}.`
          : e.message;
    return new HttpError(status, code, 'The request is not valid', detail);
  }
  return null;
}

/** A size in bytes as people say it: "1 MB", "4 KB". */
function sizeWords(bytes: number): string {
  if (!Number.isFinite(bytes)) return 'the limit';
  return bytes >= 1 << 20 ? `${Math.round((bytes / (1 << 20)) * 10) / 10} MB` : `${Math.ceil(bytes / 1024)} KB`;
}

/**
 * The problem+json body of an error. `publicUrl` makes the type absolute (the web app always
 * passes it; a bare router in a unit test may not).
 */
export function problemBody(err: HttpError, instance?: string, publicUrl?: string): Record<string, unknown> {
  return {
    type: problemTypeUri(publicUrl, err.code),
    title: err.title,
    status: err.status,
    ...(err.detail ? { detail: err.detail } : {}),
    ...(instance ? { instance } : {}),
    ...err.extra,
  };
}

/** The installation's public address, which the web app keeps in app.locals for problem types. */
function publicUrlOf(req: Request): string | undefined {
  const url = (req.app?.locals as { publicUrl?: unknown } | undefined)?.publicUrl;
  return typeof url === 'string' ? url : undefined;
}

/** The one error handler: problem+json, never a stack trace or SQL. */
export const errorHandler: ErrorRequestHandler = (err, req, res, _next) => {
  const http = toHttpError(err, req);
  if (!http) {
    req.log?.error({ err }, 'unhandled error');
    res
      .status(500)
      .type('application/problem+json')
      .json({
        type: problemTypeUri(publicUrlOf(req), 'internal'),
        title: 'Something went wrong on our side',
        status: 500,
      });
    return;
  }
  if (http.status >= 500) req.log?.error({ err }, http.title);
  // RFC 9110 §10.2.3: tell clients when a retry makes sense (a database restart takes seconds).
  if (http instanceof DatabaseUnavailableError) res.set('Retry-After', '5');
  res
    .status(http.status)
    .type('application/problem+json')
    .json(problemBody(http, req.originalUrl, publicUrlOf(req)));
};

export const notFoundHandler: RequestHandler = (req, _res, next) => {
  next(new NotFoundError(`route ${req.method} ${req.path}`));
};
