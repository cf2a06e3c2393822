import { afterEach, describe, expect, it, vi } from 'vitest';
import { effectScope } from 'vue';
import { forgetKeptAnswers, LOOKED_AGAIN_AFTER_MS, useApiResource, type ApiSource } from '@/composables/useApiResource';
import LoadProblem from '@/components/LoadProblem.vue';
import { ApiError } from '@/api/client';
import { keptSince } from '@/utils/dates';
import { createPinia, setActivePinia } from 'pinia';
import { useSessionStore } from '@/stores/session';
import { stubFetch } from './fake-fetch';
import { renderHtml } from './render';

/*
 * A page on a phone that loses its signal (a garden behind a house, a rural lane) keeps what it had
 * loaded, dated, instead of emptying the screen; an answer that refuses (not found, not allowed)
 * is never dressed up as an old copy.
 */
afterEach(() => {
  vi.unstubAllGlobals();
  vi.useRealTimers();
  forgetKeptAnswers();
});
const flush = () => new Promise((resolve) => setTimeout(resolve, 0));

/** A server answering from `answers` in turn: a number is that status (problem+json), 'offline' a failed fetch. */
function server(answers: (unknown | number | 'offline')[]) {
  return stubFetch(() => {
    const next = answers.shift();
    if (next === 'offline') throw new TypeError('Failed to fetch');
    if (typeof next === 'number') return { status: next, body: { title: `Answered ${next}` } };
    return { status: 200, body: next };
  });
}

function mount<T>(source: () => ApiSource | null, options?: { keep?: boolean; refreshOnReturn?: boolean }) {
  const scope = effectScope();
  const resource = scope.run(() => useApiResource<T>(source, options))!;
  return { resource, stop: () => scope.stop() };
}

