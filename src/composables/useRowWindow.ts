import { computed, onBeforeUnmount, onMounted, shallowRef, watch, type Ref } from 'vue';
import type { RowInput } from '@/components/board/board-events';
import { linesOf, windowOf, WINDOW_ABOVE_LINES, type LineHeights, type RowWindow } from '@/components/board/row-window';

interface Deps {
  /** Every row the board shows (after search and filters). */
  rows: () => RowInput[];
  /** Whether a group is open (reactive). */
  isOpen: (group: string) => boolean;
  /** The element around the timeline: its scrollers are found inside, the padding is set on it. */
  root: Ref<HTMLElement | null>;
  /** The rows to draw changed: the timeline should ask for them (and their events) again. */
  changed: () => void;
}

/** Until rows are measured: a row with a name and a kind on two lines, and a group's heading (px). */
const FIRST_GUESS = { row: 41, group: 36 };

/**
 * Draws only the rows in view on a board of many rows (row-window.ts decides which): follows the
 * timeline's scrolling, measures the rows it draws, keeps the rest's space as padding of the
 * timeline's scrollers (CSS variables `--wl-rows-above` and `--wl-rows-below` on `root`), and holds
 * the window still while a booking or a tray stage is being dragged (the timeline places a drop by
 * the rows it measured when the drag began). `reveal` scrolls a row into the middle of the view.
 */
