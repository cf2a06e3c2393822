import { computed, onScopeDispose, ref, watch } from 'vue';
import { api, ApiError, networkError } from '@/api/client';
import { useApiResource } from '@/composables/useApiResource';
import { groupByDay, PROGRESS_WORDS, UNDO_OF } from '@/components/my-work/my-work';
import {
  asKept,
  keepMark,
  keptStepsWritten,
  pageStore,
  type KeptMark,
  type MarkStore,
} from '@/components/my-work/kept-marks';
import { plural } from '@shared/plural';
import type { MyWorkItem, MyWorkList } from '@shared/schemas/my-work';
import type { BookingView, ProgressAction } from '@shared/schemas/bookings';
import { stateAfterProgress } from '@shared/progress-actions';

/** How long a step waits for the server's answer before the phone keeps it to send later. */
export const PROGRESS_WAIT_MS = 20_000;
/** How often kept steps are tried again while the page is open (besides the browser's `online`). */
export const SEND_KEPT_EVERY_MS = 30_000;

/** How the page asks, tells and warns (naive-ui's dialog and message in the app; plain functions in tests). */
export interface MyWorkPrompts {
  /** Asks before a step is marked; resolves true to go ahead. */
  confirm(question: { title: string; text: string; yes: string }): Promise<boolean>;
  /** Says a step was marked, offering to take it back. */
  announce(text: string, undo: (() => Promise<void>) | null): void;
  problem(error: unknown): void;
}

/** Where kept steps live and the clock they are stamped by (the browser's in the app; fakes in tests). */
export interface MyWorkOptions {
  store?: MarkStore;
  now?: () => number;
}

/** True while a page of this tab is sending kept steps (they go one at a time, in order). */
let sendingInTab = false;

/** The same kept step (read again from the store, it is another object). */
const sameMark = (a: KeptMark, b: KeptMark) =>
  a.bookingId === b.bookingId && a.action === b.action && a.version === b.version && a.markedAt === b.markedAt;

/** True when the step never got an answer: no signal, the server out of reach, or too slow to say. */
const noSignal = (error: unknown) => error instanceof ApiError && error.status === 0;

/**
 * The crew's own bookings from today (the server's today), and marking progress on them: each
 * step asked first, then announced with an Undo that takes it back through the same server route.
 * A step that gets no answer (no signal on site) is kept on the phone with the time it was marked,
 * shown as marked, and sent in order once there is a signal (the browser going online, every
 * SEND_KEPT_EVERY_MS, or Send now); the server checks it against the day it was marked.
 * @example const { groups, mark } = useMyWork({ confirm, announce, problem }); await mark(item, 'arrive')
 */
