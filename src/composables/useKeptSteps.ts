import { computed, effectScope, onScopeDispose, ref, shallowRef, watch, type EffectScope, type Ref } from 'vue';
import { useRoute } from 'vue-router';
import { keptStepsWritten, markStore, type KeptMark, type MarkStore } from '@/components/my-work/kept-marks';
import { useMyWork, type MyWorkPrompts } from '@/composables/useMyWork';
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
 * The kept steps waiting on this phone for the person signed in, in the order they go: read again
 * whenever this tab writes them, when another tab does, and when someone else signs in.
 * @example useKeptMarks().value.map((m) => m.action) // ['arrive']
 */
export function useKeptMarks(): Ref<KeptMark[]> {
  const session = useSessionStore();
  const marks = ref<KeptMark[]>([]);
  const reread = () => {
    marks.value = session.user && session.firm ? keptStepsStore().read() : [];
  };
  watch(() => [session.user?.id, session.firm?.id, keptStepsWritten.value], reread, { immediate: true });
  if (typeof window !== 'undefined') {
    window.addEventListener('storage', reread);
    onScopeDispose(() => window.removeEventListener('storage', reread));
  }
  return marks;
}

/**
 * How many kept steps wait on this phone for the person signed in (see {@link useKeptMarks}).
 * @example const waiting = useKeptStepCount() // waiting.value === 1 after a step marked with no signal
 */
export function useKeptStepCount(): Readonly<Ref<number>> {
  const marks = useKeptMarks();
  return computed(() => marks.value.length);
}

/**
 * Kept steps sent from whatever page is open, not only My work: while steps wait and another page
 * is shown, My work's own sender runs there without its page (the same order, checks and words:
 * useMyWork), trying on the browser's `online`, every SEND_KEPT_EVERY_MS and on Send now. On My
 * work it stops, and My work's page sends them itself.
 * @example const { waiting, sending, sendNow } = useKeptStepsElsewhere({ announce, problem })
 */
export function useKeptStepsElsewhere(prompts: Pick<MyWorkPrompts, 'announce' | 'problem'>) {
  const session = useSessionStore();
  const route = useRoute();
  const waiting = useKeptStepCount();
  const sender = shallowRef<ReturnType<typeof useMyWork> | null>(null);
  let scope: EffectScope | undefined;
  const stop = () => {
    scope?.stop();
    scope = undefined;
    sender.value = null;
  };
  watch(
    () =>
      // Kept running until a send under way has finished and been said; begun again for another
      // person or firm, whose steps are kept apart (a firm's steps never go under another's session).
      (waiting.value > 0 || (sender.value?.sending.value ?? false)) &&
      route.path !== '/my-work' &&
      session.can('bookings:progress')
        ? `${session.user?.id}:${session.firm?.id}`
        : '',
    (whose) => {
      stop();
      if (whose === '') return;
      scope = effectScope(true);
      sender.value =
        scope.run(() =>
          useMyWork(
            // Nothing is marked from here: only kept steps are sent, and said.
            { confirm: async () => false, announce: (text) => prompts.announce(text, null), problem: prompts.problem },
            { store: keptStepsStore() },
          ),
        ) ?? null;
    },
    { immediate: true },
  );
  onScopeDispose(stop);
  return {
    waiting,
    sending: computed(() => sender.value?.sending.value ?? false),
    /** Send now: a person asked, so "still no signal" is said. */
    sendNow: () => sender.value?.sendKept({ sayNoSignal: true }) ?? Promise.resolve(),
  };
}
