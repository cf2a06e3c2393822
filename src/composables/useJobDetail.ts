import { computed, type Ref } from 'vue';
import type { FileView } from '@shared/schemas/files';
import type { ItemList } from '@/api/types';
import type { JobDetail, JobStage, QuantitiesBody } from '@/api/job-work';
import { useApiResource } from './useApiResource';

/** Everything the job page shows, each part loading (and failing) on its own. */
export function useJobDetail(jobId: Ref<string>) {
  const job = useApiResource<JobDetail>(() => ({ path: `/api/jobs/${jobId.value}` }));
  const stages = useApiResource<ItemList<JobStage>>(() => ({ path: `/api/jobs/${jobId.value}/stages` }));
  const quantities = useApiResource<QuantitiesBody>(() => ({ path: `/api/jobs/${jobId.value}/quantities` }));
  const files = useApiResource<ItemList<FileView>>(() => ({ path: `/api/jobs/${jobId.value}/files` }));
  const booked = computed(() => (stages.data.value?.items ?? []).some((s) => s.bookings.length > 0));
  async function refreshAll(): Promise<void> {
    await Promise.all([job.refresh(), stages.refresh(), quantities.refresh(), files.refresh()]);
  }
  return { job, stages, quantities, files, booked, refreshAll };
}
