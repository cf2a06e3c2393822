import { computed, ref, shallowRef, onScopeDispose } from 'vue';
import { api, ApiError, request } from '@/api/client';
import type { BoardBooking, BoardData } from '@shared/board-data';
import { ownViolations, toEngineBoard } from '@shared/board-data';
import { analyseBoard, createBoardIndex, type BoardIndex, type BoardAnalysis } from '@shared/scheduler/index';
import { callFor, fromView, undoOf, type Intent, type WriteResult } from '@/components/board/drop-actions';

export interface BoardRange { from: number; to: number }

/**
 * The board's data for the visible range, the engine's index over it (for checks while dragging)
 * and its full analysis (for the violations shown on events and in the job panel). Writes go
 * through `send`, which merges the server's answer and remembers how to undo it.
 */
export function useBoard() {
  const data = shallowRef<BoardData | null>(null);
  const loading = ref(false);
  const error = shallowRef<ApiError | null>(null);
  const saving = ref(false);
  const lastUndo = shallowRef<{ label: string; intent: Intent } | null>(null);
  let controller: AbortController | null = null;
  let range: BoardRange | null = null;

  const index = computed<BoardIndex | null>(() => (data.value ? createBoardIndex(toEngineBoard(data.value), { now: data.value.now }) : null));
  // Problems that involve only busy-elsewhere blocks are another installer's business: dropped.
  const analysis = computed<BoardAnalysis | null>(() => {
    if (!data.value) return null;
    const full = analyseBoard(toEngineBoard(data.value), { now: data.value.now });
    const violations = ownViolations(data.value, full.violations);
    const errorCount = violations.filter((v) => v.severity === 'error').length;
    return { ...full, violations, errorCount, warningCount: violations.length - errorCount };
  });

  async function load(next: BoardRange = range ?? { from: Date.now(), to: Date.now() + 7 * 86_400_000 }): Promise<void> {
    range = next;
    controller?.abort();
    const own = new AbortController();
    controller = own;
    loading.value = true;
    try {
      data.value = await api.get<BoardData>('/api/board', {
        query: { from: new Date(next.from).toISOString(), to: new Date(next.to).toISOString() }, signal: own.signal,
      });
      error.value = null;
    } catch (caught) {
      if (own.signal.aborted) return;
      error.value = caught instanceof ApiError ? caught : new ApiError({ status: 0, title: 'The board could not be loaded' });
    } finally {
      if (controller === own) { loading.value = false; controller = null; }
    }
  }

  /** Replaces (or adds) bookings with the server's saved ones and drops removed ones. */
  function merge(saved: BoardBooking[], removedIds: string[] = []): void {
    const current = data.value;
    if (!current) return;
    const byId = new Map(saved.map((b) => [b.id, b]));
    const bookings = current.bookings.filter((b) => !removedIds.includes(b.id)).map((b) => byId.get(b.id) ?? b);
    for (const b of saved) if (!current.bookings.some((c) => c.id === b.id)) bookings.push(b);
    data.value = { ...current, bookings };
  }

  /** Sends one change to the server; throws the server's refusal for the caller to explain. */
  async function send(intent: Intent, label: string): Promise<WriteResult> {
    const call = callFor(intent);
    const before = data.value?.bookings ?? [];
    saving.value = true;
    try {
      const result = await request<WriteResult | undefined>(call.path, { method: call.method, body: call.body });
      const firmId = data.value?.firmId ?? '';
      if (intent.kind === 'remove') merge([], [intent.bookingId]);
      else merge((result?.bookings ?? []).map((v) => fromView(v, firmId)));
      const undo = result ? undoOf(intent, before, result.bookings) : null;
      lastUndo.value = undo ? { label, intent: undo } : null;
      return result ?? { bookings: [], warnings: [] };
    } finally {
      saving.value = false;
    }
  }

  async function undo(): Promise<void> {
    const entry = lastUndo.value;
    if (!entry) return;
    await send(entry.intent, `Undo ${entry.label}`);
    lastUndo.value = null;
  }

  onScopeDispose(() => controller?.abort());

  return { data, loading, error, saving, index, analysis, lastUndo, load, merge, send, undo };
}
