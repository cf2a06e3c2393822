import { vi } from 'vitest';

export interface SentRequest {
  url: string;
  method: string;
  headers: Record<string, string>;
  body: unknown;
}

type Answer = { status: number; body?: unknown; contentType?: string };

/**
 * Replaces global fetch with a tiny server: `answer(request)` decides each response.
 * Returns the requests sent, in order, for the test to inspect.
 */
export function stubFetch(answer: (request: SentRequest) => Answer | Promise<Answer>): SentRequest[] {
  const sent: SentRequest[] = [];
  vi.stubGlobal('fetch', async (url: string, init: RequestInit = {}) => {
    const request: SentRequest = {
      url,
      method: init.method ?? 'GET',
      headers: { ...(init.headers as Record<string, string>) },
      body: typeof init.body === 'string' ? JSON.parse(init.body) : undefined,
    };
    sent.push(request);
    const { status, body, contentType } = await answer(request);
    const type = contentType ?? (status >= 400 ? 'application/problem+json' : 'application/json');
    const text = body === undefined ? null : typeof body === 'string' ? body : JSON.stringify(body);
    return new Response(status === 204 ? null : text, {
      status,
      headers: text === null ? {} : { 'content-type': type },
    });
  });
  return sent;
}
