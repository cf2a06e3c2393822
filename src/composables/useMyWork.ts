import { computed, ref } from 'vue';
import { api, ApiError } from '@/api/client';
import { useApiResource } from '@/composables/useApiResource';
import { groupByDay, PROGRESS_WORDS, UNDO_OF } from '@/components/my-work/my-work';
import type { MyWorkItem, MyWorkList } from '@shared/schemas/my-work';
import type { BookingView, ProgressAction } from '@shared/schemas/bookings';

/** How the page asks, tells and warns (naive-ui's dialog and message in the app; plain functions in tests). */
export interface MyWorkPrompts {
  /** Asks before a step is marked; resolves true to go ahead. */
  confirm(question: { title: string; text: string; yes: string }): Promise<boolean>;
  /** Says a step was marked, offering to take it back. */
  announce(text: string, undo: (() => Promise<void>) | null): void;
  problem(error: unknown): void;
}

/**
 * The crew's own bookings from today (the server's today), and marking progress on them: each
 * step asked first, then announced with an Undo that takes it back through the same server route.
 * @example const { groups, mark } = useMyWork({ confirm, announce, problem }); await mark(item, 'arrive')
 */
export function useMyWork(prompts: MyWorkPrompts) {
  // Kept for the tab: opened again on site without a signal, the page shows the last list, dated.
  const list = useApiResource<MyWorkList>(() => ({ path: '/api/my-work' }), { keep: true, refreshOnReturn: true });
  const groups = computed(() => (list.data.value ? groupByDay(list.data.value) : []));
  const busy = ref<string | null>(null);

  async function send(item: MyWorkItem, action: ProgressAction, version: number): Promise<BookingView> {
    return api.post<BookingView>(`/api/bookings/${item.bookingId}/progress`, { action, version });
  }

  /**
   * A step refused: said, and when the booking changed meanwhile (an answer lost to a weak signal,
   * or marked on another phone of the crew) the list is loaded again to show it as it is now.
   */
  async function refused(error: unknown): Promise<void> {
    prompts.problem(error);
    if (error instanceof ApiError && error.status === 409) await list.refresh();
  }

  /** Marks a step after asking; the announcement's Undo takes it back from the version just saved. */
  async function mark(item: MyWorkItem, action: ProgressAction): Promise<boolean> {
    const words = PROGRESS_WORDS[action];
    if (
      !(await prompts.confirm({
        title: words.question,
        text: `${item.stage.name} · ${item.job.reference}, ${item.site.address}`,
        yes: words.yes,
      }))
    )
      return false;
    busy.value = item.bookingId;
    try {
      const saved = await send(item, action, item.version);
      const back = action === 'arrive' || action === 'finish' ? UNDO_OF[action] : null;
      prompts.announce(`${item.stage.name}: ${words.done}`, back ? () => undo(item, back, saved.version) : null);
      await list.refresh();
      return true;
    } catch (error) {
      await refused(error);
      return false;
    } finally {
      busy.value = null;
    }
  }

  /** The Undo: no second question (the person just asked for it). */
  async function undo(item: MyWorkItem, action: ProgressAction, version: number): Promise<void> {
    busy.value = item.bookingId;
    try {
      await send(item, action, version);
      prompts.announce(`${item.stage.name}: ${PROGRESS_WORDS[action].done}`, null);
      await list.refresh();
    } catch (error) {
      await refused(error);
    } finally {
      busy.value = null;
    }
  }

  return { list, groups, busy, mark, undo };
}
