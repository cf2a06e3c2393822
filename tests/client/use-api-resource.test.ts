import { afterEach, describe, expect, it, vi } from 'vitest';
import { effectScope, nextTick, ref } from 'vue';
import { setUnauthorizedHandler } from '@/api/client';
import { useApiResource } from '@/composables/useApiResource';

afterEach(() => {
  vi.unstubAllGlobals();
});

const flush = () => new Promise((resolve) => setTimeout(resolve, 0));

/** A fetch whose answers the test releases by hand, honouring AbortSignal like the browser's. */
function manualFetch() {
  const waiting: { url: string; release: (body: unknown, status?: number) => void }[] = [];
  vi.stubGlobal(
    'fetch',
    (url: string, init: RequestInit = {}) =>
      new Promise<Response>((resolve, reject) => {
        init.signal?.addEventListener('abort', () => reject(new DOMException('Aborted', 'AbortError')));
        waiting.push({
          url,
          release: (body, status = 200) =>
            resolve(
              new Response(JSON.stringify(body), {
                status,
                headers: { 'content-type': status >= 400 ? 'application/problem+json' : 'application/json' },
              }),
            ),
        });
      }),
  );
  return waiting;
}

describe('useApiResource', () => {
  it('loads, then reloads when what the source reads changes', async () => {
    const waiting = manualFetch();
    const page = ref(1);
    const scope = effectScope();
    const resource = scope.run(() =>
      useApiResource<{ page: number }>(() => ({ path: '/api/jobs', query: { page: page.value } })),
    )!;
    expect(resource.loading.value).toBe(true);
    waiting[0]?.release({ page: 1 });
    await flush();
    expect(resource.data.value).toEqual({ page: 1 });
    expect(resource.loading.value).toBe(false);

    page.value = 2;
    await nextTick();
    expect(waiting[1]?.url).toBe('/api/jobs?page=2');
    scope.stop();
  });

  it('keeps the newest answer when an older, slower one arrives late', async () => {
    const waiting = manualFetch();
    const search = ref('pit');
    const scope = effectScope();
    const resource = scope.run(() =>
      useApiResource<{ search: string }>(() => ({ path: '/api/jobs', query: { search: search.value } })),
    )!;
    search.value = 'pit base';
    await nextTick();
    waiting[1]?.release({ search: 'pit base' });
    waiting[0]?.release({ search: 'pit' });
    await flush();
    expect(resource.data.value).toEqual({ search: 'pit base' });
    expect(resource.error.value).toBeNull();
    scope.stop();
  });

  it('holds a problem as error and clears it on a good refresh', async () => {
    setUnauthorizedHandler(() => {});
    const waiting = manualFetch();
    const scope = effectScope();
    const resource = scope.run(() => useApiResource<{ items: unknown[] }>(() => ({ path: '/api/resources' })))!;
    waiting[0]?.release({ title: 'Resources are resting', detail: 'Try again shortly.' }, 503);
    await flush();
    expect(resource.error.value?.status).toBe(503);
    expect(resource.error.value?.title).toBe('Resources are resting');

    const again = resource.refresh();
    waiting[1]?.release({ items: [] });
    await again;
    expect(resource.error.value).toBeNull();
    expect(resource.data.value).toEqual({ items: [] });
    scope.stop();
  });

  it('waits while the source gives null', async () => {
    const waiting = manualFetch();
    const scope = effectScope();
    const resource = scope.run(() => useApiResource(() => null))!;
    await flush();
    expect(waiting).toHaveLength(0);
    expect(resource.loading.value).toBe(false);
    scope.stop();
  });

  it('loads a kept answer shown for want of a signal again when the signal is back, and nothing else', async () => {
    setUnauthorizedHandler(() => {});
    const browser = new EventTarget();
    vi.stubGlobal('window', browser);
    const waiting = manualFetch();
    const scope = effectScope();
    const job = scope.run(() => useApiResource<{ ref: string }>(() => ({ path: '/api/jobs/77' }), { keep: true }))!;
    scope.run(() => useApiResource(() => ({ path: '/api/jobs/78' }), { keep: true }));
    waiting[0]?.release({ ref: 'TW-7' });
    waiting[1]?.release({ title: 'Not found' }, 404);
    await flush();
    // Opened again with no signal (a proxy's 504): the kept answer, dated.
    const again = job.refresh();
    waiting[2]?.release({ title: 'Gateway timeout' }, 504);
    await again;
    expect([job.stale.value, job.data.value]).toEqual([true, { ref: 'TW-7' }]);
    browser.dispatchEvent(new Event('online'));
    // Only the one shown for want of a signal asks again: a refusal is not a signal problem.
    expect(waiting.map((w) => w.url)).toEqual(['/api/jobs/77', '/api/jobs/78', '/api/jobs/77', '/api/jobs/77']);
    waiting[3]?.release({ ref: 'TW-7' });
    await flush();
    expect([job.stale.value, job.error.value]).toEqual([false, null]);
    scope.stop();
    browser.dispatchEvent(new Event('online'));
    expect(waiting).toHaveLength(4);
  });
});
