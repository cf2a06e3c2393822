import { useDialog, type DialogOptions } from 'naive-ui';

/** An options object naming its dialog by its title (the library's types omit attributes). */
function named(options: DialogOptions): DialogOptions {
  return typeof options.title === 'string' ? ({ ...options, 'aria-label': options.title } as DialogOptions) : options;
}

/**
 * naive-ui's `useDialog`, each dialog named for screen readers by its title: the library's dialog
 * is a `role="dialog"` with no name of its own. Attributes in its options reach that element.
 *
 * @example
 * const dialog = useNamedDialog()
 * dialog.warning({ title: 'Mark done?', content: '…', positiveText: 'Done' })
 */
export function useNamedDialog(): Pick<ReturnType<typeof useDialog>, 'create' | 'warning'> & {
  ask: (question: { title: string; content: string; yes: string; no: string }) => Promise<boolean>;
} {
  const dialog = useDialog();
  return {
    create: (options) => dialog.create(named(options)),
    warning: (options) => dialog.warning(named(options)),
    /**
     * A warning asked as a question: true on `yes`, false on `no` and on any other way out (the
     * close button, Escape, a tap outside), answered once.
     */
    ask: ({ title, content, yes, no }) =>
      new Promise<boolean>((resolve) => {
        let answered = false;
        const answer = (value: boolean) => {
          if (!answered) {
            answered = true;
            resolve(value);
          }
        };
        dialog.warning(
          named({
            title,
            content,
            positiveText: yes,
            negativeText: no,
            onPositiveClick: () => answer(true),
            onNegativeClick: () => answer(false),
            onClose: () => answer(false),
            onMaskClick: () => answer(false),
            onAfterLeave: () => answer(false),
          }),
        );
      }),
  };
}
