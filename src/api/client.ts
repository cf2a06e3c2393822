/**
 * The one HTTP client of the app: JSON in and out, the CSRF token on every write,
 * RFC 9457 problem+json turned into {@link ApiError}, and a single place that reacts to 401.
 */

export interface FieldProblem {
  field: string;
  message: string;
}

/** A failed API call, carrying what the server said in problem+json (RFC 9457). */
export class ApiError extends Error {
  readonly status: number;
  readonly title: string;
  readonly detail: string | undefined;
  readonly type: string | undefined;
  readonly errors: FieldProblem[];
  /** The whole problem document, for members beyond the standard ones (violations, current, code). */
  readonly problem: Record<string, unknown>;

  constructor(init: {
    status: number;
    title: string;
    detail?: string;
    type?: string;
    errors?: FieldProblem[];
    problem?: Record<string, unknown>;
  }) {
    super(init.detail ?? init.title);
    this.name = 'ApiError';
    this.status = init.status;
    this.title = init.title;
    this.detail = init.detail;
    this.type = init.type;
    this.errors = init.errors ?? [];
    this.problem = init.problem ?? {};
  }
}

/** Thrown when the network itself fails (offline, server down): status 0. */
export function networkError(cause: unknown): ApiError {
  const error = new ApiError({
    status: 0,
    title: 'Waterline could not reach the server',
    detail: 'Check your connection and try again.',
  });
  (error as { cause?: unknown }).cause = cause;
  return error;
}

const fallbackTitles: Record<number, string> = {
  400: 'The request was not understood',
  401: 'Please sign in',
  403: 'You may not do that',
  404: 'Not found',
  409: 'That clashes with something already saved',
  422: 'Some details need correcting',
  429: 'Too many requests — wait a moment and try again',
};

function isRecord(value: unknown): value is Record<string, unknown> {
  return typeof value === 'object' && value !== null && !Array.isArray(value);
}

function readFieldProblems(value: unknown): FieldProblem[] {
  if (!Array.isArray(value)) return [];
  return value.flatMap((entry): FieldProblem[] => {
    if (!isRecord(entry) || typeof entry.message !== 'string') return [];
    const field = typeof entry.field === 'string' ? entry.field : '';
    return [{ field, message: entry.message }];
  });
}

/**
 * Builds an {@link ApiError} from a failed response's status and parsed body.
 * Accepts any body: a problem document, another JSON value, or nothing.
 * @example problemToError(422, { title: 'Invalid job', errors: [{ field: 'reference', message: 'Required' }] })
 */
export function problemToError(status: number, body: unknown): ApiError {
  const fallback =
    fallbackTitles[status] ?? (status >= 500 ? 'Something went wrong on the server' : 'The request failed');
  if (!isRecord(body)) return new ApiError({ status, title: fallback });
  const title = typeof body.title === 'string' && body.title.trim() ? body.title : fallback;
  const detail = typeof body.detail === 'string' && body.detail.trim() ? body.detail : undefined;
  const type = typeof body.type === 'string' ? body.type : undefined;
  return new ApiError({ status, title, detail, type, errors: readFieldProblems(body.errors), problem: body });
}

export interface RequestOptions {
  method?: 'GET' | 'POST' | 'PUT' | 'PATCH' | 'DELETE';
  /** Sent as JSON. */
  body?: unknown;
  /** Appended as a query string; undefined, null and '' are left out. */
  query?: Record<string, string | number | boolean | null | undefined>;
  signal?: AbortSignal;
  /** Let the caller handle 401 itself (the session load does: signed out is a normal answer there). */
  allowUnauthorized?: boolean;
}

let csrfToken: string | null = null;
let onUnauthorized: () => void = () => {};

/** The session store hands over the token it got from GET /api/session. */
export function setCsrfToken(token: string | null): void {
  csrfToken = token;
}

/** main.ts wires this to the router, so the client needs no router import. */
export function setUnauthorizedHandler(handler: () => void): void {
  onUnauthorized = handler;
}

