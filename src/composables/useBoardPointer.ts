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
 * How many frames what a link points at must stay in view before the board stops following it: on
 * a large board, rows above it get their bookings (and their height) just after the first scroll.
 */
const FRAMES_TO_SETTLE = 20;

/** Whether an element is wholly inside the part of its scroller (and the window) in view. */
function inView(el: HTMLElement): boolean {
  const box = el.getBoundingClientRect();
  const scroller = el.closest('.fc-scroller')?.getBoundingClientRect();
  const top = Math.max(0, scroller?.top ?? 0),
    bottom = Math.min(window.innerHeight, scroller?.bottom ?? window.innerHeight);
  return box.top >= top && box.bottom <= bottom;
}

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
      const show = (el: HTMLElement) =>
        el.scrollIntoView({ block: 'center', inline: focus.bookingId ? 'center' : 'start' });
      let shown = false;
      let settled = 0;
      for (let frame = 0; frame < FRAMES_TO_WAIT && settled < FRAMES_TO_SETTLE; frame++) {
        const el = document.querySelector<HTMLElement>(selector);
        if (el && (!shown || !inView(el))) {
          show(el);
          shown = true;
          settled = 0;
        } else if (shown) settled++;
        await new Promise((resolve) => requestAnimationFrame(resolve));
      }
    },
    { immediate: true },
  );

  return { pointer, active, highlighted, band, notice, dismiss };
}
