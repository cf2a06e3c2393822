import { z } from 'zod';
import type { DaySheet, DaySheetVisit } from './day-sheets.ts';
import type { ProgressAction } from './bookings.ts';
import type { ResourceSide } from '../booking-states.ts';
import { IsoInstant } from './common.ts';

/**
 * GET /api/my-work: without a range, from the start of today (the firm's day, by the server's
 * clock) for `days` days, so the phone and the server agree on what "today" is.
 */
export const MyWorkQuery = z
  .object({
    from: IsoInstant.optional(),
    to: IsoInstant.optional(),
    days: z.coerce.number().int().min(1, 'must be at least 1 day').max(100, 'must be at most 100 days').default(14),
  })
  .refine((q) => (q.from === undefined) === (q.to === undefined), {
    path: ['to'],
    message: 'give both from and to, or neither',
  })
  .refine((q) => q.from === undefined || q.to === undefined || Date.parse(q.to) > Date.parse(q.from), {
    path: ['to'],
    message: 'must be after from',
  })
  .refine(
    (q) => q.from === undefined || q.to === undefined || Date.parse(q.to) - Date.parse(q.from) <= 100 * 86_400_000,
    { path: ['to'], message: 'range may span at most 100 days' },
  );
export type MyWorkQuery = z.infer<typeof MyWorkQuery>;

/**
 * One of a crew member's own bookings on My work: the day sheet's visit (site, times, contacts,
 * who else is on the stage, cautions) plus what marking progress needs.
 */
export interface MyWorkItem extends DaySheetVisit {
  version: number;
  /** The crew or person row the booking is on. */
  resource: DaySheet['resource'];
  /**
   * Whose resource the booking is on: the installer's own crew, or a partner firm's (whose crew
   * mark done, but whose arrival the installer's office marks).
   */
  side: ResourceSide;
  /** The local date (firm's zone) the booking starts on, YYYY-MM-DD. */
  day: string;
  /**
   * The progress the reader may mark now: the state machine's actions for the crew on its own
   * booking, with "arrive" only on the booking's day(s) — the same rules the server enforces.
   */
  actions: ProgressAction[];
}

/**
 * Time away that falls in the range: one of the reader's own resources marked away (their person
 * row or a crew they belong to), or the whole firm closed (resourceName null).
 */
export interface MyWorkAway {
  resourceName: string | null;
  /** First and last day away, local dates in the firm's zone, `to` included. */
  from: string;
  to: string;
  /** Away from this time on the first day, back by this time on the last (null: the whole day). */
  fromTime: string | null;
  toTime: string | null;
  reason: string;
}

/**
 * The hours the reader works to: their own row and each crew they are in, grouped by working week
 * (names in order), the week's name, and its days and hours in a line ("Mon–Fri 08:00–17:00").
 */
export interface MyWorkHours {
  resourceNames: string[];
  week: string;
  words: string;
}

export interface MyWorkList {
  /** Today in the firm's zone (YYYY-MM-DD), by the server's clock. */
  today: string;
  timeZone: string;
  items: MyWorkItem[];
  /** The reader's time away and the firm's closed days in the range, first day first. */
  away: MyWorkAway[];
  /** The weeks the reader works to (one line each; most readers have one). */
  hours: MyWorkHours[];
}
