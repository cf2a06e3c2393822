import { computed, ref, shallowRef } from 'vue';
import {
  addWorkingMinutes,
  checkMove,
  checkStageBookings,
  nextWorkingInstant,
  resourceCalendarOf,
  type BoardIndex,
  type Booking,
  type Violation,
} from '@shared/scheduler/index';
import { bookingsOfStage, isBlocking } from '@shared/board-actions';
import { wrongKindMessage } from '@shared/stage-completion';
import { outsideBookingWindow, type BookingWindow } from '@shared/booking-window';

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

export interface DragVerdict {
  allowed: boolean;
  reasons: string[];
  warnings: string[];
  /** Where the stage would start: the drop, snapped to working time, or the stage's own time when a resource joins it. */
  start: number;
  /** Bookings the refusal cites (so the board can name the ones its filters hide). */
  cited: string[];
  /** A tray stage with some resources booked: the new one joins them at the stage's time. */
  joins?: boolean;
  /** A declined booking dropped again: it is rebooked (pencilled) there. */
  rebooks?: boolean;
  /** What dropping here does, when it is not a move (the tray takes a booking off). */
  hint?: string;
  /** How many bookings of the stage move together with the dragged one (the stage is one group). */
  together?: number;
  /** A tray drop: the resources the stage still lacks are proposed after it, so their shortfall is no warning here. */
  completes?: boolean;
}

export interface DragCheckOptions {
  /** A booking dragged onto the tray is taken off the board. */
  onDropOnTray?: (bookingId: string) => void;
  /** Words to add to a refusal citing bookings the filters hide ("(TW-2423 is hidden by the filters)"). */
  hiddenNote?: (bookingIds: string[]) => string;
  /** How far from the board's today a booking may lie (sent with the board): beyond it, refused as the server would. */
  bookingWindow?: () => BookingWindow | undefined;
}

/** Longest a press on a stage or booking holds the live board's reloads (see inHand). */
export const HOLD_LONGEST_MS = 60_000;

const refuse = (start: number, reason: string): DragVerdict => ({
  allowed: false,
  reasons: [reason],
  warnings: [],
  start,
  cited: [],
});

/**
 * The check that runs on every drag frame: the engine's incremental move check against the index
 * built when the board loaded (never a full re-analysis). `check` remembers the last verdict and
 * where the pointer is, so the reason shows beside it while dragging; `evaluate` gives the same
 * verdict without showing anything (for drops, dialogs and proposals), so the reason box goes
 * when the button comes up.
 */