export function useMyWork(prompts: MyWorkPrompts, options: MyWorkOptions = {}) {
  const store = options.store ?? pageStore();
  const now = options.now ?? Date.now;
  // Kept for the tab: opened again on site without a signal, the page shows the last list, dated.
  const list = useApiResource<MyWorkList>(() => ({ path: '/api/my-work' }), { keep: true, refreshOnReturn: true });
  const kept = ref<KeptMark[]>(store.read());
  const groups = computed(() => {
    const l = list.data.value;
    return l ? groupByDay({ ...l, items: l.items.map((i) => asKept(i, kept.value, l)) }) : [];
  });
  const busy = ref<string | null>(null);
  const sending = ref(false);

  // The store is where kept steps live: another page of this tab may send some meanwhile (see
  // useKeptSteps.ts), so each change starts from what it holds, unless it refused the last write
  // (private browsing, full): then they live only in this page.
  let stored = true;
  let disposed = false;
  onScopeDispose(() => {
    disposed = true;
  });
  function change(next: (marks: KeptMark[]) => KeptMark[]): void {
    const marks = next(stored ? store.read() : kept.value);
    stored = store.write(marks);
    kept.value = marks;
  }
  /** What the store holds now (another page's sending may have taken some). */
  function reread(): void {
    if (stored) kept.value = store.read();
  }

  /** The time the last kept step of a booking was marked, or null when none is waiting. */
  function keptSince(bookingId: string): string | null {
    let at: string | null = null;
    for (const m of kept.value) if (m.bookingId === bookingId) at = m.markedAt;
    return at;
  }

  async function send(
    bookingId: string,
    body: { action: ProgressAction; version: number; markedMsAgo?: number },
  ): Promise<BookingView> {
    const gaveUp = new AbortController();
    const timer = setTimeout(() => gaveUp.abort(), PROGRESS_WAIT_MS);
    try {
      return await api.post<BookingView>(`/api/bookings/${bookingId}/progress`, body, { signal: gaveUp.signal });
    } catch (error) {
      throw gaveUp.signal.aborted ? networkError(error) : error;
    } finally {
      clearTimeout(timer);
    }
  }

  /**
   * A step refused: said, and when the booking changed meanwhile (an answer lost to a weak signal,
   * or marked on another phone of the crew) the list is loaded again to show it as it is now.
   */
  async function refused(error: unknown): Promise<void> {
    prompts.problem(error);
    if (error instanceof ApiError && error.status === 409) await list.refresh();
  }

  /** Keeps a step on the phone and says so; its Undo takes the kept step back before it is sent. */
  function keep(item: MyWorkItem, action: ProgressAction): void {
    const label = `${item.stage.name} · ${item.job.reference}`;
    change((marks) =>
      keepMark(marks, {
        bookingId: item.bookingId,
        action,
        version: item.version,
        markedAt: new Date(now()).toISOString(),
        label,
      }),
    );
    const back = action === 'arrive' || action === 'finish' ? UNDO_OF[action] : null;
    prompts.announce(
      `No signal: ${item.stage.name} ${PROGRESS_WORDS[action].done} on this phone, sent when there is a signal`,
      back
        ? async () => {
            // Sent meanwhile (the signal came back within the Undo's seconds): taken back on the server.
            reread();
            const stillKept = kept.value.some((m) => m.bookingId === item.bookingId && m.action === action);
            const current = list.data.value?.items.find((i) => i.bookingId === item.bookingId);
            if (!stillKept && current) return undo(current, back, current.version);
            change((marks) =>
              keepMark(marks, {
                bookingId: item.bookingId,
                action: back,
                version: item.version,
                markedAt: new Date(now()).toISOString(),
                label,
              }),
            );
            prompts.announce(`${item.stage.name}: ${PROGRESS_WORDS[back].done}`, null);
          }
        : null,
    );
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
    // After a kept step, the next one of the same booking waits behind it (they go in order).
    reread();
    if (keptSince(item.bookingId) !== null) {
      keep(item, action);
      return true;
    }
    busy.value = item.bookingId;
    try {
      const saved = await send(item.bookingId, { action, version: item.version });
      const back = action === 'arrive' || action === 'finish' ? UNDO_OF[action] : null;
      prompts.announce(`${item.stage.name}: ${words.done}`, back ? () => undo(item, back, saved.version) : null);
      await list.refresh();
      return true;
    } catch (error) {
      if (noSignal(error)) {
        keep(item, action);
        return true;
      }
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
      await send(item.bookingId, { action, version });
      prompts.announce(`${item.stage.name}: ${PROGRESS_WORDS[action].done}`, null);
      await list.refresh();
    } catch (error) {
      if (noSignal(error)) keep({ ...item, version }, action);
      else await refused(error);
    } finally {
      busy.value = null;
    }
  }

  /**
   * Sends the kept steps, oldest first, each with how long ago it was marked. No answer: the rest
   * stay kept for the next try (said only when `sayNoSignal`, a person's Send now). Refused: that booking's kept steps are dropped and the refusal said,
   * unless the booking already stands where they lead (the first try reached the server and only
   * its answer was lost).
   */
  async function sendKept(options: { sayNoSignal?: boolean } = {}): Promise<void> {
    reread();
    // One sender at a time in the tab: My work's and the one other pages run (useKeptSteps.ts).
    if (sendingInTab || kept.value.length === 0) return;
    sending.value = true;
    sendingInTab = true;
    let sent = 0;
    const refusals: { mark: KeptMark; error: unknown; expected: string | null }[] = [];
    try {
      // A page gone (another opened, or someone else signed in) sends nothing more than the step under way.
      for (reread(); kept.value.length > 0 && !disposed; reread()) {
        const m = kept.value[0]!;
        busy.value = m.bookingId;
        try {
          // How long ago, by this phone's clock: right even when the clock is set wrong.
          const markedMsAgo = Math.max(0, now() - Date.parse(m.markedAt));
          await send(m.bookingId, { action: m.action, version: m.version, markedMsAgo });
          change((marks) => marks.filter((k) => !sameMark(k, m)));
          sent++;
        } catch (error) {
          if (noSignal(error)) {
            // Asked for (Send now): said, so the tap is not met with nothing.
            if (options.sayNoSignal) prompts.problem(error);
            break;
          }
          const item = list.data.value?.items.find((i) => i.bookingId === m.bookingId);
          let expected: string | null = item?.state ?? null;
          for (const k of kept.value)
            if (k.bookingId === m.bookingId && item && expected !== null)
              expected = stateAfterProgress(expected, item.side, k.action);
          change((marks) => marks.filter((k) => k.bookingId !== m.bookingId));
          refusals.push({ mark: m, error, expected });
        }
      }
    } finally {
      busy.value = null;
      sending.value = false;
      sendingInTab = false;
    }
    if (sent === 0 && refusals.length === 0) return;
    await list.refresh();
    for (const r of refusals) {
      const current = list.data.value?.items.find((i) => i.bookingId === r.mark.bookingId);
      if (r.error instanceof ApiError && r.error.status === 409 && current && current.state === r.expected) {
        sent++;
        continue;
      }
      prompts.problem(
        r.error instanceof ApiError
          ? new ApiError({
              status: r.error.status,
              title: `Not sent: ${r.mark.label}, ${PROGRESS_WORDS[r.mark.action].done}`,
              detail: r.error.detail ?? r.error.title,
              errors: r.error.errors,
              problem: r.error.problem,
            })
          : r.error,
      );
    }
    if (sent > 0) prompts.announce(`Sent ${plural(sent, 'step')} kept on this phone`, null);
  }

  if (typeof window !== 'undefined') {
    const again = () => void sendKept();
    window.addEventListener('online', again);
    const timer = setInterval(() => {
      if (kept.value.length > 0) again();
    }, SEND_KEPT_EVERY_MS);
    onScopeDispose(() => {
      window.removeEventListener('online', again);
      clearInterval(timer);
    });
  }
  // Kept steps sent by another page of the tab meanwhile (useKeptSteps.ts): the list is asked for
  // again, so their cards show where the bookings stand now.
  watch(keptStepsWritten, () => {
    const before = kept.value.length;
    reread();
    if (!sending.value && kept.value.length < before) void list.refresh();
  });
  // Steps kept in an earlier visit are tried once the list has come (so a refusal can be weighed
  // against where the booking stands).
  if (kept.value.length > 0) {
    const stop = watch(
      () => list.data.value,
      (data) => {
        if (!data) return;
        queueMicrotask(() => stop());
        void sendKept();
      },
      { immediate: true },
    );
  }

  return { list, groups, busy, mark, undo, kept, keptSince, sending, sendKept };
}
