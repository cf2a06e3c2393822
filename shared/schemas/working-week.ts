import { z } from 'zod';
import { HOLIDAY_REGIONS, WEEKDAYS, type HolidayRegionCode, type WeekHours, type Weekday } from '../working-week.ts';
import type { AffectedBooking } from './absences.ts';
import { Id, oneLineText, requiredAs } from './common.ts';

/** Most spans one day can hold (a morning and an afternoon, an evening call-out). */
export const MAX_SPANS_A_DAY = 3;

/** A time of day on the firm's clock; `24:00` only as a finish (work up to midnight). */
const Start = z
  .string({ message: 'must be a time of day like 08:00' })
  .regex(/^([01]\d|2[0-3]):[0-5]\d$/, 'must be a time of day like 08:00');
const Finish = z
  .string({ message: 'must be a time of day like 17:00' })
  .regex(/^(([01]\d|2[0-3]):[0-5]\d|24:00)$/, 'must be a time of day like 17:00');

const Span = z
  .object({ from: Start, to: Finish })
  .strict()
  .refine((s) => s.to > s.from, { path: ['to'], message: 'must be after the start' });

const Day = z
  .array(Span)
  .max(MAX_SPANS_A_DAY, `can hold at most ${MAX_SPANS_A_DAY} spans`)
  .superRefine((spans, ctx) => {
    for (let i = 1; i < spans.length; i++) {
      if (spans[i]!.from < spans[i - 1]!.to)
        ctx.addIssue({ code: 'custom', path: [i, 'from'], message: 'must be after the span before it ends' });
    }
  });

/** Why a week with no working day is refused (after the field's name: "The week needs…"). */
export const EMPTY_WEEK = 'needs at least one working day: nothing can be booked on a week without working hours';

/** PUT /api/firm/calendars/:id: the whole week, and the version it was based on (GET gives it). */
export const PutCalendarHours = z
  .object({
    version: z.number(requiredAs('the version of the hours you loaded')).int().min(1),
    hours: z
      .object(Object.fromEntries(WEEKDAYS.map((d) => [d, Day])) as Record<Weekday, typeof Day>)
      .strict()
      // Every day unworked: nothing could be booked on it, and every booking on it would be refused.
      .refine((week) => WEEKDAYS.some((d) => week[d].length > 0), {
        message: EMPTY_WEEK,
      }),
  })
  .strict();
export type PutCalendarHours = z.infer<typeof PutCalendarHours>;

const REGION_CODES = Object.keys(HOLIDAY_REGIONS) as [HolidayRegionCode, ...HolidayRegionCode[]];
const Region = z.enum(REGION_CODES, { message: 'must be England and Wales, Scotland or Northern Ireland' });

/**
 * PUT /api/firm/holiday-region: the bank holidays the firm works to, and the region the form was
 * loaded with (`was`), so a change made meanwhile by someone else is not overwritten.
 */
export const PutHolidayRegion = z.object({ holidayRegion: Region, was: Region.nullable() }).strict();
export type PutHolidayRegion = z.infer<typeof PutHolidayRegion>;

/** Most working calendars one firm keeps (a standard week, a late shift, the electricians'…). */
export const MAX_CALENDARS = 12;

/**
 * POST /api/firm/calendars: another working week for some of the firm's crews, people or machines.
 * It starts with the standard week's hours and the firm's closures; nothing works to it yet.
 */
export const CreateCalendar = z.object({ name: oneLineText(60).min(1, 'is required') }).strict();
export type CreateCalendar = z.infer<typeof CreateCalendar>;

/** PATCH /api/firm/calendars/:id: a new name, and the name the page showed (a rename meanwhile is refused). */
export const RenameCalendar = z
  .object({
    name: oneLineText(60).min(1, 'is required'),
    previousName: z.string(requiredAs('the name the page showed')).max(200),
  })
  .strict();
export type RenameCalendar = z.infer<typeof RenameCalendar>;

/**
 * PUT /api/resources/:id/calendar: the week a crew, person or machine works to, and the week the
 * page showed it on (`was`), so a move made meanwhile by someone else is not overwritten.
 */
export const PutResourceCalendar = z
  .object({
    calendarId: Id,
    was: z.string(requiredAs('the week the page showed it on')).pipe(Id),
  })
  .strict();
export type PutResourceCalendar = z.infer<typeof PutResourceCalendar>;

/** A crew, person or machine of the firm, by name. */
export interface CalendarUser {
  id: string;
  name: string;
}

/** One working calendar of the firm as the firm page edits it. */
export interface CalendarHoursView {
  id: string;
  name: string;
  version: number;
  hours: WeekHours;
  /** True for the firm's standard week: what new resources and those given no other week work to. */
  standard: boolean;
  /** The firm's own crews, people and machines (on the books) that work to it, by name. */
  usedBy: CalendarUser[];
}

/** GET /api/firm/working-week. */
export interface WorkingWeekView {
  timeZone: string;
  holidayRegion: HolidayRegionCode | null;
  calendars: CalendarHoursView[];
}

/** What PUT /api/firm/calendars/:id answers: the hours saved and the bookings now outside them. */
export interface CalendarHoursSaved {
  calendar: CalendarHoursView;
  affected: AffectedBooking[];
}

/** What PUT /api/firm/holiday-region answers: the region and the bookings now on a bank holiday. */
export interface HolidayRegionSaved {
  holidayRegion: HolidayRegionCode;
  affected: AffectedBooking[];
}

/** What POST /api/firm/calendars answers (201). */
export interface CalendarCreated {
  calendar: CalendarHoursView;
}

/**
 * What PUT /api/resources/:id/calendar answers: the week it left and the one it joined, and its
 * bookings from now on that fall outside the new week's hours.
 */
export interface ResourceCalendarSaved {
  from: CalendarHoursView;
  to: CalendarHoursView;
  affected: AffectedBooking[];
}
