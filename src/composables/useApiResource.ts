import { ref, shallowRef, watch, onScopeDispose, type Ref, type ShallowRef } from 'vue';
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
}

/**
 * Per-view data from one GET endpoint. The source is a getter, so a view's filters and paging
 * re-fetch by changing the values it reads; a newer request cancels an older one still in flight,
 * so a slow answer never overwrites a newer one. Return null from the source to wait.
 * @example const { data, loading, error, refresh } = useApiResource<ItemList<ResourceRow>>(() => ({ path: '/api/resources' }))
 */
export function useApiResource<T>(source: () => ApiSource | null): ApiResource<T> {
  const data = shallowRef<T | null>(null);
  const loading = ref(false);
  const error = shallowRef<ApiError | null>(null);
  let controller: AbortController | null = null;

  async function fetchNow(target: ApiSource | null): Promise<void> {
    controller?.abort();
    if (!target) return;
    const own = new AbortController();
    controller = own;
    loading.value = true;
    error.value = null;
    try {
      data.value = await api.get<T>(target.path, { query: target.query, signal: own.signal });
    } catch (caught) {
      if (own.signal.aborted) return;
      error.value = caught instanceof ApiError ? caught : new ApiError({ status: 0, title: 'Something went wrong' });
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

  return { data, loading, error, refresh: () => fetchNow(source()) };
}