export function useRowWindow(deps: Deps) {
  const lines = computed(() => linesOf(deps.rows(), deps.isOpen));
  const windowed = computed(() => lines.value.length > WINDOW_ABOVE_LINES);
  const current = shallowRef<RowWindow | null>(null);
  const measured = new Map<string, number>();
  let typical = FIRST_GUESS.row;
  let group = FIRST_GUESS.group;
  const heights: LineHeights = { row: (id) => measured.get(id) ?? typical, get group() { return group; } };
  let scroller: HTMLElement | null = null;
  let dragging = false;
  let frame = 0;

  /** The timeline body's scroller (the one with the vertical scrollbar); found again after a view change. */
  function bodyScroller(): HTMLElement | null {
    if (scroller?.isConnected) return scroller;
    scroller = deps.root.value?.querySelector<HTMLElement>('.fc-timeline-body')?.closest<HTMLElement>('.fc-scroller') ?? null;
    return scroller;
  }

  function compute(): RowWindow {
    const el = bodyScroller();
    // Never taller than the window: a scroller not yet sized by the timeline may report its content's height.
    const height = Math.min(el?.clientHeight || window.innerHeight, window.innerHeight);
    return windowOf(lines.value, heights, el?.scrollTop ?? 0, height, Math.max(400, height), deps.rows());
  }

  function setPadding(w: RowWindow | null): void {
    const el = deps.root.value;
    if (!el) return;
    el.style.setProperty('--wl-rows-above', `${w ? w.padTop : 0}px`);
    el.style.setProperty('--wl-rows-below', `${w ? w.padBottom : 0}px`);
  }

  const sameRows = (a: readonly RowInput[], b: readonly RowInput[]) => a.length === b.length && a.every((r, i) => r === b[i]);

  function apply(next: RowWindow | null): void {
    const before = current.value;
    current.value = next;
    setPadding(next);
    if (!before || !next || !sameRows(before.rows, next.rows) || before.shown.size !== next.shown.size) {
      deps.changed();
      if (next) requestAnimationFrame(measure);
    }
  }

  /** The rows as drawn: their heights replace the guesses, and the padding follows. */
  function measure(): void {
    const root = deps.root.value;
    if (!root || !windowed.value) return;
    const rowHeights: number[] = [];
    for (const cell of root.querySelectorAll<HTMLElement>('.fc-datagrid-body td.fc-resource[data-resource-id]')) {
      const h = cell.parentElement?.getBoundingClientRect().height ?? 0;
      if (h > 0) { measured.set(cell.dataset.resourceId ?? '', h); rowHeights.push(h); }
    }
    const heading = root.querySelector<HTMLElement>('.fc-datagrid-body .fc-resource-group')?.closest('tr')?.getBoundingClientRect().height;
    if (heading) group = heading;
    if (rowHeights.length) typical = rowHeights.sort((a, b) => a - b)[Math.floor(rowHeights.length / 2)]!;
    update();
  }

  /** The window for where the board is scrolled: redrawn only when the view nears its edge. */
  function update(): void {
    if (!windowed.value) { if (current.value) apply(null); return; }
    if (dragging) return;
    const el = bodyScroller();
    const now = current.value;
    const next = compute();
    if (now && el && lines.value === linesAt && sameRows(now.rows, next.rows)) { current.value = next; setPadding(next); return; }
    if (now && el) {
      const view = Math.min(el.clientHeight, window.innerHeight);
      const top = el.scrollTop, bottom = top + view, slack = Math.max(200, view / 2);
      const coversTop = now.first === 0 || top - now.top >= slack;
      const coversBottom = now.last >= lines.value.length - 1 || now.bottom - bottom >= slack;
      // Far more drawn than the view needs (the first draw, before the timeline had its size): drawn again, smaller.
      const oversized = now.bottom - now.top > 3 * (view + 2 * Math.max(400, view));
      if (coversTop && coversBottom && !oversized && lines.value === linesAt) return;
    }
    linesAt = lines.value;
    apply(next);
  }
  let linesAt = lines.value;

  function onScroll(e: Event): void {
    if (e.target !== bodyScroller() || frame) return;
    frame = requestAnimationFrame(() => { frame = 0; update(); });
  }
  // A drag holds the window still: the timeline hit-tests rows it measured when the drag began.
  function onPointerDown(e: PointerEvent): void {
    if ((e.target as Element | null)?.closest?.('.fc-event, .tray-stage')) dragging = true;
  }
  function onPointerUp(): void {
    if (!dragging) return;
    dragging = false;
    requestAnimationFrame(update);
  }

  onMounted(() => {
    deps.root.value?.addEventListener('scroll', onScroll, { capture: true, passive: true });
    window.addEventListener('pointerdown', onPointerDown, { capture: true });
    window.addEventListener('pointerup', onPointerUp);
    window.addEventListener('pointercancel', onPointerUp);
    update();
  });
  onBeforeUnmount(() => {
    deps.root.value?.removeEventListener('scroll', onScroll, { capture: true });
    window.removeEventListener('pointerdown', onPointerDown, { capture: true });
    window.removeEventListener('pointerup', onPointerUp);
    window.removeEventListener('pointercancel', onPointerUp);
    if (frame) cancelAnimationFrame(frame);
  });

  /** The rows to hand the timeline now. */
  function rowsToDraw(): RowInput[] {
    if (!windowed.value) {
      if (current.value) { current.value = null; setPadding(null); }
      return deps.rows();
    }
    if (!current.value || lines.value !== linesAt) { linesAt = lines.value; current.value = compute(); setPadding(current.value); requestAnimationFrame(measure); }
    return current.value.rows;
  }

  /**
   * The rows the timeline draws (open groups, in the window): only their events are handed over, so
   * the timeline sorts no events for rows it does not draw.
   */
  function shownIds(): ReadonlySet<string> {
    const rows = rowsToDraw();
    if (current.value) return current.value.shown;
    return new Set(rows.filter((r) => deps.isOpen(r.group)).map((r) => r.id));
  }

  // Rows filtered, or a group opened or folded: the timeline gets its rows and events again.
  watch(lines, () => {
    if (!deps.root.value) return;
    current.value = null;
    linesAt = lines.value;
    deps.changed();
    if (windowed.value) requestAnimationFrame(measure);
  });

  /** Scrolls a row into the middle of the view (drawing it first when it is outside the window). */
  function reveal(rowId: string): void {
    const el = bodyScroller();
    if (!el || !windowed.value) return;
    let y = 0;
    for (const line of lines.value) {
      if (line.kind === 'row' && line.row.id === rowId) break;
      y += line.kind === 'group' ? heights.group : heights.row(line.row.id);
    }
    el.scrollTop = Math.max(0, y - el.clientHeight / 2);
    update();
  }

  return { windowed, current, rowsToDraw, shownIds, update, reveal };
}
