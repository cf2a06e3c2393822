import { computed, ref, shallowRef, watch, onScopeDispose, type ComputedRef, type Ref, type ShallowRef } from 'vue';
import { api, ApiError, type RequestOptions } from '@/api/client';

export interface ApiSource {
  path: string;
  query?: RequestOptions['query'];
}

export interface ApiResource<T> {
  data: ShallowRef<T | null>;
  loading: Ref<boolean>;
  error: ShallowRef<ApiError | null>;
  refresh: () => Promise<void>;
  /** When the data held was answered (epoch ms), null before the first answer. */
  loadedAt: Ref<number | null>;
  /**
   * The server could not be reached (no signal, or it is down) and an earlier answer is at hand: the
   * page keeps showing it, saying from when (LoadProblem's `loadedAt`), rather than emptying the screen.
   */
  stale: ComputedRef<boolean>;
}

export interface ApiResourceOptions {
  /**
   * Keep the last answer in memory for this tab, so the page can show it again, dated, when it is
   * opened without a signal (My work or a slot list on site, after a look at another page). Forgotten
   * when the session changes (see {@link forgetKeptAnswers}). An earlier answer shown for want of a
   * signal is loaded again when the browser says the signal is back.
   */
  keep?: boolean;
  /**
   * Load again when the signal comes back, and when the page is looked at again after
   * {@link LOOKED_AGAIN_AFTER_MS} (a phone taken out of a pocket hours later): a list people work
   * from through the day is today's, not the morning's.
   */
  refreshOnReturn?: boolean;
}

/** How long a page may have been out of sight before looking at it again loads it again. */
export const LOOKED_AGAIN_AFTER_MS = 60_000;

/** A failure of reaching the server at all (no answer, or a proxy's 502–504), not an answer refusing. */
export function isUnreachable(error: ApiError | null): boolean {
  return error !== null && (error.status === 0 || error.status === 502 || error.status === 503 || error.status === 504);
}

/** The last answers of resources that keep theirs, by path and query, the latest last. */
const kept = new Map<string, { data: unknown; at: number }>();
/** How many answers are kept (a day of job pages); the longest unused goes first. */
const KEPT_MOST = 50;

function keepAnswer(key: string, data: unknown, at: number): void {
  kept.delete(key);
  kept.set(key, { data, at });
  if (kept.size > KEPT_MOST) kept.delete(kept.keys().next().value as string);
}

/** Drops every kept answer: another person or firm is signed in now, or nobody. */
export function forgetKeptAnswers(): void {
  kept.clear();
}

/**
 * Per-view data from one GET endpoint. The source is a getter, so a view's filters and paging
 * re-fetch by changing the values it reads; a newer request cancels an older one still in flight,
 * so a slow answer never overwrites a newer one. Return null from the source to wait.
 * @example const { data, loading, error, refresh } = useApiResource<ItemList<ResourceRow>>(() => ({ path: '/api/resources' }))
 */
export function useApiResource<T>(source: () => ApiSource | null, options: ApiResourceOptions = {}): ApiResource<T> {
  const data = shallowRef<T | null>(null);
  const loading = ref(false);
  const error = shallowRef<ApiError | null>(null);
  const loadedAt = ref<number | null>(null);
  /** Which source the data held answers (a page of a list, a day's sheet). */
  let dataKey: string | null = null;
  let controller: AbortController | null = null;
  const stale = computed(() => data.value !== null && isUnreachable(error.value));

  async function fetchNow(target: ApiSource | null): Promise<void> {
    controller?.abort();
    if (!target) return;
    const own = new AbortController();
    controller = own;
    const key = JSON.stringify(target);
    loading.value = true;
    // An earlier answer on screen stays dated while it is asked for again (on a weak signal that can
    // take half a minute): the notice goes with the new answer, not with the asking.
    if (!(stale.value && dataKey === key)) error.value = null;
    try {
      data.value = await api.get<T>(target.path, { query: target.query, signal: own.signal });
      error.value = null;
      dataKey = key;
      loadedAt.value = Date.now();
      if (options.keep) keepAnswer(key, data.value, loadedAt.value);
    } catch (caught) {
      if (own.signal.aborted) return;
      const failed = caught instanceof ApiError ? caught : new ApiError({ status: 0, title: 'Something went wrong' });
      if (dataKey !== key) {
        // What is held answers another source (yesterday's sheet, the last page): never shown as this
        // one's. This one's own earlier answer, kept, is shown instead when the server was out of reach.
        const earlier = isUnreachable(failed) ? kept.get(key) : undefined;
        data.value = earlier === undefined ? null : (earlier.data as T);
        loadedAt.value = earlier === undefined ? null : earlier.at;
        dataKey = earlier === undefined ? null : key;
      }
      error.value = failed;
    } finally {
      if (controller === own) {
        loading.value = false;
        controller = null;
      }
    }
  }

  watch(
    () => JSON.stringify(source()),
    () => void fetchNow(source()),
    { immediate: true },
  );
  onScopeDispose(() => controller?.abort());

  if (options.keep && !options.refreshOnReturn && typeof window !== 'undefined') {
    const back = () => {
      if (isUnreachable(error.value)) void fetchNow(source());
    };
    window.addEventListener('online', back);
    onScopeDispose(() => window.removeEventListener('online', back));
  }

  if (options.refreshOnReturn && typeof window !== 'undefined' && typeof document !== 'undefined') {
    let hiddenAt: number | null = null;
    const online = () => void fetchNow(source());
    const seen = () => {
      if (document.visibilityState === 'hidden') hiddenAt ??= Date.now();
      else if (hiddenAt !== null) {
        const away = Date.now() - hiddenAt;
        hiddenAt = null;
        if (away >= LOOKED_AGAIN_AFTER_MS) void fetchNow(source());
      }
    };
    window.addEventListener('online', online);
    document.addEventListener('visibilitychange', seen);
    onScopeDispose(() => {
      window.removeEventListener('online', online);
      document.removeEventListener('visibilitychange', seen);
    });
  }

  return { data, loading, error, refresh: () => fetchNow(source()), loadedAt, stale };
}