describe('what a page keeps when the server is out of reach', () => {
  it('keeps the list on screen after a refresh without a signal, dated from its own answer', async () => {
    vi.useFakeTimers({ toFake: ['Date'], now: new Date('2026-12-05T07:42:00Z') });
    server([{ items: ['dig'] }, 'offline', 503, { items: ['pour'] }]);
    const { resource, stop } = mount<{ items: string[] }>(() => ({ path: '/api/my-work' }));
    await flush();
    expect(resource.data.value).toEqual({ items: ['dig'] });
    expect(resource.stale.value).toBe(false);

    vi.setSystemTime(new Date('2026-12-05T10:15:00Z'));
    await resource.refresh();
    expect(resource.error.value?.status).toBe(0);
    expect(resource.data.value).toEqual({ items: ['dig'] });
    expect(resource.stale.value).toBe(true);
    expect(resource.loadedAt.value).toBe(Date.parse('2026-12-05T07:42:00Z'));
    // A proxy saying the server is down is the same as no signal.
    await resource.refresh();
    expect(resource.error.value?.status).toBe(503);
    expect(resource.stale.value).toBe(true);
    // Back in reach: the new answer, dated now.
    await resource.refresh();
    expect(resource.error.value).toBeNull();
    expect(resource.data.value).toEqual({ items: ['pour'] });
    expect(resource.stale.value).toBe(false);
    expect(resource.loadedAt.value).toBe(Date.parse('2026-12-05T10:15:00Z'));
    stop();
  });

  it('keeps the notice while the list is asked for again, until the new answer comes', async () => {
    let answer: (value: unknown) => void = () => undefined;
    const slow = new Promise((resolve) => (answer = resolve));
    let calls = 0;
    stubFetch(async () => {
      calls++;
      if (calls === 1) return { status: 200, body: { items: ['dig'] } };
      if (calls === 2) throw new TypeError('Failed to fetch');
      await slow;
      return { status: 200, body: { items: ['pour'] } };
    });
    const { resource, stop } = mount<{ items: string[] }>(() => ({ path: '/api/my-work' }));
    await flush();
    await resource.refresh();
    expect(resource.stale.value).toBe(true);
    // Tried again on a weak signal: still dated, and busy, while the answer is on its way.
    const again = resource.refresh();
    expect(resource.loading.value).toBe(true);
    expect(resource.stale.value).toBe(true);
    expect(resource.error.value?.status).toBe(0);
    answer(undefined);
    await again;
    expect(resource.stale.value).toBe(false);
    expect(resource.error.value).toBeNull();
    expect(resource.data.value).toEqual({ items: ['pour'] });
    stop();
  });

  it('never calls a refusal an old copy: not found, not allowed and a server error are errors', async () => {
    for (const status of [403, 404, 500]) {
      server([{ items: ['dig'] }, status]);
      const { resource, stop } = mount<{ items: string[] }>(() => ({ path: '/api/jobs/12' }));
      await flush();
      await resource.refresh();
      expect(resource.error.value?.status).toBe(status);
      expect(resource.stale.value).toBe(false);
      stop();
    }
  });

  it("never shows one source's answer as another's: a day whose sheet can't be fetched shows no other day", async () => {
    server([{ sheets: ['Mon'] }, 'offline']);
    let date = '2026-12-07';
    const { resource, stop } = mount<{ sheets: string[] }>(() => ({ path: '/api/day-sheets', query: { date } }));
    await flush();
    expect(resource.data.value).toEqual({ sheets: ['Mon'] });
    date = '2026-12-08';
    await resource.refresh();
    expect(resource.error.value?.status).toBe(0);
    expect(resource.data.value).toBeNull();
    expect(resource.stale.value).toBe(false);
    stop();
  });

  it('shows a page opened again without a signal from the answer kept for the tab, until the session changes', async () => {
    vi.useFakeTimers({ toFake: ['Date'], now: new Date('2026-12-05T07:42:00Z') });
    server([{ items: ['dig'] }, { items: ['walls'] }, 'offline', 'offline', 'offline', 'offline']);
    const first = mount<{ items: string[] }>(() => ({ path: '/api/my-work' }), { keep: true });
    const other = mount<{ items: string[] }>(() => ({ path: '/api/resources' }));
    await flush();
    first.stop();
    other.stop();

    vi.setSystemTime(new Date('2026-12-05T11:00:00Z'));
    const again = mount<{ items: string[] }>(() => ({ path: '/api/my-work' }), { keep: true });
    await flush();
    expect(again.resource.data.value).toEqual({ items: ['dig'] });
    expect(again.resource.stale.value).toBe(true);
    expect(again.resource.loadedAt.value).toBe(Date.parse('2026-12-05T07:42:00Z'));
    again.stop();
    // A resource that doesn't keep its answers has nothing to show.
    const notKept = mount<{ items: string[] }>(() => ({ path: '/api/resources' }));
    await flush();
    expect(notKept.resource.data.value).toBeNull();
    notKept.stop();
    // Another person signed in (or nobody): what was kept is gone.
    forgetKeptAnswers();
    const afterSignOut = mount<{ items: string[] }>(() => ({ path: '/api/my-work' }), { keep: true });
    await flush();
    expect(afterSignOut.resource.data.value).toBeNull();
    expect(afterSignOut.resource.error.value?.status).toBe(0);
    afterSignOut.stop();
  });
});

