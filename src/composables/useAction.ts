import { ref } from 'vue';
import { useProblemMessage } from './useProblemMessage';

/**
 * One way to run a user's action: mark it busy (by a key, so a list can show which row is saving),
 * say what was done, or show the server's problem. Resolves true when it worked.
 * @example const { busy, run } = useAction(); await run(b.id, () => api.post(...), 'Saved')
 */
export function useAction() {
  const { showProblem, showDone } = useProblemMessage();
  const busy = ref<string | null>(null);

  async function run(key: string, action: () => Promise<unknown>, done: string | (() => string)): Promise<boolean> {
    busy.value = key;
    try {
      await action();
      showDone(typeof done === 'function' ? done() : done);
      return true;
    } catch (caught) {
      showProblem(caught);
      return false;
    } finally {
      busy.value = null;
    }
  }

  return { busy, run };
}
