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
export function useNamedDialog(): Pick<ReturnType<typeof useDialog>, 'create' | 'warning'> {
  const dialog = useDialog();
  return {
    create: (options) => dialog.create(named(options)),
    warning: (options) => dialog.warning(named(options)),
  };
}
