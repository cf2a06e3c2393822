import { afterEach, describe, expect, it, vi } from 'vitest';
import { createRenderer, defineComponent } from 'vue';
import { NOT_LIVE_AFTER_MS, useBoardStream } from '@/composables/useBoardStream';

/** A stand-in EventSource: the test opens it and sends events by hand. */
class FakeEventSource extends EventTarget {
  static last: FakeEventSource | null = null;
  static opened = 0;
  closed = false;
  /** 0 connecting, 1 open, 2 closed (the browser will not retry). */
  readyState = 0;
  constructor(readonly url: string) {
    super();
    FakeEventSource.last = this;
    FakeEventSource.opened++;
  }
  close() {
    this.closed = true;
    this.readyState = 2;
  }
  /** The browser's error event: `given up` when it will not reconnect by itself. */
  fail(givenUp = false) {
    this.readyState = givenUp ? 2 : 0;
    this.dispatchEvent(new Event('error'));
  }
  reopened() {
    this.readyState = 1;
    this.dispatchEvent(new Event('open'));
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
  let stream: ReturnType<typeof useBoardStream> | null = null;
  const app = createApp(
    defineComponent({
      setup() {
        stream = useBoardStream(canReload, reload);
        return () => null;
      },
    }),
  );
  app.mount({});
  return { reload, source: FakeEventSource.last!, live: () => stream!.live.value, unmount: () => app.unmount() };
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
  it('says it is not live only once the stream has been down a while, and live again when it reopens', () => {
    vi.useFakeTimers();
    vi.stubGlobal('EventSource', FakeEventSource);
    const board = mountBoard();
    board.source.reopened();
    expect(board.live()).toBe(true);
    // The browser's own quick reconnect is not worth a notice.
    board.source.fail();
    vi.advanceTimersByTime(3000);
    board.source.reopened();
    vi.advanceTimersByTime(NOT_LIVE_AFTER_MS);
    expect(board.live()).toBe(true);
    // Down for longer: the board says so, until the stream is back (and then catches up).
    board.source.fail();
    vi.advanceTimersByTime(NOT_LIVE_AFTER_MS - 1);
    expect(board.live()).toBe(true);
    vi.advanceTimersByTime(1);
    expect(board.live()).toBe(false);
    const reloads = board.reload.mock.calls.length;
    board.source.reopened();
    expect(board.live()).toBe(true);
    vi.advanceTimersByTime(250);
    expect(board.reload).toHaveBeenCalledTimes(reloads + 1);
    board.unmount();
  });

  it('opens again a stream the browser gave up on (an error answer while the server restarts), waiting longer each time', () => {
    vi.useFakeTimers();
    vi.stubGlobal('EventSource', FakeEventSource);
    FakeEventSource.opened = 0;
    const board = mountBoard();
    expect(FakeEventSource.opened).toBe(1);
    board.source.fail(true);
    vi.advanceTimersByTime(1999);
    expect(FakeEventSource.opened).toBe(1);
    vi.advanceTimersByTime(1);
    expect(FakeEventSource.opened).toBe(2);
    // Given up on again: four seconds, then eight.
    FakeEventSource.last!.fail(true);
    vi.advanceTimersByTime(3999);
    expect(FakeEventSource.opened).toBe(2);
    vi.advanceTimersByTime(1);
    expect(FakeEventSource.opened).toBe(3);
    FakeEventSource.last!.fail(true);
    vi.advanceTimersByTime(8000);
    expect(FakeEventSource.opened).toBe(4);
    expect(board.live()).toBe(false);
    // Back: live, caught up, and the next wait starts from two seconds again.
    const back = FakeEventSource.last!;
    back.reopened();
    expect(board.live()).toBe(true);
    vi.advanceTimersByTime(250);
    expect(board.reload).toHaveBeenCalledTimes(1);
    back.fail(true);
    vi.advanceTimersByTime(2000);
    expect(FakeEventSource.opened).toBe(5);
    // Gone from the page: nothing more is opened.
    FakeEventSource.last!.fail(true);
    board.unmount();
    vi.advanceTimersByTime(60_000);
    expect(FakeEventSource.opened).toBe(5);
    expect(FakeEventSource.last!.closed).toBe(true);
  });
});