export function useDragCheck(
  index: () => BoardIndex | null,
  onRefusedDrop: (verdict: DragVerdict, fromTray: boolean) => void = () => {},
  options: DragCheckOptions = {},
) {
  const verdict = shallowRef<DragVerdict | null>(null);
  const pointer = ref({ x: 0, y: 0 });
  /** The pointer is over the tray while a booking is dragged: dropping takes it off the board. */
  const overTray = ref(false);
  /** Alt held at the drop: only the dragged booking moves, not its whole stage. */
  const alone = ref(false);
  let cacheKey = '';
  let lastProbe: DragProbe | null = null;
  let dragging = false;
  // When the button went down on a stage or booking, until it comes up (see inHand).
  let heldSince: number | null = null;

  /**
   * A time beyond the booking window (a year typed as 2031 or 9999 in the move dialog) is refused in
   * the server's own words before the engine is asked: the engine counts working time only so far.
   */
  function outsideWindow(ix: BoardIndex, start: number, end?: number): DragVerdict | null {
    const window = options.bookingWindow?.();
    if (!window) return null;
    const outside =
      outsideBookingWindow(window, ix.now, start) ??
      (end === undefined ? null : outsideBookingWindow(window, ix.now, end));
    return outside ? refuse(start, outside.detail) : null;
  }

  function spanStartFor(ix: BoardIndex, probe: DragProbe): number {
    const own = bookingsOfStage(ix, probe.stageId);
    if (!own.length || probe.oldStart === undefined) return probe.start;
    const spanStart = Math.min(...own.map((b) => b.start));
    return spanStart + (probe.start - probe.oldStart);
  }

  function naturalEnd(ix: BoardIndex, resourceId: string, start: number, minutes: number): number {
    const end = addWorkingMinutes(resourceCalendarOf(ix, resourceId), start, minutes);
    return end > start ? end : start + 60_000;
  }

  function verdictOf(all: Violation[], start: number, extra: Partial<DragVerdict> = {}): DragVerdict {
    const violations = extra.completes ? all.filter((v) => v.kind !== 'capacity') : all;
    const blocking = violations.filter(isBlocking);
    const cited = [...new Set(blocking.flatMap((v) => v.bookingIds))];
    const note = cited.length && options.hiddenNote ? options.hiddenNote(cited) : '';
    const reasons = blocking.map((v) => v.message);
    if (note && reasons.length) reasons[0] = `${reasons[0]} ${note}`;
    return {
      allowed: blocking.length === 0,
      reasons,
      warnings: violations.filter((v) => !isBlocking(v)).map((v) => v.message),
      start,
      cited,
      ...extra,
    };
  }

  /** The verdict on a stage's complete new set of bookings (a proposal taken, a rebooking). */
  function evaluateSet(stageId: string, own: Booking[], start: number): DragVerdict {
    const ix = index();
    if (!ix) return refuse(start, 'The board is still loading.');
    for (const b of own) {
      const outside = outsideWindow(ix, b.start, b.end);
      if (outside) return { ...outside, start };
    }
    try {
      return verdictOf(checkStageBookings(ix, stageId, own), start);
    } catch (error) {
      return refuse(start, error instanceof Error ? error.message : String(error));
    }
  }

  /** The engine's verdict on a drop, without showing it. */
  function evaluate(probe: DragProbe): DragVerdict {
    const ix = index();
    if (!ix) return refuse(probe.start, 'The board is still loading.');
    const outside = outsideWindow(ix, probe.start, probe.end);
    if (outside) return outside;
    let start = probe.start;
    if (probe.snapToWorkingStart && probe.resourceId && ix.resources.has(probe.resourceId)) {
      start = nextWorkingInstant(resourceCalendarOf(ix, probe.resourceId), start);
    }
    const stage = ix.stages.get(probe.stageId)?.stage;
    const resource = probe.resourceId ? ix.resources.get(probe.resourceId) : undefined;
    if (!stage) return refuse(start, 'That stage is not on the board.');
    const kinds = stage.requirements.map((r) => r.kind);
    // A resource of a kind the stage doesn't ask for is refused before the drop, as the server would.
    if (resource && probe.resourceId !== probe.oldResourceId && kinds.length && !kinds.includes(resource.kind)) {
      return refuse(start, wrongKindMessage(stage.name, resource, kinds));
    }
    const current = bookingsOfStage(ix, probe.stageId);
    try {
      const dragged = probe.bookingId ? ix.board.bookings.find((b) => b.id === probe.bookingId) : undefined;
      if (dragged?.state === 'declined') {
        // Dropped again after a decline: the declined booking is rebooked there, beside the stage's others.
        const resourceId = probe.resourceId ?? dragged.resourceId;
        if (current.some((b) => b.resourceId === resourceId))
          return refuse(start, `${ix.resources.get(resourceId)?.name ?? 'That resource'} already has '${stage.name}'.`);
        const end = probe.end ?? naturalEnd(ix, resourceId, start, stage.durationMinutes);
        const own = [...current, { ...dragged, resourceId, start, end, state: 'pencilled' as const }];
        return { ...verdictOf(checkStageBookings(ix, stage.id, own), start), rebooks: true };
      }
      if (probe.oldStart === undefined && current.length && probe.resourceId) {
        // A stage partly booked, dropped again from the tray: the resource joins it at the stage's time.
        const at = Math.min(...current.map((b) => b.start));
        if (current.some((b) => b.resourceId === probe.resourceId))
          return refuse(at, `${resource?.name ?? 'That resource'} already has '${stage.name}'.`);
        const joining: Booking = {
          id: `join:${stage.id}`,
          stageId: stage.id,
          resourceId: probe.resourceId,
          start: at,
          end: naturalEnd(ix, probe.resourceId, at, stage.durationMinutes),
          state: 'pencilled',
          installerFirmId: current[0]!.installerFirmId,
        };
        return verdictOf(checkStageBookings(ix, stage.id, [...current, joining]), at, { joins: true, completes: true });
      }
      const changesResource = probe.resourceId !== undefined && probe.resourceId !== probe.oldResourceId;
      const violations = checkMove(ix, {
        stageId: probe.stageId,
        start: spanStartFor(ix, { ...probe, start }),
        ...(probe.end !== undefined ? { end: probe.end } : {}),
        ...(changesResource || probe.oldStart === undefined
          ? { resourceId: probe.resourceId, ...(probe.bookingId ? { bookingId: probe.bookingId } : {}) }
          : {}),
      });
      const together =
        probe.bookingId && probe.oldStart !== undefined && current.length > 1 ? { together: current.length } : {};
      return verdictOf(violations, start, probe.oldStart === undefined ? { completes: true } : together);
    } catch (error) {
      return refuse(start, error instanceof Error ? error.message : String(error));
    }
  }

  /** One booking of a stage alone to a time and row, the stage's others staying (Alt held, or chosen). */
  function evaluateAlone(probe: DragProbe): DragVerdict {
    const ix = index();
    if (!ix) return refuse(probe.start, 'The board is still loading.');
    const outside = outsideWindow(ix, probe.start, probe.end);
    if (outside) return outside;
    const stage = ix.stages.get(probe.stageId)?.stage;
    const current = bookingsOfStage(ix, probe.stageId);
    const dragged = current.find((b) => b.id === probe.bookingId);
    if (!stage || !dragged) return evaluate(probe);
    const resourceId = probe.resourceId ?? dragged.resourceId;
    const resource = ix.resources.get(resourceId);
    const kinds = stage.requirements.map((r) => r.kind);
    if (resource && resourceId !== dragged.resourceId && kinds.length && !kinds.includes(resource.kind))
      return refuse(probe.start, wrongKindMessage(stage.name, resource, kinds));
    try {
      const end = probe.end ?? naturalEnd(ix, resourceId, probe.start, stage.durationMinutes);
      return verdictOf(
        checkStageBookings(
          ix,
          stage.id,
          current.map((b) => (b.id === dragged.id ? { ...b, resourceId, start: probe.start, end } : b)),
        ),
        probe.start,
      );
    } catch (error) {
      return refuse(probe.start, error instanceof Error ? error.message : String(error));
    }
  }

  /** The per-frame check: the verdict shows by the pointer until the drop. */
  function check(probe: DragProbe): DragVerdict {
    const key = `${probe.stageId}|${probe.start}|${probe.end ?? ''}|${probe.resourceId ?? ''}|${probe.oldStart ?? ''}|${probe.bookingId ?? ''}|${alone.value}`;
    lastProbe = probe;
    if (key === cacheKey && verdict.value) return verdict.value;
    cacheKey = key;
    const grouped =
      probe.bookingId !== undefined &&
      probe.oldStart !== undefined &&
      (index()?.stages.get(probe.stageId)?.bookings.length ?? 0) > 1;
    const result = alone.value && grouped ? evaluateAlone(probe) : evaluate(probe);
    if (dragging) verdict.value = result;
    return result;
  }

  function trayRect(): DOMRect | null {
    return (document.querySelector('.tray') as HTMLElement | null)?.getBoundingClientRect() ?? null;
  }

  /** True when the pointer is over the tray now. */
  function pointerOverTray(): boolean {
    const r = trayRect();
    const { x, y } = pointer.value;
    return r !== null && x >= r.left && x <= r.right && y >= r.top && y <= r.bottom;
  }

  function track(event: PointerEvent | MouseEvent): void {
    pointer.value = { x: event.clientX, y: event.clientY };
    alone.value = event.altKey;
    overTray.value = Boolean(lastProbe?.bookingId && lastProbe.oldStart !== undefined) && pointerOverTray();
  }

  // A refused drop never reaches the calendar's drop handlers: say why when the button comes up.
  function release(event: MouseEvent): void {
    track(event);
    const last = verdict.value;
    const probe = lastProbe;
    if (overTray.value && probe?.bookingId) options.onDropOnTray?.(probe.bookingId);
    else if (last && !last.allowed) onRefusedDrop(last, probe?.oldStart === undefined);
    stop();
  }

  function letGo(): void {
    heldSince = null;
    window.removeEventListener('pointerup', letGo);
    window.removeEventListener('pointercancel', letGo);
  }

  /**
   * A stage or booking is in the scheduler's hand: from the button going down on it, before any
   * verdict shows, until it comes up. The live board holds its reloads meanwhile (redrawing the
   * timeline under a drag drops it). A button let go where the page can't see it (outside the
   * window) ends the hold after HOLD_LONGEST_MS, so the board is never held for good.
   */
  function inHand(now = Date.now()): boolean {
    return heldSince !== null && now - heldSince < HOLD_LONGEST_MS;
  }

  function start(): void {
    heldSince = Date.now();
    window.addEventListener('pointerup', letGo);
    window.addEventListener('pointercancel', letGo);
    cacheKey = '';
    lastProbe = null;
    dragging = true;
    verdict.value = null;
    overTray.value = false;
    alone.value = false;
    window.addEventListener('pointermove', track, { passive: true });
    window.addEventListener('mousemove', track, { passive: true });
    window.addEventListener('mouseup', release, { once: true });
  }

  function stop(): void {
    letGo();
    dragging = false;
    window.removeEventListener('pointermove', track);
    window.removeEventListener('mousemove', track);
    window.removeEventListener('mouseup', release);
    verdict.value = null;
    overTray.value = false;
  }

  /** What the box by the pointer shows: the verdict, or what dropping on the tray does. */
  const shown = computed<DragVerdict | null>(() =>
    overTray.value && verdict.value
      ? {
          allowed: true,
          reasons: [],
          warnings: [],
          start: verdict.value.start,
          cited: [],
          hint: 'Drop here to take it off the board (back to the tray).',
        }
      : verdict.value,
  );

  return {
    verdict,
    shown,
    pointer,
    overTray,
    alone,
    check,
    evaluate,
    evaluateAlone,
    evaluateSet,
    start,
    stop,
    inHand,
    pointerOverTray,
  };
}