/** Joins a path and query, leaving out empty values. @example withQuery('/api/jobs', { page: 2, search: '' }) // '/api/jobs?page=2' */
export function withQuery(path: string, query: RequestOptions['query']): string {
  if (!query) return path;
  const params = new URLSearchParams();
  for (const [key, value] of Object.entries(query)) {
    if (value === undefined || value === null || value === '') continue;
    params.set(key, String(value));
  }
  const text = params.toString();
  return text ? `${path}?${text}` : path;
}

async function readBody(response: Response): Promise<unknown> {
  if (response.status === 204) return undefined;
  const text = await response.text();
  if (!text) return undefined;
  const type = response.headers.get('content-type') ?? '';
  if (!type.includes('json')) return text;
  try {
    return JSON.parse(text) as unknown;
  } catch {
    return undefined;
  }
}

/**
 * How long a read may take, answer and body, before the page says so and offers to try again
 * (on site, a phone's connection can stall without failing). Writes wait for the server: given up
 * on here, their outcome would be unknown.
 */
export const READ_TIMEOUT_MS = 30_000;

/** Thrown when a read got no whole answer within READ_TIMEOUT_MS: status 0, like a network failure. */
function timedOut(): ApiError {
  return new ApiError({
    status: 0,
    title: 'The server took too long to answer',
    detail: 'Check your connection and try again.',
  });
}

/** Sends one request and resolves with the parsed JSON body (undefined for 204). */
export async function request<T>(path: string, options: RequestOptions = {}): Promise<T> {
  const method = options.method ?? 'GET';
  const headers: Record<string, string> = { Accept: 'application/json, application/problem+json' };
  if (options.body !== undefined) headers['Content-Type'] = 'application/json';
  if (method !== 'GET' && csrfToken) headers['X-CSRF-Token'] = csrfToken;

  // The caller's signal (a newer load replacing this one) and, for a read, the timeout abort it.
  const controller = new AbortController();
  const caller = options.signal;
  const callerAborted = () => controller.abort();
  if (caller?.aborted) controller.abort();
  else caller?.addEventListener('abort', callerAborted, { once: true });
  let late = false;
  const timer =
    method === 'GET'
      ? setTimeout(() => {
          late = true;
          controller.abort();
        }, READ_TIMEOUT_MS)
      : undefined;

  let response: Response;
  let body: unknown;
  try {
    response = await fetch(withQuery(path, options.query), {
      method,
      headers,
      credentials: 'same-origin',
      body: options.body === undefined ? undefined : JSON.stringify(options.body),
      signal: controller.signal,
    });
    body = await readBody(response);
  } catch (cause) {
    if (late && !caller?.aborted) throw timedOut();
    if (cause instanceof Error && cause.name === 'AbortError') throw cause;
    throw networkError(cause);
  } finally {
    clearTimeout(timer);
    caller?.removeEventListener('abort', callerAborted);
  }

  if (response.ok) return body as T;
  const error = problemToError(response.status, body);
  if (response.status === 401 && !options.allowUnauthorized) onUnauthorized();
  throw error;
}

/** Short forms for the usual verbs. */
export const api = {
  get: <T>(path: string, options: Omit<RequestOptions, 'method' | 'body'> = {}) => request<T>(path, options),
  post: <T>(path: string, body?: unknown, options: Omit<RequestOptions, 'method' | 'body'> = {}) =>
    request<T>(path, { ...options, method: 'POST', body }),
  put: <T>(path: string, body?: unknown, options: Omit<RequestOptions, 'method' | 'body'> = {}) =>
    request<T>(path, { ...options, method: 'PUT', body }),
  patch: <T>(path: string, body?: unknown, options: Omit<RequestOptions, 'method' | 'body'> = {}) =>
    request<T>(path, { ...options, method: 'PATCH', body }),
  delete: <T>(path: string, options: Omit<RequestOptions, 'method' | 'body'> = {}) =>
    request<T>(path, { ...options, method: 'DELETE' }),
};
