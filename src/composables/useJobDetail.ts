import { computed, type Ref } from 'vue';
import type { FileView } from '@shared/schemas/files';
import type { Permission } from '@shared/permissions';
import type { ItemList } from '@/api/types';
import type { JobDetail, JobStage, QuantitiesBody } from '@/api/job-work';
import { jobSteps } from '@/components/job-detail/job-steps';
import { useApiResource } from './useApiResource';

/** What each part of the job page reads, by the permission its route checks (shared/permissions.ts). */
export const JOB_SECTIONS = {
  job: 'jobs:read',
  stages: 'jobs:read',
  quantities: 'surveys:read',
  files: 'surveys:read',
} as const satisfies Record<string, Permission>;

/**
 * Everything the job page shows, each part loading (and failing) on its own. A part the reader's
 * role may not read is never asked for (the page hides it rather than showing "Not allowed").
 * @example const { job, stages, steps } = useJobDetail(jobId, (p) => session.can(p))
 */
export function useJobDetail(jobId: Ref<string>, can: (permission: Permission) => boolean) {
  // The path is read inside the getter, so a new job id re-fetches; null (not permitted) waits for ever.
  const source = (section: keyof typeof JOB_SECTIONS, path: () => string) => () =>
    can(JOB_SECTIONS[section]) ? { path: path() } : null;
  // The job and its stages are kept for the tab: a crew looking at a job again on site without a
  // signal still has the site, the phone numbers and the stages, dated.
  const job = useApiResource<JobDetail>(
    source('job', () => `/api/jobs/${jobId.value}`),
    { keep: true },
  );
  const stages = useApiResource<ItemList<JobStage>>(
    source('stages', () => `/api/jobs/${jobId.value}/stages`),
    {
      keep: true,
    },
  );
  const quantities = useApiResource<QuantitiesBody>(source('quantities', () => `/api/jobs/${jobId.value}/quantities`));
  const files = useApiResource<ItemList<FileView>>(source('files', () => `/api/jobs/${jobId.value}/files`));
  const shows = (section: keyof typeof JOB_SECTIONS) => can(JOB_SECTIONS[section]);
  const booked = computed(() => (stages.data.value?.items ?? []).some((s) => s.bookings.length > 0));
  const steps = computed(() => (job.data.value ? jobSteps(job.data.value, stages.data.value?.items ?? []) : []));
  async function refreshAll(): Promise<void> {
    await Promise.all([job.refresh(), stages.refresh(), quantities.refresh(), files.refresh()]);
  }
  return { job, stages, quantities, files, booked, steps, shows, refreshAll };
}