describe('a list people work from through the day', () => {
  /** A page's window and document: the test says when the signal is back and when the page is hidden or seen. */
  function browserPage() {
    const win = new EventTarget();
    const doc = Object.assign(new EventTarget(), { visibilityState: 'visible' as 'visible' | 'hidden' });
    vi.stubGlobal('window', win);
    vi.stubGlobal('document', doc);
    return {
      online: () => win.dispatchEvent(new Event('online')),
      hide: () => {
        doc.visibilityState = 'hidden';
        doc.dispatchEvent(new Event('visibilitychange'));
      },
      show: () => {
        doc.visibilityState = 'visible';
        doc.dispatchEvent(new Event('visibilitychange'));
      },
    };
  }

  it('loads again when the signal comes back, and when looked at again after a minute or more out of sight', async () => {
    vi.useFakeTimers({ toFake: ['Date'], now: new Date('2026-12-05T07:42:00Z') });
    const page = browserPage();
    const sent = server([{ items: ['dig'] }, { items: ['dig', 'pour'] }, { items: ['walls'] }]);
    const { resource, stop } = mount<{ items: string[] }>(() => ({ path: '/api/my-work' }), {
      refreshOnReturn: true,
    });
    await flush();
    page.online();
    await flush();
    expect(resource.data.value).toEqual({ items: ['dig', 'pour'] });
    // Out of sight for less than a minute: nothing is asked.
    page.hide();
    vi.setSystemTime(Date.now() + LOOKED_AGAIN_AFTER_MS - 1);
    page.show();
    await flush();
    expect(sent).toHaveLength(2);
    // In a pocket for an hour: looked at again, it loads again.
    page.hide();
    vi.setSystemTime(Date.now() + 3_600_000);
    page.show();
    await flush();
    expect(sent).toHaveLength(3);
    expect(resource.data.value).toEqual({ items: ['walls'] });
    // Gone from the page: nothing more is asked.
    stop();
    page.online();
    await flush();
    expect(sent).toHaveLength(3);
  });

  it('asks nothing more of a page that did not ask for it', async () => {
    const page = browserPage();
    const sent = server([{ items: ['dig'] }, { items: ['dig'] }]);
    const { stop } = mount<{ items: string[] }>(() => ({ path: '/api/resources' }));
    await flush();
    page.online();
    page.hide();
    page.show();
    await flush();
    expect(sent).toHaveLength(1);
    stop();
  });
});

describe('how much a tab keeps', () => {
  it('keeps the last fifty pages, the one looked at longest ago going first', async () => {
    let offline = false;
    stubFetch((request) => {
      if (offline) throw new TypeError('Failed to fetch');
      return { status: 200, body: { id: Number(request.url.split('/').pop()) } };
    });
    for (let i = 0; i <= 50; i++) {
      const page = mount<{ id: number }>(() => ({ path: `/api/jobs/${i}` }), { keep: true });
      await flush();
      page.stop();
      // Job 0 looked at again after the others, so it is not the oldest.
      if (i === 25) {
        const again = mount<{ id: number }>(() => ({ path: '/api/jobs/0' }), { keep: true });
        await flush();
        again.stop();
      }
    }
    offline = true;
    const open = async (id: number) => {
      const page = mount<{ id: number }>(() => ({ path: `/api/jobs/${id}` }), { keep: true });
      await flush();
      page.stop();
      return page.resource.data.value;
    };
    expect(await open(1)).toBeNull();
    expect(await open(0)).toEqual({ id: 0 });
    expect(await open(50)).toEqual({ id: 50 });
  });
});

describe('whose kept answers they are', () => {
  const session = (userId: string, firmId: string) => ({
    user: { id: userId, name: 'Connor Reid', email: 'connor.reid@tideway.example' },
    firm: { id: firmId, name: 'Tideway Hot Tubs', kind: 'installer', timeZone: 'Europe/London' },
    role: 'crew',
    memberships: [],
    csrfToken: 'token',
  });
  const reopened = async () => {
    const again = mount<{ items: string[] }>(() => ({ path: '/api/my-work' }), { keep: true });
    await flush();
    again.stop();
    return again.resource.data.value;
  };

  it('keeps them through a fresh look at the same session, and forgets them on sign-out', async () => {
    setActivePinia(createPinia());
    const store = useSessionStore();
    server([session('7', '1'), { items: ['dig'] }, session('7', '1'), 'offline', 204, 'offline']);
    await store.load();
    await reopened();
    // The same person in the same firm (the session looked at again): still theirs.
    await store.load({ force: true });
    expect(await reopened()).toEqual({ items: ['dig'] });
    await store.signOut();
    expect(await reopened()).toBeNull();
  });

  it('forgets them when the person switches firm', async () => {
    setActivePinia(createPinia());
    const store = useSessionStore();
    server([session('7', '1'), { items: ['dig'] }, session('7', '2'), 'offline']);
    await store.load();
    await reopened();
    await store.switchFirm('2');
    expect(await reopened()).toBeNull();
  });
});

