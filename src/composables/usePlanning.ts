import { onScopeDispose, ref, shallowRef, type Ref, type ShallowRef } from 'vue';
import { ApiError } from '@/api/client';
import type { PlanProgress } from '@shared/schemas/placement';

export interface PlanRequest<T> {
  result: ShallowRef<T | null>;
  loading: Ref<boolean>;
  error: ShallowRef<ApiError | null>;
  /** Whole seconds since the running request started: the feedback while the server plans. */
  seconds: Ref<number>;
  run: (call: (signal: AbortSignal) => Promise<T>) => Promise<T | null>;
  clear: () => void;
}

/**
 * A planning request to the server (slots, auto-place): its answer, whether it runs and for how
 * long, and its problem. A newer request cancels an older one still running, so a slow answer never
 * overwrites a newer one; leaving the view cancels it too.
 * @example const slots = usePlanRequest<SlotAnswer>(); await slots.run((signal) => searchSlots({ stageId }, signal))
 */
export function usePlanRequest<T>(): PlanRequest<T> {
  const result = shallowRef<T | null>(null);
  const loading = ref(false);
  const error = shallowRef<ApiError | null>(null);
  const seconds = ref(0);
  let controller: AbortController | null = null;
  let ticker: ReturnType<typeof setInterval> | null = null;

  function stop(): void {
    controller?.abort();
    controller = null;
    if (ticker) clearInterval(ticker);
    ticker = null;
    loading.value = false;
  }

  async function run(call: (signal: AbortSignal) => Promise<T>): Promise<T | null> {
    stop();
    const own = new AbortController();
    controller = own;
    loading.value = true;
    error.value = null;
    result.value = null;
    seconds.value = 0;
    const started = Date.now();
    ticker = setInterval(() => {
      seconds.value = Math.floor((Date.now() - started) / 1000);
    }, 1000);
    try {
      const answer = await call(own.signal);
      if (controller !== own) return null;
      result.value = answer;
      return answer;
    } catch (caught) {
      if (own.signal.aborted) return null;
      error.value =
        caught instanceof ApiError
          ? caught
          : new ApiError({ status: 0, title: 'Something went wrong', detail: String(caught) });
      return null;
    } finally {
      if (controller === own) {
        controller = null;
        if (ticker) clearInterval(ticker);
        ticker = null;
        loading.value = false;
      }
    }
  }

  function clear(): void {
    stop();
    result.value = null;
    error.value = null;
  }

  onScopeDispose(stop);
  return { result, loading, error, seconds, run, clear };
}

/** A name for one planning run, so its progress events can be told from another tab's. */
export function newPlanId(): string {
  return typeof crypto !== 'undefined' && typeof crypto.randomUUID === 'function'
    ? crypto.randomUUID()
    : `plan-${Date.now().toString(36)}-${Math.random().toString(36).slice(2, 10)}`;
}

/**
 * Auto-place's progress while the server plans: the `plan-progress` events of one run (named by
 * its planId) on a board stream of this session, opened for the run and closed after it.
 * `listen` resolves once the stream is open (or after a second without it: planning never waits
 * on the progress display).
 * @example const progress = usePlanProgress(); const id = newPlanId(); await progress.listen(id); … progress.stop()
 */
export function usePlanProgress() {
  const schedules = ref(0);
  const phase = ref<PlanProgress['phase'] | null>(null);
  let source: EventSource | null = null;

  function stop(): void {
    source?.close();
    source = null;
  }

  function listen(planId: string): Promise<void> {
    stop();
    schedules.value = 0;
    phase.value = null;
    if (typeof EventSource === 'undefined') return Promise.resolve();
    const own = new EventSource('/api/board/stream');
    source = own;
    own.addEventListener('plan-progress', (event) => {
      const data = JSON.parse((event as MessageEvent<string>).data) as PlanProgress;
      if (data.planId !== planId) return;
      phase.value = data.phase;
      schedules.value = Math.max(schedules.value, data.schedules);
    });
    return new Promise((resolve) => {
      const timer = setTimeout(resolve, 1000);
      own.addEventListener(
        'open',
        () => {
          clearTimeout(timer);
          resolve();
        },
        { once: true },
      );
    });
  }

  onScopeDispose(stop);
  return { schedules, phase, listen, stop };
}
