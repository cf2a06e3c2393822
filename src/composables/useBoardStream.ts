import { onBeforeUnmount, onMounted } from 'vue';

/**
 * Live board: the server sends an event whenever bookings change (any scheduler, any server
 * process); the board reloads its range shortly after, unless the person is mid-drag, in which
 * case it waits for the drop. Changes can be missed in two ways, and both reload the board too:
 * the server lost its own listener for a moment (`event: resync`), or this stream was cut and the
 * browser reconnected it by itself (an `open` after an `error`).
 */
export function useBoardStream(canReload: () => boolean, reload: () => Promise<void>) {
  let source: EventSource | null = null;
  let timer: ReturnType<typeof setTimeout> | null = null;
  let broken = false;

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
    source.addEventListener('resync', schedule);
    source.addEventListener('error', () => {
      broken = true;
    });
    source.addEventListener('open', () => {
      // The first open is the board's own load; only a reopening has something to catch up on.
      if (broken) schedule();
      broken = false;
    });
  });
  onBeforeUnmount(() => {
    source?.close();
    if (timer) clearTimeout(timer);
  });
}