describe('the notice over a kept answer', () => {
  it('says from when, in the firm’s zone: the time alone today, the day too before', () => {
    const now = new Date('2026-07-14T15:00:00Z');
    // 07:42 UTC in July is 08:42 in London (British Summer Time).
    expect(keptSince(Date.parse('2026-07-14T07:42:00Z'), 'Europe/London', now)).toBe('at 08:42');
    expect(keptSince(Date.parse('2026-07-13T16:05:00Z'), 'Europe/London', now)).toBe('on Mon 13 Jul at 17:05');
    // 23:30 UTC on 13 July is already 14 July in London.
    expect(keptSince(Date.parse('2026-07-13T23:30:00Z'), 'Europe/London', now)).toBe('at 00:30');
    expect(keptSince(Date.parse('2025-12-31T09:00:00Z'), 'Europe/London', now)).toBe('on Wed 31 Dec 2025 at 09:00');
  });

  it('dates what is shown below it, and says only what went wrong when nothing is shown', async () => {
    let hold: (value: unknown) => void = () => undefined;
    const held = new Promise((resolve) => (hold = resolve));
    let calls = 0;
    stubFetch(async (request) => {
      calls++;
      if (request.url === '/api/nothing') throw new TypeError('Failed to fetch');
      if (calls === 1) return { status: 200, body: { items: ['dig'] } };
      if (calls === 2) throw new TypeError('Failed to fetch');
      await held;
      throw new TypeError('Failed to fetch');
    });
    const shown = mount<{ items: string[] }>(() => ({ path: '/api/my-work' }));
    await flush();
    await shown.resource.refresh();
    const kept = await renderHtml(LoadProblem, { resource: shown.resource });
    expect(kept).toContain('data-testid="kept-answer"');
    expect(kept).toContain('Waterline could not reach the server');
    expect(kept).toMatch(/Below is what was loaded (at|on [^<]+ at) \d\d:\d\d: it may have changed since/);
    expect(kept).toContain('>Try again<');
    // Asked for again: the button says so until an answer comes.
    const again = shown.resource.refresh();
    const trying = await renderHtml(LoadProblem, { resource: shown.resource });
    expect(trying).toContain('Trying again…');
    expect(trying).toContain('disabled');
    hold(undefined);
    await again;
    shown.stop();
    const empty = mount<unknown>(() => ({ path: '/api/nothing' }));
    await flush();
    const nothing = await renderHtml(LoadProblem, { resource: empty.resource });
    expect(nothing).not.toContain('kept-answer');
    expect(nothing).toContain('Check your connection and try again.');
    empty.stop();
    // Loaded before, then refused (not a lost signal): an error, not a dated copy.
    let goneCalls = 0;
    stubFetch(() =>
      goneCalls++ === 0 ? { status: 200, body: { id: 1 } } : { status: 404, body: { title: 'Not found' } },
    );
    const gone = mount<unknown>(() => ({ path: '/api/jobs/1' }));
    await flush();
    await gone.resource.refresh();
    const refused = await renderHtml(LoadProblem, { resource: gone.resource });
    expect(refused).toContain('Not found');
    expect(refused).not.toContain('kept-answer');
    gone.stop();
    // Given an error alone, as the other pages do.
    const plain = await renderHtml(LoadProblem, { error: new ApiError({ status: 404, title: 'Not found' }) });
    expect(plain).toContain('Not found');
    expect(plain).not.toContain('kept-answer');
  });
});
