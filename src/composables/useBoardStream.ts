import { onBeforeUnmount, onMounted, readonly, ref } from 'vue';

/** How long the stream may be down before the board says it is not live (the browser's own retry is ~3 s). */
export const NOT_LIVE_AFTER_MS = 8_000;
/** First wait before opening a stream the browser gave up on; doubled each time, up to the longest. */
const REOPEN_FIRST_MS = 2_000;
const REOPEN_LONGEST_MS = 30_000;

/**
 * Live board: the server sends an event whenever bookings change (any scheduler, any server
 * process); the board reloads its range shortly after, unless the person is mid-drag, in which
 * case it waits for the drop. Changes can be missed in two ways, and both reload the board too:
 * the server lost its own listener for a moment (`event: resync`), or this stream was cut and the
 * browser reconnected it by itself (an `open` after an `error`). A stream the browser gives up on
 * (an error answer, such as a proxy's 502 while the server restarts, closes it for good) is opened
 * again here, waiting longer each time. `live` turns false while the stream has been down for
 * {@link NOT_LIVE_AFTER_MS}, so the board can say that others' changes are not arriving.
 */
export function useBoardStream(canReload: () => boolean, reload: () => Promise<void>) {
  let source: EventSource | null = null;
  let timer: ReturnType<typeof setTimeout> | null = null;
  let quiet: ReturnType<typeof setTimeout> | null = null;
  let reopen: ReturnType<typeof setTimeout> | null = null;
  let reopenIn = REOPEN_FIRST_MS;
  let broken = false;
  const live = ref(true);

  function schedule(): void {
    if (timer) clearTimeout(timer);
    timer = setTimeout(() => {
      if (canReload()) void reload();
      else schedule();
    }, 250);
  }

  function open(): void {
    const own = new EventSource('/api/board/stream');
    source = own;
    own.addEventListener('bookings', schedule);
    own.addEventListener('resync', schedule);
    own.addEventListener('error', () => {
      broken = true;
      quiet ??= setTimeout(() => {
        live.value = false;
      }, NOT_LIVE_AFTER_MS);
      // CLOSED: the browser will not try again by itself.
      if (own.readyState === 2 && reopen === null) {
        reopen = setTimeout(() => {
          reopen = null;
          open();
        }, reopenIn);
        reopenIn = Math.min(reopenIn * 2, REOPEN_LONGEST_MS);
      }
    });
    own.addEventListener('open', () => {
      // The first open is the board's own load; only a reopening has something to catch up on.
      if (broken) schedule();
      broken = false;
      reopenIn = REOPEN_FIRST_MS;
      if (quiet) clearTimeout(quiet);
      quiet = null;
      live.value = true;
    });
  }

  onMounted(() => {
    if (typeof EventSource === 'undefined') return;
    open();
  });
  onBeforeUnmount(() => {
    source?.close();
    for (const t of [timer, quiet, reopen]) if (t) clearTimeout(t);
  });
  return { live: readonly(live) };
}
