import { reactive, ref, type Ref } from 'vue';
import { CreateJob, UpdateJob } from '@shared/schemas/jobs';
import { useFieldErrors } from './useFieldErrors';
import { ApiError } from '@/api/client';
import { jobWork, type JobDetail, type UnitOption } from '@/api/job-work';
import type { InstallationType } from '@/api/types';

const FIELDS = [
  'reference',
  'customerName',
  'customerPhone',
  'customerEmail',
  'siteAddress',
  'siteTown',
  'sitePostcode',
  'accessNotes',
  'unitId',
  'installationType',
  'promisedFrom',
  'promisedTo',
  'orderedOn',
] as const;
type Field = (typeof FIELDS)[number];
export type JobDraft = Record<Exclude<Field, 'installationType'>, string> & {
  installationType: InstallationType | null;
};

const blank = (): JobDraft => ({
  reference: '',
  customerName: '',
  customerPhone: '',
  customerEmail: '',
  siteAddress: '',
  siteTown: '',
  sitePostcode: '',
  accessNotes: '',
  unitId: '',
  installationType: null,
  promisedFrom: '',
  promisedTo: '',
  orderedOn: '',
});

/**
 * The new/edit job form: the same schemas as the server (CreateJob, UpdateJob), so a field the server
 * would refuse is marked before anything is sent. An edit sends only what changed, with the version.
 */
export function useJobForm(jobId: Ref<string | null>) {
  const draft = reactive<JobDraft>(blank());
  const fields = useFieldErrors();
  const errors = fields.errors;
  const units = ref<UnitOption[]>([]);
  const loaded = ref<JobDetail | null>(null);
  const saving = ref(false);
  /** The reference a new job would get (the firm's highest + 1), offered in the box and still editable. */
  const suggestedReference = ref<string | null>(null);

  async function load(): Promise<void> {
    if (!jobId.value) {
      const [unitList, next] = await Promise.all([jobWork.units(), jobWork.nextReference()]);
      units.value = unitList.items;
      suggestedReference.value = next.nextReference;
      if (draft.reference === '') draft.reference = next.nextReference;
      return;
    }
    units.value = (await jobWork.units()).items;
    const job = await jobWork.job(jobId.value);
    loaded.value = job;
    for (const f of FIELDS) (draft as Record<string, unknown>)[f] = job[f] ?? '';
  }

  // Empty optional boxes are left out (absent rather than ""); empty required ones stay, so the
  // schema answers "is required" for them.
  const REQUIRED = new Set([
    'reference',
    'customerName',
    'siteAddress',
    'siteTown',
    'sitePostcode',
    'installationType',
  ]);
  const present = () =>
    Object.fromEntries(Object.entries(draft).filter(([k, v]) => REQUIRED.has(k) || (v !== '' && v !== null)));

  /** What the edit changes: the boxes that differ, and null for one emptied that had a value (to clear it). */
  function changes(): Record<string, unknown> {
    const was = loaded.value as unknown as Record<string, unknown>;
    const now = present();
    const changed: Record<string, unknown> = Object.fromEntries(
      Object.entries(now).filter(([k, v]) => v !== (was[k] ?? '')),
    );
    for (const f of FIELDS) if (!(f in now) && (was[f] ?? '') !== '') changed[f] = null;
    return changed;
  }

  async function save(): Promise<JobDetail | null> {
    // Nothing changed: nothing to send (and no new version for others to trip over).
    if (loaded.value && Object.keys(changes()).length === 0) return loaded.value;
    const result = loaded.value
      ? UpdateJob.safeParse({ ...changes(), version: loaded.value.version })
      : CreateJob.safeParse(present());
    const checked = fields.check<CreateJob | UpdateJob>(result);
    if (checked === null) return null;
    saving.value = true;
    try {
      return loaded.value
        ? await jobWork.updateJob(loaded.value.id, checked as UpdateJob)
        : await jobWork.createJob(checked as CreateJob);
    } catch (error) {
      fields.take(error);
      if (error instanceof ApiError) {
        // A reference taken meanwhile: the server names the next free one; offer it.
        const next = error.problem.nextReference;
        if (typeof next === 'string') suggestedReference.value = next;
      }
      throw error;
    } finally {
      saving.value = false;
    }
  }

  return { draft, errors, fields, units, loaded, saving, suggestedReference, load, save };
}
