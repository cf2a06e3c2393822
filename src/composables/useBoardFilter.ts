import { computed } from 'vue';
import type { BoardData } from '@shared/board-data';
import type { BoardIndex, BookingState, Violation } from '@shared/scheduler/index';
import { eventsOf, rowsOf } from '@/components/board/board-events';
import {
  boardVisibility,
  hiddenCited,
  hiddenNote,
  type BoardFilterInput,
  type BoardVisibility,
} from '@/components/board/board-search';
import { trayGroups } from '@/components/board/tray';
import { POINTER_CLASSES } from '@/components/board/board-pointer';

/** The toolbar's filters as the URL keeps them. */
export interface BoardFilterValues {
  firm: string;
  kind: string;
  job: string;
  state: BookingState | '';
  q: string;
}

interface Deps {
  data: () => BoardData | null;
  index: () => BoardIndex | null;
  filters: () => BoardFilterValues;
  problems: () => Map<string, Violation[]>;
  canEdit: () => boolean;
  /** Bookings shown whatever the filters (a clash the scheduler asked to see). */
  revealed: () => ReadonlySet<string>;
  /** The stage whose bookings show as one linked group. */
  selectedStage: () => string | null;
  /** Bookings a report's link outlines (both sides of a clash): shown whatever the filters, outlined. */
  highlighted?: () => ReadonlySet<string>;
}

/**
 * What the board draws under its search and filters: rows, events (declined ones included, a
 * selected stage's bookings linked) and the tray, all from one visibility; and the words for a
 * refusal that cites bookings the filters hide.
 */
export function useBoardFilter(deps: Deps) {
  const input = computed<BoardFilterInput>(() => {
    const f = deps.filters();
    return { q: f.q, jobId: f.job, state: f.state, firmId: f.firm, kind: f.kind };
  });
  const visibility = computed<BoardVisibility | null>(() => {
    const data = deps.data();
    const highlighted = deps.highlighted?.() ?? new Set<string>();
    return data
      ? boardVisibility(
          data,
          input.value,
          highlighted.size ? new Set([...deps.revealed(), ...highlighted]) : deps.revealed(),
        )
      : null;
  });

  const rows = computed(() => {
    const data = deps.data();
    const shown = visibility.value;
    return data && shown ? rowsOf(data).filter((r) => shown.rows.has(r.id)) : [];
  });

  const events = computed(() => {
    const data = deps.data();
    const shown = visibility.value;
    if (!data || !shown) return [];
    const selected = deps.selectedStage();
    const highlighted = deps.highlighted?.() ?? new Set<string>();
    const perStage = new Map<string, number>();
    for (const b of data.bookings)
      if (b.state !== 'declined' && !b.elsewhere) perStage.set(b.stageId, (perStage.get(b.stageId) ?? 0) + 1);
    return eventsOf(data, { canEdit: deps.canEdit(), problems: deps.problems(), declined: true })
      .filter((e) => shown.bookings.has(e.id))
      .map((e) => {
        const linked = !e.extendedProps.elsewhere && (perStage.get(e.extendedProps.stageId) ?? 0) > 1;
        const extra = [
          ...(linked ? ['wl-linked'] : []),
          ...(selected && e.extendedProps.stageId === selected ? ['wl-linked--selected'] : []),
          ...(deps.revealed().has(e.id) ? ['wl-revealed'] : []),
          ...(highlighted.has(e.id) ? [POINTER_CLASSES.highlight] : []),
        ];
        return extra.length ? { ...e, classNames: [...e.classNames, ...extra] } : e;
      });
  });

  const tray = computed(() => {
    const data = deps.data();
    const index = deps.index();
    const shown = visibility.value;
    if (!data || !index || !shown) return [];
    const order = index.order.map((info) => info.stage.id);
    return trayGroups(data, () => order, shown.trayStage);
  });

  /** "(TW-2423 is hidden by the filters)" for bookings a refusal cites that the board does not show. */
  function hiddenNoteFor(bookingIds: string[]): string {
    const data = deps.data();
    return data && visibility.value ? hiddenNote(hiddenCited(data, visibility.value, bookingIds)) : '';
  }

  /** The hidden bookings a refusal cites, with their jobs. */
  function hiddenFor(bookingIds: string[]) {
    const data = deps.data();
    return data && visibility.value ? hiddenCited(data, visibility.value, bookingIds) : [];
  }

  return { visibility, rows, events, tray, hiddenNoteFor, hiddenFor };
}
