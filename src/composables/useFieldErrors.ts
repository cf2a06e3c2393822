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
 * When either finds problems, the first box of this form with one (in the page's order) is focused
 * (see `focusFirst`): every form, the same way, without each having to ask.
 *
 * @example
 * const fields = useFieldErrors();
 * const checked = fields.check(PutServicePlan.safeParse(body)); // null when it has problems
 * fields.sentence('everyMonths', 'Every') // 'Every must be at least 1 month'
 */
export function useFieldErrors() {
  const errors = ref<Record<string, string>>({});
  /** The id of each field's box, as `describe` was given it while the form drew its boxes. */
  const boxIds = new Map<string, string>();

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
    void focusFirst();
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
    if (Object.keys(errors.value).length > 0) void focusFirst();
  }

  function clear(): void {
    errors.value = {};
  }

  /** naive-ui's validation status for a field's box. */
  const status = (field: string): 'error' | undefined => (errors.value[field] ? 'error' : undefined);
  /** The sentence under a field's box, its label first (see fieldSentence), or undefined. */
  const sentence = (field: string, label: string): string | undefined => fieldSentence(label, errors.value[field]);
  /** Attributes for the box itself: marked invalid and pointing at its sentence (ids from `idOf`). */
  const describe = (field: string, id: string): Record<string, string> => {
    boxIds.set(field, id);
    return errors.value[field] ? { 'aria-invalid': 'true', 'aria-describedby': `${id}-problem` } : {};
  };

  /**
   * After the form shows its problems: moves to its first box with one, in the middle of the
   * screen. On a phone the save button stays in view while the box with the problem may be far
   * above. Only this form's boxes count, so a problem left showing in another form on the page never
   * takes the focus; a problem of no box (a stale version) leaves it where it is.
   */
  async function focusFirst(): Promise<void> {
    await nextTick();
    if (typeof document === 'undefined') return; // drawn on the server (tests): nothing to focus
    const boxes: HTMLElement[] = [];
    for (const field of Object.keys(errors.value)) {
      const id = boxIds.get(field);
      const box = id === undefined ? null : document.getElementById(id);
      if (box) boxes.push(box);
    }
    const first = boxes.reduce<HTMLElement | undefined>(
      (a, b) => (a === undefined || b.compareDocumentPosition(a) & Node.DOCUMENT_POSITION_FOLLOWING ? b : a),
      undefined,
    );
    first?.focus({ preventScroll: true });
    first?.scrollIntoView({ block: 'center' });
  }

  /** True when the field's box is on the page now, so its problem shows under it. */
  function hasBox(field: string): boolean {
    const id = boxIds.get(field);
    if (id === undefined) return false;
    return typeof document === 'undefined' || document.getElementById(id) !== null;
  }

  return { errors, check, take, clear, status, sentence, describe, focusFirst, hasBox };
}

export type FieldErrors = ReturnType<typeof useFieldErrors>;
