import { computed, ref, watch } from 'vue';
import type { JobRow, JobStatus, Page } from '@/api/types';
import { useApiResource } from './useApiResource';

export type JobSortKey = 'promisedFrom' | 'reference' | 'customerName' | 'orderedOn' | 'status';

/** Search, status filter, paging and sorting for the jobs list, all done by the server. */
export function useJobList() {
  const search = ref('');
  const appliedSearch = ref('');
  const status = ref<JobStatus | null>(null);
  const page = ref(1);
  const pageSize = ref(20);
  const sort = ref<JobSortKey>('promisedFrom');
  const order = ref<'asc' | 'desc'>('asc');

  // Wait for a pause in typing rather than asking the server on every key.
  let timer: ReturnType<typeof setTimeout> | undefined;
  watch(search, (value) => {
    clearTimeout(timer);
    timer = setTimeout(() => {
      appliedSearch.value = value.trim();
    }, 300);
  });
  watch([appliedSearch, status, pageSize], () => {
    page.value = 1;
  });

  const resource = useApiResource<Page<JobRow>>(() => ({
    path: '/api/jobs',
    query: {
      search: appliedSearch.value,
      status: status.value,
      page: page.value,
      pageSize: pageSize.value,
      sort: sort.value,
      order: order.value,
    },
  }));

  const rows = computed(() => resource.data.value?.items ?? []);
  const total = computed(() => resource.data.value?.total ?? 0);
  const filtered = computed(() => appliedSearch.value !== '' || status.value !== null);

  function setSort(key: JobSortKey | null, direction: 'asc' | 'desc' | null): void {
    sort.value = key && direction ? key : 'promisedFrom';
    order.value = key && direction ? direction : 'asc';
  }

  function clearFilters(): void {
    search.value = '';
    appliedSearch.value = '';
    status.value = null;
  }

  return { search, status, page, pageSize, sort, order, rows, total, filtered, setSort, clearFilters, ...resource };
}
