import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import {
  ApiError,
  READ_TIMEOUT_MS,
  api,
  problemToError,
  setCsrfToken,
  setUnauthorizedHandler,
  withQuery,
} from '@/api/client';
import { stubFetch } from './fake-fetch';

beforeEach(() => {
  setCsrfToken(null);
  setUnauthorizedHandler(() => {});
});
afterEach(() => {
  vi.unstubAllGlobals();
});

describe('problemToError', () => {
  it('keeps title, detail, type and field errors of an RFC 9457 problem', () => {
    const error = problemToError(422, {
      type: 'https://waterline.example/problems/validation',
      title: 'Some details need correcting',
      status: 422,
      detail: 'The job could not be saved.',
      errors: [
        { field: 'reference', message: 'Give the job a reference' },
        { field: 'promisedFrom', message: 'Must be a date' },
      ],
    });
    expect(error).toBeInstanceOf(ApiError);
    expect(error.status).toBe(422);
    expect(error.title).toBe('Some details need correcting');
    expect(error.detail).toBe('The job could not be saved.');
    expect(error.type).toBe('https://waterline.example/problems/validation');
    expect(error.errors).toEqual([
      { field: 'reference', message: 'Give the job a reference' },
      { field: 'promisedFrom', message: 'Must be a date' },
    ]);
    expect(error.message).toBe('The job could not be saved.');
  });

  it('drops malformed field errors and keeps the rest', () => {
    const error = problemToError(400, {
      title: 'Bad input',
      errors: [{ field: 'x' }, 'nonsense', { message: 'Whole form is empty' }],
    });
    expect(error.errors).toEqual([{ field: '', message: 'Whole form is empty' }]);
  });

  it('falls back to a plain title when the body is not a problem document', () => {
    expect(problemToError(502, '<html>Bad gateway</html>').title).toBe('Something went wrong on the server');
    expect(problemToError(409, undefined).title).toBe('That clashes with something already saved');
    expect(problemToError(418, { title: '   ' }).title).toBe('The request failed');
  });
});

describe('withQuery', () => {
  it('leaves out empty values', () => {
    expect(withQuery('/api/jobs', { search: '', status: null, page: 2, sort: 'promisedFrom', x: undefined })).toBe(
      '/api/jobs?page=2&sort=promisedFrom',
    );
    expect(withQuery('/api/jobs', {})).toBe('/api/jobs');
  });
});

describe('request', () => {
  it('parses JSON on success and sends no CSRF token on GET', async () => {
    setCsrfToken('token-1');
    const sent = stubFetch(() => ({ status: 200, body: { items: [], total: 0 } }));
    await expect(api.get('/api/jobs', { query: { page: 1 } })).resolves.toEqual({ items: [], total: 0 });
    expect(sent[0]?.url).toBe('/api/jobs?page=1');
    expect(sent[0]?.headers['X-CSRF-Token']).toBeUndefined();
  });

  it('sends the CSRF token and a JSON body on writes', async () => {
    setCsrfToken('token-2');
    const sent = stubFetch(() => ({ status: 204 }));
    await expect(api.put('/api/session/firm', { firmId: 7 })).resolves.toBeUndefined();
    expect(sent[0]?.method).toBe('PUT');
    expect(sent[0]?.headers['X-CSRF-Token']).toBe('token-2');
    expect(sent[0]?.headers['Content-Type']).toBe('application/json');
    expect(sent[0]?.body).toEqual({ firmId: 7 });
  });

  it('throws an ApiError from a problem+json answer', async () => {
    stubFetch(() => ({
      status: 409,
      body: { title: 'Crane already booked', detail: 'The 60 t crane is on another lift that day.' },
    }));
    const error = await api.post('/api/bookings', {}).catch((e: unknown) => e);
    expect(error).toBeInstanceOf(ApiError);
    expect((error as ApiError).status).toBe(409);
    expect((error as ApiError).detail).toBe('The 60 t crane is on another lift that day.');
  });

  it('calls the 401 handler once, unless the caller handles 401 itself', async () => {
    const onUnauthorized = vi.fn();
    setUnauthorizedHandler(onUnauthorized);
    stubFetch(() => ({ status: 401, body: { title: 'Please sign in' } }));
    await expect(api.get('/api/jobs')).rejects.toMatchObject({ status: 401 });
    expect(onUnauthorized).toHaveBeenCalledTimes(1);
    await expect(api.get('/api/session', { allowUnauthorized: true })).rejects.toMatchObject({ status: 401 });
    expect(onUnauthorized).toHaveBeenCalledTimes(1);
  });

  it('turns a network failure into an ApiError with status 0', async () => {
    vi.stubGlobal('fetch', () => Promise.reject(new TypeError('Failed to fetch')));
    await expect(api.get('/api/jobs')).rejects.toMatchObject({
      status: 0,
      title: 'Waterline could not reach the server',
    });
  });

  /** A fetch that never answers, but gives up as a browser does when its signal aborts; `answer` ends it. */
  function stallingFetch() {
    let answer: (body: unknown) => void = () => {};
    vi.stubGlobal(
      'fetch',
      (_url: string, init: RequestInit) =>
        new Promise<Response>((resolve, reject) => {
          init.signal?.addEventListener('abort', () => reject(new DOMException('Aborted', 'AbortError')));
          answer = (body) =>
            resolve(
              new Response(JSON.stringify(body), { status: 200, headers: { 'Content-Type': 'application/json' } }),
            );
        }),
    );
    return { answer: (body: unknown) => answer(body) };
  }

  it('gives up on a read with no answer after READ_TIMEOUT_MS, as a failure to try again', async () => {
    vi.useFakeTimers();
    try {
      stallingFetch();
      const read = api.get('/api/board');
      const outcome = read.then(
        () => 'answered',
        (e: unknown) => e,
      );
      await vi.advanceTimersByTimeAsync(READ_TIMEOUT_MS - 1);
      let settled = false;
      void outcome.then(() => (settled = true));
      await Promise.resolve();
      expect(settled).toBe(false);
      await vi.advanceTimersByTimeAsync(1);
      expect(await outcome).toMatchObject({ status: 0, title: 'The server took too long to answer' });
    } finally {
      vi.useRealTimers();
    }
  });

  it('waits for a write however long it takes (given up on, its outcome would be unknown)', async () => {
    vi.useFakeTimers();
    try {
      const fetchStub = stallingFetch();
      const write = api.post<{ saved: boolean }>('/api/bookings', { stageId: '1' });
      await vi.advanceTimersByTimeAsync(3 * READ_TIMEOUT_MS);
      fetchStub.answer({ saved: true });
      expect(await write).toEqual({ saved: true });
    } finally {
      vi.useRealTimers();
    }
  });

  it("passes the caller's abort through untouched, timer or not", async () => {
    stallingFetch();
    const caller = new AbortController();
    const read = api.get('/api/board', { signal: caller.signal });
    caller.abort();
    await expect(read).rejects.toMatchObject({ name: 'AbortError' });
  });

  it('passes an abort through untouched, so a cancelled load is not shown as a failure', async () => {
    vi.stubGlobal('fetch', () => Promise.reject(new DOMException('Aborted', 'AbortError')));
    await expect(api.get('/api/jobs')).rejects.toMatchObject({ name: 'AbortError' });
  });
});
