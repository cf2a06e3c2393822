import { onScopeDispose, ref, watch, type Ref } from 'vue';
import { useRoute } from 'vue-router';
import { markStore, type MarkStore } from '@/components/my-work/kept-marks';
import { useSessionStore } from '@/stores/session';

/**
 * The signed-in person's store of steps kept without a signal (My work keeps them; see kept-marks.ts).
 * @example keptStepsStore().read().length // 0
 */
export function keptStepsStore(): MarkStore {
  const session = useSessionStore();
  return markStore(globalThis.localStorage, String(session.user?.id ?? ''), String(session.firm?.id ?? ''));
}

/**
 * How many kept steps wait on this phone for the person signed in: counted again on each page
 * change and when another tab changes them, so any page can point the way to My work.
 * @example const waiting = useKeptStepCount() // waiting.value === 1 after a step marked with no signal
 */
export function useKeptStepCount(): Ref<number> {
  const session = useSessionStore();
  const route = useRoute();
  const count = ref(0);
  const recount = () => {
    count.value = session.user && session.firm ? keptStepsStore().read().length : 0;
  };
  watch(() => [route.fullPath, session.user?.id, session.firm?.id], recount, { immediate: true });
  if (typeof window !== 'undefined') {
    window.addEventListener('storage', recount);
    onScopeDispose(() => window.removeEventListener('storage', recount));
  }
  return count;
}
