import { afterEach, describe, expect, it, vi } from 'vitest';
import { createRenderer, defineComponent } from 'vue';
import { useBoardStream } from '@/composables/useBoardStream';

/** A stand-in EventSource: the test opens it and sends events by hand. */
class FakeEventSource extends EventTarget {
  static last: FakeEventSource | null = null;
  closed = false;
  constructor(readonly url: string) {
    super();
    FakeEventSource.last = this;
  }
  close() {
    this.closed = true;
  }
  send(type: string, data: unknown) {
    this.dispatchEvent(new MessageEvent(type, { data: JSON.stringify(data) }));
  }
}

// A renderer that draws nothing: enough for a component's lifecycle (onMounted, onBeforeUnmount) without a DOM.
const { createApp } = createRenderer<object, object>({
  insert: () => undefined,
  remove: () => undefined,
  patchProp: () => undefined,
  createElement: () => ({}),
  createText: () => ({}),
  createComment: () => ({}),
  setText: () => undefined,
  setElementText: () => undefined,
  parentNode: () => null,
  nextSibling: () => null,
});

/** A board that uses the stream; `reloads` counts its reloads. */
function mountBoard(canReload = () => true) {
  const reload = vi.fn(() => Promise.resolve());
  const app = createApp(
    defineComponent({
      setup() {
        useBoardStream(canReload, reload);
        return () => null;
      },
    }),
  );
  app.mount({});
  return { reload, source: FakeEventSource.last!, unmount: () => app.unmount() };
}

afterEach(() => {
  vi.useRealTimers();
  vi.unstubAllGlobals();
});

describe('the live board', () => {
  it("reloads on a change, on the server's resync and when the browser reopens a broken stream, not on the first open", () => {
    vi.useFakeTimers();
    vi.stubGlobal('EventSource', FakeEventSource);
    const board = mountBoard();
    expect(board.source.url).toBe('/api/board/stream');

    board.source.dispatchEvent(new Event('open'));
    vi.advanceTimersByTime(1000);
    expect(board.reload).toHaveBeenCalledTimes(0);

    board.source.send('bookings', { bookingId: '7' });
    vi.advanceTimersByTime(250);
    expect(board.reload).toHaveBeenCalledTimes(1);

    // The server lost its listener for a while: changes may have been missed.
    board.source.send('resync', {});
    vi.advanceTimersByTime(250);
    expect(board.reload).toHaveBeenCalledTimes(2);

    // The connection broke and the browser reconnected by itself.
    board.source.dispatchEvent(new Event('error'));
    vi.advanceTimersByTime(1000);
    expect(board.reload).toHaveBeenCalledTimes(2);
    board.source.dispatchEvent(new Event('open'));
    vi.advanceTimersByTime(250);
    expect(board.reload).toHaveBeenCalledTimes(3);

    board.unmount();
    expect(board.source.closed).toBe(true);
  });

  it('waits for the drop before catching up when a person is mid-drag', () => {
    vi.useFakeTimers();
    vi.stubGlobal('EventSource', FakeEventSource);
    let dragging = true;
    const board = mountBoard(() => !dragging);
    board.source.send('resync', {});
    vi.advanceTimersByTime(2000);
    expect(board.reload).toHaveBeenCalledTimes(0);
    dragging = false;
    vi.advanceTimersByTime(250);
    expect(board.reload).toHaveBeenCalledTimes(1);
    board.unmount();
  });
});
