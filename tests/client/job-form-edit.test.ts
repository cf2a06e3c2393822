import { beforeEach, describe, expect, it, vi } from 'vitest';
import { ref } from 'vue';
import { useJobForm } from '@/composables/useJobForm';
import { jobWork, type JobDetail } from '@/api/job-work';

/*
 * Editing a job from its form: what the form sends. TW-7701 is a job of this test only.
 */
const job = {
  id: '77',
  version: 3,
  reference: 'TW-7701',
  customerName: 'Ada Marsh',
  customerPhone: '07700 900771',
  customerEmail: 'ada@home.example',
  siteAddress: '2 Mill Lane',
  siteTown: 'Ilkley',
  sitePostcode: 'LS29 8AA',
  accessNotes: 'Side gate',
  unitId: null,
  installationType: 'slab',
  promisedFrom: '2026-07-01',
  promisedTo: '2026-07-10',
  orderedOn: null,
} as unknown as JobDetail;

beforeEach(() => {
  vi.restoreAllMocks();
  vi.spyOn(jobWork, 'units').mockResolvedValue({ items: [] });
  vi.spyOn(jobWork, 'job').mockResolvedValue(job);
});

async function loaded() {
  const form = useJobForm(ref('77'));
  await form.load();
  return form;
}

describe('the job form on an existing job', () => {
  it('clears a box emptied by the user (null), sending only what changed', async () => {
    const update = vi.spyOn(jobWork, 'updateJob').mockResolvedValue(job);
    const form = await loaded();
    form.draft.customerPhone = '';
    form.draft.promisedTo = '';
    form.draft.siteTown = 'Otley';
    await form.save();
    expect(update).toHaveBeenCalledWith('77', {
      version: 3,
      customerPhone: null,
      promisedTo: null,
      siteTown: 'Otley',
    });
  });

  it('sends nothing when nothing changed', async () => {
    const update = vi.spyOn(jobWork, 'updateJob').mockResolvedValue(job);
    const form = await loaded();
    expect(await form.save()).toEqual(job);
    expect(update).not.toHaveBeenCalled();
  });
});
