import { onBeforeUnmount, onMounted } from 'vue';

/**
 * Live board: the server sends an event whenever bookings change (any scheduler, any server
 * process); the board reloads its range shortly after, unless the person is mid-drag, in which
 * case it waits for the drop.
 */
export function useBoardStream(canReload: () => boolean, reload: () => Promise<void>) {
  let source: EventSource | null = null;
  let timer: ReturnType<typeof setTimeout> | null = null;

  function schedule(): void {
    if (timer) clearTimeout(timer);
    timer = setTimeout(() => {
      if (canReload()) void reload();
      else schedule();
    }, 250);
  }

  onMounted(() => {
    if (typeof EventSource === 'undefined') return;
    source = new EventSource('/api/board/stream');
    source.addEventListener('bookings', schedule);
  });
  onBeforeUnmount(() => {
    source?.close();
    if (timer) clearTimeout(timer);
  });
}
