import { nextTick, ref } from 'vue';
import { ApiError } from '@/api/client';
import { fieldSentence } from '@/utils/problem';

/** What a schema's safeParse gives back (zod's shape, without tying the client to its types). */
type Checked<T> =
  | { success: true; data: T }
  | { success: false; error: { issues: readonly { path: readonly PropertyKey[]; message: string }[] } };

/**
 * The one way a form keeps its problems by field, to show each under its box: from the shared
 * schema checked before sending, or from the server's problem+json (RFC 9457 `errors`) after.
 * Fields are keyed by their dotted path, as the server names them (`waterTargets.ph.max`).
 *
 * @example
 * const fields = useFieldErrors();
 * const checked = fields.check(PutServicePlan.safeParse(body)); // null when it has problems
 * fields.sentence('everyMonths', 'Every') // 'Every must be at least 1 month'
 */
export function useFieldErrors() {
  const errors = ref<Record<string, string>>({});

  /** The schema's answer: its data when valid, else null with its problems kept. */
  function check<T>(result: Checked<T>): T | null {
    if (result.success) {
      errors.value = {};
      return result.data;
    }
    const found: Record<string, string> = {};
    // The first problem of each field is the one to fix first.
    for (const issue of result.error.issues) {
      const key = issue.path.map(String).join('.');
      found[key] ??= issue.message;
    }
    errors.value = found;
    return null;
  }

  /**
   * Keeps the field problems the server named (nothing for any other failure, which is shown as a
   * message). `under`: the body member the form's fields sit in (`survey` for `survey.steps`).
   */
  function take(error: unknown, under?: string): void {
    const strip = under === undefined ? '' : `${under}.`;
    errors.value =
      error instanceof ApiError
        ? Object.fromEntries(
            error.errors.map((f) => [
              strip && f.field.startsWith(strip) ? f.field.slice(strip.length) : f.field,
              f.message,
            ]),
          )
        : {};
  }

  function clear(): void {
    errors.value = {};
  }

  /** naive-ui's validation status for a field's box. */
  const status = (field: string): 'error' | undefined => (errors.value[field] ? 'error' : undefined);
  /** The sentence under a field's box, its label first (see fieldSentence), or undefined. */
  const sentence = (field: string, label: string): string | undefined => fieldSentence(label, errors.value[field]);
  /** Attributes for the box itself: marked invalid and pointing at its sentence (ids from `idOf`). */
  const describe = (field: string, id: string): Record<string, string> =>
    errors.value[field] ? { 'aria-invalid': 'true', 'aria-describedby': `${id}-problem` } : {};

  /**
   * After the form shows its problems: moves to the first box marked invalid, in the middle of the
   * screen. On a phone the save button stays in view while the box with the problem may be far above.
   */
  async function focusFirst(): Promise<void> {
    await nextTick();
    const box = document.querySelector<HTMLElement>('[aria-invalid="true"]');
    box?.focus({ preventScroll: true });
    box?.scrollIntoView({ block: 'center' });
  }

  return { errors, check, take, clear, status, sentence, describe, focusFirst };
}

export type FieldErrors = ReturnType<typeof useFieldErrors>;
