/**
 * Steps a crew marked on My work while the phone had no signal: kept on the phone, in the order
 * they were marked, and sent once it has one. Only what sending needs is kept (the booking's id
 * and version, the step, when it was marked, and the stage's name and job reference to say it):
 * no householder's name, address or phone ever goes on the device.
 */
import { ref } from 'vue';
import type { MyWorkItem } from '@shared/schemas/my-work';
import { MARK_KEPT_AT_MOST_MS, PROGRESS_ACTIONS, type ProgressAction } from '@shared/schemas/bookings';
import { progressActions, stateAfterProgress } from '@shared/progress-actions';

export interface KeptMark {
  bookingId: string;
  action: ProgressAction;
  /** The booking's version the step is sent with (each earlier kept step of the booking adds one). */
  version: number;
  /** When it was marked, ISO 8601. */
  markedAt: string;
  /** "Excavate pit · TW-2407": what the page says about it. */
  label: string;
}

/** Where kept steps live: the browser's localStorage in the app, a plain object in tests. */
export interface MarkStore {
  read(): KeptMark[];
  /** False when the store refused (private browsing, full): the steps then live only in the open page. */
  write(marks: readonly KeptMark[]): boolean;
}

const KEY_PREFIX = 'waterline:kept-steps:';

/** Counts the writes to kept steps in this tab, so whatever shows how many wait can count again. */
export const keptStepsWritten = ref(0);

/**
 * How many steps wait on this phone, whoever marked them: the waiting page (no one known to be
 * signed in while the server can't be reached) says they are safe.
 * @example keptOnThisPhone(localStorage) // 1
 */
export function keptOnThisPhone(storage: Storage | undefined): number {
  let n = 0;
  try {
    if (!storage) return 0;
    for (let i = 0; i < storage.length; i++) {
      const key = storage.key(i);
      if (key?.startsWith(KEY_PREFIX)) n += readMarks(storage, key).length;
    }
  } catch {
    // The storage itself refused (a browser that blocks it): nothing known to be kept.
  }
  return n;
}

/** The kept steps under one key; what can't be read (not JSON, not steps) counts as none. */
function readMarks(storage: Storage | undefined, key: string): KeptMark[] {
  try {
    const parsed: unknown = JSON.parse(storage?.getItem(key) ?? '[]');
    return Array.isArray(parsed) ? parsed.filter(isKeptMark) : [];
  } catch {
    return [];
  }
}

function isKeptMark(x: unknown): x is KeptMark {
  if (typeof x !== 'object' || x === null) return false;
  const m = x as Record<string, unknown>;
  return (
    typeof m.bookingId === 'string' &&
    PROGRESS_ACTIONS.includes(m.action as ProgressAction) &&
    Number.isInteger(m.version) &&
    typeof m.markedAt === 'string' &&
    !Number.isNaN(Date.parse(m.markedAt)) &&
    typeof m.label === 'string'
  );
}

/**
 * One person's kept steps in one firm, in `storage` (each person signed in on a shared phone keeps
 * their own). What can't be read is treated as nothing kept.
 * @example markStore(localStorage, 'u7', 'f1').read() // []
 */
export function markStore(storage: Storage | undefined, userId: string, firmId: string): MarkStore {
  const key = `${KEY_PREFIX}${firmId}:${userId}`;
  return {
    read: () => readMarks(storage, key),
    write(marks) {
      try {
        if (!storage) return false;
        if (marks.length === 0) storage.removeItem(key);
        else storage.setItem(key, JSON.stringify(marks));
        keptStepsWritten.value++;
        return true;
      } catch {
        return false;
      }
    },
  };
}

/** A store that keeps nothing beyond the page (tests, or no storage at all). */
export function pageStore(): MarkStore {
  let kept: KeptMark[] = [];
  return {
    read: () => kept.slice(),
    write(marks) {
      kept = marks.slice();
      return true;
    },
  };
}

/** The step that takes `action` back, when it is one. */
const TAKES_BACK: Partial<Record<ProgressAction, ProgressAction>> = {
  'undo-arrive': 'arrive',
  'undo-finish': 'finish',
};

/**
 * The kept steps with one more: a step taking back the last one kept for the booking cancels it
 * (nothing need be sent for either); otherwise it goes on the end, one version on from the
 * booking's last kept step.
 * @example keepMark([], { bookingId: '41', action: 'arrive', version: 3, markedAt, label }) // [that step]
 */
export function keepMark(marks: readonly KeptMark[], mark: KeptMark): KeptMark[] {
  let last = -1;
  for (let i = 0; i < marks.length; i++) if (marks[i]!.bookingId === mark.bookingId) last = i;
  const before = last >= 0 ? marks[last]! : null;
  if (before && TAKES_BACK[mark.action] === before.action) return marks.filter((_, i) => i !== last);
  return [...marks, before ? { ...mark, version: before.version + 1 } : mark];
}

/** Kept steps the server would no longer take (older than it accepts, measured by the phone's clock). */
export function tooOld(mark: KeptMark, now: number): boolean {
  return Date.parse(mark.markedAt) < now - MARK_KEPT_AT_MOST_MS;
}

/**
 * The card as it will be once its kept steps are sent: the state after them and the steps that
 * follow (by the same rule the server lists them).
 * @example asKept(item, [{ bookingId: item.bookingId, action: 'arrive', … }], list).state // 'on_site'
 */
export function asKept(
  item: MyWorkItem,
  marks: readonly KeptMark[],
  list: { today: string; timeZone: string },
): MyWorkItem {
  const own = marks.filter((m) => m.bookingId === item.bookingId);
  if (own.length === 0) return item;
  let state: string = item.state;
  for (const m of own) state = stateAfterProgress(state, item.side, m.action) ?? state;
  return {
    ...item,
    state,
    actions: progressActions({ ...item, state }, list.today, list.timeZone),
  };
}
