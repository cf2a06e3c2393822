import { onBeforeUnmount, onMounted, watch, type Ref } from 'vue';
import {
  WINDOW_ABOVE_ROWS,
  eventsToDraw,
  mostCommon,
  needsRedraw,
  reservedHeight,
  rowsToDraw,
  stackDepths,
  type LaneBox,
  type OrderedRow,
  firstRows,
} from '@/components/board/event-window';
import { POINTER_CLASSES } from '@/components/board/board-pointer';
import type { EventInput } from '@/components/board/board-events';

/** Until a drawn row says otherwise, one level of bookings is this tall (px). */
const DEFAULT_LEVEL_HEIGHT = 26;
/** No row is shorter than this (px): a name and its kind on two lines. */
const MIN_ROW_HEIGHT = 40;

/** A local day's start and the next day's start around a span: what a day-wide slot draws. */
function wholeDays(start: number, end: number): [number, number] {
  const from = new Date(start);
  from.setHours(0, 0, 0, 0);
  const to = new Date(Math.max(start, end - 1));
  to.setHours(24, 0, 0, 0);
  return [from.getTime(), to.getTime()];
}

/**
 * Draws only the bookings of the rows in view on a board of many rows (event-window.ts): watches
 * the timeline's scroller, keeps each undrawn row as tall as its bookings make it, and asks the
 * timeline for its events again when the view reaches rows it has not drawn. Nothing changes while
 * a booking is being dragged: the window catches up once it is dropped.
 *
 * @example
 * const win = useEventWindow({ root, rows: () => props.rows, openAtFirst: true, events: () => props.events, wholeDays: () => true, refetch })
 * success(win.events()) // in the timeline's event source
 */
