import { ref } from 'vue';
import { useProblemMessage } from './useProblemMessage';
import type { FieldErrors } from './useFieldErrors';

/**
 * One way to run a user's action: mark it busy (by a key, so a list can show which row is saving),
 * say what was done, or show the server's problem. Resolves true when it worked. With a form's
 * `fields` (useFieldErrors), the problems the server names by field are also kept for under the
 * boxes, and cleared when the action works.
 * @example const { busy, run } = useAction(); await run(b.id, () => api.post(...), 'Saved')
 */
export function useAction(fields?: FieldErrors) {
  const { showProblem, showDone } = useProblemMessage();
  const busy = ref<string | null>(null);

  /**
   * `handled`: a refusal the caller answers itself (a question to ask first): not shown, and false
   * comes back as for any other.
   */
  async function run(
    key: string,
    action: () => Promise<unknown>,
    done: string | (() => string),
    options: { handled?: (caught: unknown) => boolean } = {},
  ): Promise<boolean> {
    busy.value = key;
    try {
      await action();
      fields?.clear();
      showDone(typeof done === 'function' ? done() : done);
      return true;
    } catch (caught) {
      if (options.handled?.(caught)) return false;
      fields?.take(caught);
      // What is said under a box is not said again, less well, in the message.
      showProblem(caught, fields ? { shownUnder: fields.hasBox } : {});
      return false;
    } finally {
      busy.value = null;
    }
  }

  return { busy, run };
}
