import { computed, nextTick, watch } from 'vue';
import { useRoute, useRouter } from 'vue-router';
import type { BoardData } from '@shared/board-data';
import {
  hireBand,
  pointerFocus,
  pointerNotice,
  pointerOf,
  pointsAtAnything,
  POINTER_CLASSES,
} from '@/components/board/board-pointer';

/** How many frames to wait for the timeline to draw what a link points at before giving up. */
const FRAMES_TO_WAIT = 120;

/**
 * A report's link on the board (`?highlight=` and `?hire=`): the bookings to outline (shown
 * whatever the filters), the hire band to draw, the notice's words, a scroll to them once they are
 * drawn, and a way to dismiss it all (which takes them out of the URL).
 */
export function useBoardPointer(deps: { data: () => BoardData | null; timeZone: () => string }) {
  const route = useRoute();
  const router = useRouter();
  const pointer = computed(() => pointerOf(route.query));
  const active = computed(() => pointsAtAnything(pointer.value));
  const highlighted = computed<ReadonlySet<string>>(() => new Set(pointer.value.highlight));
  const band = computed(() => {
    const data = deps.data();
    return data ? hireBand(data, pointer.value.hireId) : null;
  });
  const notice = computed(() => {
    const data = deps.data();
    return data && active.value ? pointerNotice(data, pointer.value, deps.timeZone()) : null;
  });

  function dismiss(): void {
    void router.replace({ query: { ...route.query, highlight: undefined, hire: undefined } });
  }

  // Scrolled to once per link (and per date), not again on every reload of the board.
  let scrolledFor = '';
  watch(
    [() => deps.data(), () => route.fullPath],
    async () => {
      const data = deps.data();
      const key = `${route.query.highlight ?? ''}|${route.query.hire ?? ''}|${route.query.date ?? ''}|${route.query.view ?? ''}`;
      if (!data || !active.value || scrolledFor === key) return;
      const focus = pointerFocus(data, pointer.value);
      if (!focus) return;
      scrolledFor = key;
      await nextTick();
      const selector = focus.bookingId
        ? `.fc-event.${POINTER_CLASSES.highlight}`
        : `.fc-bg-event.${POINTER_CLASSES.hire}`;
      for (let frame = 0; frame < FRAMES_TO_WAIT; frame++) {
        const el = document.querySelector<HTMLElement>(selector);
        if (el) {
          el.scrollIntoView({ block: 'center', inline: focus.bookingId ? 'center' : 'start' });
          return;
        }
        await new Promise((resolve) => requestAnimationFrame(resolve));
      }
    },
    { immediate: true },
  );

  return { pointer, active, highlighted, band, notice, dismiss };
}
