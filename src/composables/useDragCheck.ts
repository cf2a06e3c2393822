import { ref, shallowRef } from 'vue';
import { checkMove, nextWorkingInstant, resourceCalendarOf, type BoardIndex, type Violation } from '@shared/scheduler/index';
import { bookingsOfStage, isBlocking } from '@shared/board-actions';

export interface DragProbe {
  stageId: string;
  /** New start of the dragged booking, and its start before the drag (absent for a tray stage). */
  start: number;
  oldStart?: number;
  end?: number;
  resourceId?: string;
  oldResourceId?: string;
  bookingId?: string;
  /** In the month view a drop lands on a day: the stage starts at that resource's first working instant. */
  snapToWorkingStart?: boolean;
}

export interface DragVerdict { allowed: boolean; reasons: string[]; warnings: string[]; start: number }

/**
 * The check that runs on every drag frame: the engine's incremental move check against the index
 * built when the board loaded (never a full re-analysis). Remembers the last verdict, and where
 * the pointer is, so the reason can be shown beside it.
 */
export function useDragCheck(index: () => BoardIndex | null, onRefusedDrop: (verdict: DragVerdict, fromTray: boolean) => void = () => {}) {
  const verdict = shallowRef<DragVerdict | null>(null);
  const pointer = ref({ x: 0, y: 0 });
  let cacheKey = '';
  let lastFromTray = false;

  function spanStartFor(ix: BoardIndex, probe: DragProbe): number {
    const own = bookingsOfStage(ix, probe.stageId);
    if (!own.length || probe.oldStart === undefined) return probe.start;
    const spanStart = Math.min(...own.map((b) => b.start));
    return spanStart + (probe.start - probe.oldStart);
  }

  function check(probe: DragProbe): DragVerdict {
    const ix = index();
    if (!ix) return { allowed: false, reasons: ['The board is still loading.'], warnings: [], start: probe.start };
    let start = probe.start;
    if (probe.snapToWorkingStart && probe.resourceId && ix.resources.has(probe.resourceId)) {
      start = nextWorkingInstant(resourceCalendarOf(ix, probe.resourceId), start);
    }
    const key = `${probe.stageId}|${start}|${probe.end ?? ''}|${probe.resourceId ?? ''}|${probe.oldStart ?? ''}`;
    if (key === cacheKey && verdict.value) return verdict.value;
    cacheKey = key;
    const changesResource = probe.resourceId !== undefined && probe.resourceId !== probe.oldResourceId;
    let violations: Violation[];
    try {
      violations = checkMove(ix, {
        stageId: probe.stageId,
        start: spanStartFor(ix, { ...probe, start }),
        ...(probe.end !== undefined ? { end: probe.end } : {}),
        ...(changesResource || probe.oldStart === undefined ? { resourceId: probe.resourceId, ...(probe.bookingId ? { bookingId: probe.bookingId } : {}) } : {}),
      });
    } catch (error) {
      violations = [{ kind: 'availability', severity: 'error', stageIds: [], resourceIds: [], bookingIds: [], message: error instanceof Error ? error.message : String(error) }];
    }
    lastFromTray = probe.oldStart === undefined;
    const result: DragVerdict = {
      allowed: !violations.some(isBlocking),
      reasons: violations.filter(isBlocking).map((v) => v.message),
      warnings: violations.filter((v) => !isBlocking(v)).map((v) => v.message),
      start,
    };
    verdict.value = result;
    return result;
  }

  function track(event: PointerEvent | MouseEvent): void {
    pointer.value = { x: event.clientX, y: event.clientY };
  }

  // A refused drop never reaches the calendar's drop handlers: say why when the button comes up.
  function release(): void {
    const last = verdict.value;
    if (last && !last.allowed) onRefusedDrop(last, lastFromTray);
    stop();
  }

  function start(): void {
    cacheKey = '';
    verdict.value = null;
    window.addEventListener('pointermove', track, { passive: true });
    window.addEventListener('mousemove', track, { passive: true });
    window.addEventListener('mouseup', release, { once: true });
  }

  function stop(): void {
    window.removeEventListener('pointermove', track);
    window.removeEventListener('mousemove', track);
    window.removeEventListener('mouseup', release);
    verdict.value = null;
  }

  return { verdict, pointer, check, start, stop };
}
