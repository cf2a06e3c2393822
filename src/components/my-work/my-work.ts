/**
 * My work's pure parts: the crew's bookings grouped by day with today first, the words of each
 * progress step, and which step takes which back. Tested without a browser.
 */
import type { MyWorkAway, MyWorkItem, MyWorkList } from '@shared/schemas/my-work';
import type { ProgressAction } from '@shared/schemas/bookings';

export interface DayGroup {
  day: string;
  label: string;
  items: MyWorkItem[];
  /** The reader's time away on that day (their crew or themselves marked away, or the firm closed). */
  away: MyWorkAway[];
}

const nextDay = (iso: string) => new Date(Date.parse(`${iso}T12:00:00Z`) + 86_400_000).toISOString().slice(0, 10);

/**
 * "Today", "Tomorrow", or the weekday and date.
 * @example dayLabel('2026-06-03', '2026-06-01') // 'Wednesday 3 June'
 */
export function dayLabel(day: string, today: string): string {
  if (day === today) return 'Today';
  if (day === nextDay(today)) return 'Tomorrow';
  return new Intl.DateTimeFormat('en-GB', { timeZone: 'UTC', weekday: 'long', day: 'numeric', month: 'long' }).format(
    new Date(`${day}T12:00:00Z`),
  );
}

/**
 * The bookings by the day they start, today first; a booking that started earlier and is still
 * running (a two-day dig) is today's work. With nothing today but work later, today still comes
 * first, empty, so the first day listed is never taken for today's (the page says there is
 * nothing); with nothing at all there are no groups.
 * @example groupByDay(list)[0] // { day: '2026-06-01', label: 'Today', items: [...] }
 */
export function groupByDay(list: MyWorkList): DayGroup[] {
  const groups = new Map<string, MyWorkItem[]>();
  const sorted = [...list.items].sort(
    (a, b) => Date.parse(a.startsAt) - Date.parse(b.startsAt) || a.bookingId.localeCompare(b.bookingId),
  );
  for (const item of sorted) {
    const day = item.day < list.today ? list.today : item.day;
    groups.set(day, [...(groups.get(day) ?? []), item]);
  }
  if (groups.size > 0 && !groups.has(list.today)) groups.set(list.today, []);
  return [...groups.entries()]
    .sort(([a], [b]) => a.localeCompare(b))
    .map(([day, items]) => ({ day, label: dayLabel(day, list.today), items, away: awayOn(list.away, day) }));
}

/**
 * The time away that covers a local day (dates compare as text).
 * @example awayOn([{ resourceName: 'Crew Heron', from: '2026-06-03', to: '2026-06-04', reason: 'Holiday' }], '2026-06-04').length // 1
 */
export function awayOn(away: readonly MyWorkAway[], day: string): MyWorkAway[] {
  return away.filter((a) => a.from <= day && day <= a.to);
}

/**
 * Who is away, and why, in a few words; on a `day` where it starts or ends inside the day, when.
 * @example awayWords({ resourceName: 'Crew Heron', from: '2026-06-03', to: '2026-06-04', fromTime: null, toTime: null, reason: 'Holiday' })
 * // 'Crew Heron is marked away (Holiday)'
 * @example awayWords({ resourceName: 'Connor Reid', from: '2026-06-03', to: '2026-06-03', fromTime: '14:00', toTime: null, reason: 'Dentist' }, '2026-06-03')
 * // 'Connor Reid is marked away from 14:00 (Dentist)'
 */
export function awayWords(a: MyWorkAway, day?: string): string {
  const starts = day === a.from ? a.fromTime : null;
  const ends = day === a.to ? a.toTime : null;
  const when =
    starts !== null && ends !== null
      ? ` ${starts}–${ends}`
      : starts !== null
        ? ` from ${starts}`
        : ends !== null
          ? ` until ${ends}`
          : '';
  return a.resourceName === null
    ? `The firm is closed${when} (${a.reason})`
    : `${a.resourceName} is marked away${when} (${a.reason})`;
}

/** The words around each progress step: the button, the question before it and what is said after. */
export const PROGRESS_WORDS: Record<ProgressAction, { button: string; question: string; yes: string; done: string }> = {
  arrive: {
    button: 'On site',
    question: 'Mark that you are on site now?',
    yes: 'Yes, on site',
    done: 'marked on site',
  },
  finish: { button: 'Done', question: 'Mark this work as done?', yes: 'Yes, done', done: 'marked done' },
  'undo-arrive': {
    button: 'Not on site yet',
    question: 'Take back "on site"?',
    yes: 'Take it back',
    done: 'no longer on site',
  },
  'undo-finish': {
    button: 'Not done yet',
    question: 'Take back "done"? The work shows as on site again.',
    yes: 'Take it back',
    done: 'no longer done',
  },
};

/** Which action takes a step back (the Undo after marking). */
export const UNDO_OF = { arrive: 'undo-arrive', finish: 'undo-finish' } as const satisfies Record<
  'arrive' | 'finish',
  ProgressAction
>;
