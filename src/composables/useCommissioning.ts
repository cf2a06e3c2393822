import { reactive, ref, shallowRef, watch, type Ref } from 'vue';
import { ApiError } from '@/api/client';
import { commissioningApi } from '@/api/commissioning';
import type { CommissioningView, PutCommissioning } from '@shared/schemas/commissioning';

/** How long after the last change the record is saved (a tap, a digit), ms. */
export const SAVE_DELAY_MS = 700;

export type SaveStatus = 'idle' | 'waiting' | 'saving' | 'saved' | 'failed';

type Fields = Omit<PutCommissioning, 'version'>;

const fieldsOf = (v: CommissioningView): Fields => ({
  checks: { ...v.checks },
  ph: v.ph,
  totalAlkalinityPpm: v.totalAlkalinityPpm,
  sanitiserPpm: v.sanitiserPpm,
  sanitiserKind: v.sanitiserKind,
  notes: v.notes,
  photoFileIds: v.photos.map((p) => p.id),
});

/**
 * A job's commissioning record on the phone, saved as the crew goes: each change waits
 * {@link SAVE_DELAY_MS} for the next, then the whole record is sent at the version last saved. A
 * save refused because someone else saved first (409) reloads theirs and says so; the person's
 * own typing is never overwritten by an answer that arrives while they type.
 * @example const { view, form, status, changed } = useCommissioning(jobId, { problem: showProblem, stale: warn })
 */
export function useCommissioning(
  jobId: Ref<string>,
  tell: { problem: (error: unknown) => void; stale: (text: string) => void },
) {
  const view = shallowRef<CommissioningView | null>(null);
  const error = shallowRef<ApiError | null>(null);
  const loading = ref(false);
  const status = ref<SaveStatus>('idle');
  const form = reactive<Fields>({
    checks: { pumpsPrimed: false, pumpsTested: false, heaterWorking: false, lightsWorking: false, noLeaks: false },
    ph: null,
    totalAlkalinityPpm: null,
    sanitiserPpm: null,
    sanitiserKind: null,
    notes: null,
    photoFileIds: [],
  });
  let timer: ReturnType<typeof setTimeout> | null = null;
  let saving: Promise<void> | null = null;
  let again = false;

  async function load(): Promise<void> {
    loading.value = true;
    error.value = null;
    try {
      view.value = await commissioningApi.record(jobId.value);
      Object.assign(form, fieldsOf(view.value));
    } catch (caught) {
      error.value = caught instanceof ApiError ? caught : new ApiError({ status: 0, title: 'Something went wrong' });
    } finally {
      loading.value = false;
    }
  }

  async function saveNow(): Promise<void> {
    if (!view.value) return;
    if (saving) {
      again = true;
      return saving;
    }
    status.value = 'saving';
    saving = (async () => {
      try {
        const sent = JSON.parse(JSON.stringify(form)) as Fields;
        view.value = await commissioningApi.save(jobId.value, { ...sent, version: view.value!.version });
        status.value = again ? 'waiting' : 'saved';
      } catch (caught) {
        status.value = 'failed';
        if (caught instanceof ApiError && caught.status === 409) {
          tell.stale('Someone else saved this record meanwhile: it now shows theirs. Check it and carry on.');
          again = false;
          await load();
        } else {
          tell.problem(caught);
        }
      } finally {
        saving = null;
      }
      if (again) {
        again = false;
        await saveNow();
      }
    })();
    return saving;
  }

  /** Call after every change: the save follows shortly, once. */
  function changed(): void {
    status.value = 'waiting';
    if (timer) clearTimeout(timer);
    timer = setTimeout(() => {
      timer = null;
      void saveNow();
    }, SAVE_DELAY_MS);
  }

  /** Saves at once (leaving the page, adding a photo). */
  async function flush(): Promise<void> {
    if (timer) {
      clearTimeout(timer);
      timer = null;
      await saveNow();
    }
  }

  watch(jobId, () => void load(), { immediate: true });

  return { view, form, error, loading, status, load, changed, flush, saveNow };
}
