import { computed, ref, shallowRef, onScopeDispose } from 'vue';
import { api, ApiError, request } from '@/api/client';
import type { BoardBooking, BoardData } from '@shared/board-data';
import type { UndoEntryView } from '@shared/schemas/bookings';
import type { BoardIndex, BoardAnalysis } from '@shared/scheduler/index';
import { boardAnalysisOf, boardIndexOf } from '@/components/board/engine-view';
import { callFor, fromView, resultOf, type Intent, type WriteResult } from '@/components/board/drop-actions';

export interface BoardRange {
  from: number;
  to: number;
}

/**
 * The board's data for the visible range, the engine's index over it (for checks while dragging)
 * and its full analysis (for the violations shown on events and in the job panel). Writes go
 * through `send`, which merges the server's answer. The undo stack is the server's, per session
 * (GET/POST /api/undo), so it survives a reload; an undo is applied there through the guarded
 * write path, and the board reloads. `seesAllBookings` is false for a board that holds only part
 * of the bookings (a crew member's own rows): the engine then raises no warnings that need the rest.
 */
export function useBoard(options: { seesAllBookings?: () => boolean } = {}) {
  const seesAll = () => options.seesAllBookings?.() ?? true;
  const data = shallowRef<BoardData | null>(null);
  const loading = ref(false);
  const error = shallowRef<ApiError | null>(null);
  const saving = ref(false);
  const undoStack = shallowRef<UndoEntryView[]>([]);
  const lastUndo = computed(() => undoStack.value[0] ?? null);
  let controller: AbortController | null = null;
  let range: BoardRange | null = null;
  // Saved writes merged so far: a load asked for before the latest of them may answer without it.
  let merged = 0;

  // The engine's index is built once per load (or merged write) and serves the analysis and every drag check.
  const index = computed<BoardIndex | null>(() => (data.value ? boardIndexOf(data.value, seesAll()) : null));
  // Problems that involve only busy-elsewhere blocks are another installer's business: dropped.
  const analysis = computed<BoardAnalysis | null>(() =>
    data.value && index.value ? boardAnalysisOf(data.value, index.value) : null,
  );

  /** The session's changes that can be taken back (the server keeps them). */
  async function loadUndo(): Promise<void> {
    try {
      undoStack.value = (await api.get<{ items: UndoEntryView[] }>('/api/undo')).items;
    } catch {
      undoStack.value = [];
    }
  }

  async function load(
    next: BoardRange = range ?? { from: Date.now(), to: Date.now() + 7 * 86_400_000 },
  ): Promise<void> {
    range = next;
    controller?.abort();
    const own = new AbortController();
    controller = own;
    loading.value = true;
    const mergedBefore = merged;
    try {
      const answer = await api.get<BoardData>('/api/board', {
        query: { from: new Date(next.from).toISOString(), to: new Date(next.to).toISOString() },
        signal: own.signal,
      });
      // A write saved while this was on its way (a drop as the live board reloaded): the answer may
      // be from before it, and would put a stage just booked back in the tray. Asked again instead.
      if (merged !== mergedBefore) return await load(next);
      data.value = answer;
      error.value = null;
    } catch (caught) {
      if (own.signal.aborted) return;
      error.value =
        caught instanceof ApiError ? caught : new ApiError({ status: 0, title: 'The board could not be loaded' });
    } finally {
      if (controller === own) {
        loading.value = false;
        controller = null;
      }
    }
  }

  /** Replaces (or adds) bookings with the server's saved ones and drops removed ones. */
  function merge(saved: BoardBooking[], removedIds: string[] = []): void {
    const current = data.value;
    if (!current) return;
    merged++;
    const byId = new Map(saved.map((b) => [b.id, b]));
    // The board's own fields (a proposal, an overdue flag) stay until the next load; a decline goes with its state.
    const bookings = current.bookings
      .filter((b) => !removedIds.includes(b.id))
      .map((b) => {
        const saved = byId.get(b.id);
        return saved ? { ...b, ...saved, ...(saved.state !== 'declined' ? { declined: null } : {}) } : b;
      });
    for (const b of saved) if (!current.bookings.some((c) => c.id === b.id)) bookings.push(b);
    data.value = { ...current, bookings };
  }

  /** Sends one change to the server; throws the server's refusal for the caller to explain. */
  async function send(intent: Intent): Promise<WriteResult> {
    const call = callFor(intent);
    saving.value = true;
    try {
      const result = resultOf(await request<unknown>(call.path, { method: call.method, body: call.body }));
      const firmId = data.value?.firmId ?? '';
      if (intent.kind === 'remove') merge([], [intent.bookingId]);
      else merge(result.bookings.map((v) => fromView(v, firmId)));
      void loadUndo();
      return result;
    } finally {
      saving.value = false;
    }
  }

  /** Takes back the session's newest change (on the server), then shows the board as it is now. */
  async function undo(): Promise<{ label: string }> {
    saving.value = true;
    try {
      const done = await api.post<{ undone: UndoEntryView; remaining: UndoEntryView[] }>('/api/undo', {});
      undoStack.value = done.remaining;
      await load();
      return done.undone;
    } catch (caught) {
      await loadUndo();
      throw caught;
    } finally {
      saving.value = false;
    }
  }

  onScopeDispose(() => controller?.abort());

  return { data, loading, error, saving, index, analysis, lastUndo, undoStack, load, loadUndo, merge, send, undo };
}
