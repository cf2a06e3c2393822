// The working week most client tests' boards use, and the Monday they start on (an invented scenario).
import type { BoardJob } from '@shared/board-data';

/** Monday to Friday 08:00–17:00, as minutes of the day (index 0 is Sunday). */
export const WEEK = [[], [[480, 1020]], [[480, 1020]], [[480, 1020]], [[480, 1020]], [[480, 1020]], []] as [
  number,
  number,
][][];
export const HOUR = 3_600_000;
/** Monday 14 September 2026, 08:00 in London (BST). */
export const MON = Date.UTC(2026, 8, 14, 7);

/** The week a board shows (from the Sunday evening before MON), for firm f1 on calendar c1. */
export const WEEK_BOARD = {
  from: MON - 8 * HOUR,
  to: MON + 7 * 24 * HOUR,
  now: MON,
  firmId: 'f1',
  calendars: [{ id: 'c1', timeZone: 'Europe/London', weekly: WEEK }],
};

/** An invented job of firm f1: a slab install in Otley, nothing promised; `over` on top. */
export function boardJob(over: Partial<BoardJob> = {}): BoardJob {
  return {
    id: 'j1',
    firmId: 'f1',
    reference: 'TW-2417',
    customerName: 'A Customer',
    siteTown: 'Otley',
    status: 'planned',
    installationType: 'slab',
    promisedBy: null,
    ...over,
  };
}