export function useEventWindow(deps: {
  root: Ref<HTMLElement | null>;
  rows: () => readonly OrderedRow[];
  /** Whether the groups are open as the board opens (its top rows then show first). */
  openAtFirst: boolean;
  events: () => readonly EventInput[];
  /** True in the views whose slots are whole days (a booking there is drawn a day wide at least). */
  wholeDays: () => boolean;
  refetch: () => void;
}) {
  /**
   * Rows whose bookings are drawn; null: every row's (a board small enough to draw whole). A board
   * opening with its groups open draws its top rows' bookings from the first go: rows are at least
   * MIN_ROW_HEIGHT tall, so these cover the view and one below it.
   */
  let drawn: Set<string> | null =
    deps.rows().length > WINDOW_ABOVE_ROWS
      ? new Set(deps.openAtFirst ? firstRows(deps.rows(), Math.ceil((2 * window.innerHeight) / MIN_ROW_HEIGHT)) : [])
      : null;
  const measured = new Map<string, number>();
  /** What drawn rows of each stack depth measured, and how many of them measured that. */
  const seen = new Map<number, Map<number, number>>();
  /** The height drawn rows of each stack depth most often had. */
  const byDepth = new Map<number, number>();
  let depths = new Map<string, number>();
  /** The bookings changed since the depths were worked out (done when a look needs them: never on a small board). */
  let stale = true;
  let levelHeight = DEFAULT_LEVEL_HEIGHT;
  let frame = 0;
  /** Where the last look left the view, and whether that was the board's foot. */
  let lastTop = -1;
  let atFoot = false;
  let scroller: HTMLElement | null = null;
  let observer: ResizeObserver | null = null;

  function restack(): void {
    measured.clear();
    seen.clear();
    byDepth.clear();
    depths = stackDepths(deps.events(), deps.wholeDays() ? wholeDays : undefined);
  }

  /** The drawn rows' lanes (where they are) and their name cells. */
  function lanes(): { boxes: LaneBox[]; els: Map<string, HTMLElement>; names: Map<string, HTMLElement> } {
    const origin = (scroller as HTMLElement).getBoundingClientRect().top - (scroller as HTMLElement).scrollTop;
    const boxes: LaneBox[] = [];
    const els = new Map<string, HTMLElement>();
    const names = new Map<string, HTMLElement>();
    const root = deps.root.value;
    for (const el of root?.querySelectorAll<HTMLElement>('td.fc-timeline-lane[data-resource-id]') ?? []) {
      const id = el.dataset.resourceId as string;
      const rect = el.getBoundingClientRect();
      boxes.push({ id, top: rect.top - origin, height: rect.height });
      els.set(id, el);
    }
    for (const el of root?.querySelectorAll<HTMLElement>('td.fc-datagrid-cell.fc-resource[data-resource-id]') ?? [])
      names.set(el.dataset.resourceId as string, el);
    return { boxes, els, names };
  }

  /** Learns what the drawn rows' bookings take, from the height the timeline gave each. */
  function measure(els: Map<string, HTMLElement>): void {
    if (drawn === null) return;
    for (const id of drawn) {
      const stack = els.get(id)?.querySelector<HTMLElement>('.fc-timeline-lane-frame');
      if (!stack) continue;
      const height = stack.offsetHeight;
      if (measured.get(id) === height) continue;
      measured.set(id, height);
      const depth = depths.get(id) ?? 0;
      const counts = seen.get(depth) ?? new Map<number, number>();
      seen.set(depth, counts.set(height, (counts.get(height) ?? 0) + 1));
      byDepth.set(depth, mostCommon(counts));
      if (depth > 0 && height > 0) levelHeight = height / depth;
    }
  }

  function update(): void {
    frame = 0;
    const wanted = deps.rows().length > WINDOW_ABOVE_ROWS;
    if (!wanted) {
      if (drawn !== null) {
        drawn = null;
        deps.refetch();
      }
      return;
    }
    scroller ??= connect();
    if (!scroller) return;
    // A drag in progress keeps the bookings it started with (the window catches up on the drop).
    if (document.querySelector('.fc-event-mirror')) return;
    if (stale) {
      restack();
      stale = false;
    }
    const { boxes, els, names } = lanes();
    measure(els);
    // Someone who scrolled to the foot stays there while the rows above it settle their heights.
    if (atFoot && scroller.scrollTop === lastTop) scroller.scrollTop = scroller.scrollHeight;
    lastTop = scroller.scrollTop;
    atFoot = lastTop + scroller.clientHeight >= scroller.scrollHeight - 2;
    const view = { top: scroller.scrollTop, height: scroller.clientHeight };
    let next = drawn ?? new Set<string>();
    if (next.size === 0 || needsRedraw(boxes, next, view)) next = rowsToDraw(boxes, view);
    // Undrawn rows keep their bookings' height, known better after each draw. The name cell gets
    // it too, so the two sides stay level without the timeline measuring every row again.
    for (const [id, el] of els) {
      const keep = `${Math.round(next.has(id) ? 0 : reservedHeight(id, { measured, depths, byDepth, levelHeight }))}px`;
      if (el.style.getPropertyValue('--wl-lane-min') === keep) continue;
      el.style.setProperty('--wl-lane-min', keep);
      names.get(id)?.style.setProperty('--wl-lane-min', keep);
    }
    const same = drawn !== null && next.size === drawn.size && [...next].every((id) => drawn?.has(id));
    if (!same) {
      drawn = next;
      deps.refetch();
    }
  }

  function schedule(): void {
    if (frame === 0) frame = requestAnimationFrame(update);
  }

  function connect(): HTMLElement | null {
    const el = deps.root.value?.querySelector('.fc-timeline-body')?.closest<HTMLElement>('.fc-scroller') ?? null;
    if (!el) return null;
    el.addEventListener('scroll', schedule, { passive: true });
    // Rows opened or folded, or the window resized: the lanes moved.
    observer = new ResizeObserver(schedule);
    observer.observe(el);
    const body = el.querySelector('.fc-timeline-body');
    if (body) observer.observe(body);
    return el;
  }

  watch([deps.events, deps.wholeDays], () => {
    stale = true;
    schedule();
  });
  watch(() => deps.rows().length, schedule);
  onMounted(schedule);
  document.addEventListener('pointerup', schedule);
  onBeforeUnmount(() => {
    if (frame !== 0) cancelAnimationFrame(frame);
    scroller?.removeEventListener('scroll', schedule);
    observer?.disconnect();
    document.removeEventListener('pointerup', schedule);
  });

  return {
    /** The bookings to hand the timeline now. */
    events: (): EventInput[] =>
      drawn === null ? [...deps.events()] : eventsToDraw(deps.events(), drawn, [POINTER_CLASSES.highlight]),
    /** Looks at the view again (after the timeline drew new rows or dates). */
    schedule,
  };
}
