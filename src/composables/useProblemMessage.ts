import { h } from 'vue';
import { NButton, useMessage, useNotification } from 'naive-ui';
import { fieldProblemText, problemSummary } from '@/utils/problem';

/**
 * The one way the app tells a person that something failed. A short problem becomes a message;
 * one with field errors becomes a notification listing them. Needs the providers in App.vue.
 */
export function useProblemMessage() {
  const message = useMessage();
  const notification = useNotification();

  /**
   * `shownUnder`: a field whose problem the page already says under its box, in the box's own
   * words; the message leaves it out rather than say it again by the field's code ("From …").
   */
  function showProblem(error: unknown, options: { shownUnder?: (field: string) => boolean } = {}): void {
    const full = problemSummary(error);
    const summary = { ...full, fields: full.fields.filter((f) => !options.shownUnder?.(f.field)) };
    if (summary.fields.length === 0) {
      message.error(summary.detail ? `${summary.title}. ${summary.detail}` : summary.title, {
        duration: 6000,
        closable: true,
      });
      return;
    }
    notification.error({
      title: summary.title,
      description: summary.detail,
      content: () =>
        h(
          'ul',
          { class: 'problem-fields' },
          summary.fields.map((field) => h('li', fieldProblemText(field))),
        ),
      duration: 10000,
    });
  }

  /** Says what was done; with `undo`, offers to take it back for ten seconds. */
  function showDone(text: string, undo?: () => void): void {
    if (!undo) {
      message.success(text);
      return;
    }
    const shown = message.success(
      () =>
        h('span', { class: 'undo-message' }, [
          `${text} `,
          h(
            NButton,
            {
              text: true,
              type: 'primary',
              class: 'undo-message__button',
              onClick: () => {
                shown.destroy();
                undo();
              },
            },
            () => 'Undo',
          ),
        ]),
      { duration: 10_000, closable: true },
    );
  }

  return { showProblem, showDone };
}
