import type { BoardViewName } from './BoardTimeline.vue';

/** The `view` URL parameter. */
export const VIEW_PARAM: Record<string, BoardViewName> = { day: 'resourceTimelineDay', week: 'resourceTimelineWeek', month: 'resourceTimelineMonth' };

/** Today's date in a time zone as YYYY-MM-DD. */
export function todayIso(timeZone: string, now = new Date()): string {
  return new Intl.DateTimeFormat('en-CA', { timeZone, year: 'numeric', month: '2-digit', day: '2-digit' }).format(now);
}

/** One range earlier or later: a day, a week or a month. @example stepDate('resourceTimelineWeek', '2026-12-07', 1) // '2026-12-14' */
export function stepDate(view: BoardViewName, date: string, direction: -1 | 1): string {
  const d = new Date(`${date}T12:00:00Z`);
  if (view === 'resourceTimelineDay') d.setUTCDate(d.getUTCDate() + direction);
  else if (view === 'resourceTimelineWeek') d.setUTCDate(d.getUTCDate() + 7 * direction);
  else d.setUTCMonth(d.getUTCMonth() + direction);
  return d.toISOString().slice(0, 10);
}

/** The heading above the board. @example boardTitle('resourceTimelineMonth', '2026-12-07') // 'December 2026' */
export function boardTitle(view: BoardViewName, date: string): string {
  const d = new Date(`${date}T12:00:00Z`);
  const fmt = (o: Intl.DateTimeFormatOptions) => new Intl.DateTimeFormat('en-GB', { timeZone: 'UTC', ...o }).format(d);
  if (view === 'resourceTimelineMonth') return fmt({ month: 'long', year: 'numeric' });
  if (view === 'resourceTimelineDay') return fmt({ weekday: 'long', day: 'numeric', month: 'long', year: 'numeric' });
  const monday = new Date(d);
  monday.setUTCDate(d.getUTCDate() - ((d.getUTCDay() + 6) % 7));
  return `Week of ${new Intl.DateTimeFormat('en-GB', { timeZone: 'UTC', day: 'numeric', month: 'long', year: 'numeric' }).format(monday)}`;
}

const DAY = 86_400_000;

/**
 * The instants a view of `date` shows, with a day's margin each side (so the firm's time zone never
 * cuts a booking off): what the board loads before the timeline is drawn.
 * @example rangeOf('resourceTimelineWeek', '2026-12-09') // Mon 7 Dec − 1 day … Mon 14 Dec + 1 day
 */
export function rangeOf(view: BoardViewName, date: string): { from: number; to: number } {
  const d = new Date(`${date}T00:00:00Z`);
  let start = d.getTime();
  let end = start + DAY;
  if (view === 'resourceTimelineWeek') {
    start -= ((d.getUTCDay() + 6) % 7) * DAY;
    end = start + 7 * DAY;
  } else if (view === 'resourceTimelineMonth') {
    start = Date.UTC(d.getUTCFullYear(), d.getUTCMonth(), 1);
    end = Date.UTC(d.getUTCFullYear(), d.getUTCMonth() + 1, 1);
  }
  return { from: start - DAY, to: end + DAY };
}
