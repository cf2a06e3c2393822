import { z } from 'zod';
import { WorkDate, oneLineText } from './common.ts';
import { dayOfDate } from '../local-dates.ts';

/** The longest absence taken in one go, in days (a year; longer is a resource to take off the books). */
export const ABSENCE_MAX_DAYS = 366;

/** Words the form offers for why a resource is away; anything else may be typed. */
export const ABSENCE_REASONS = {
  person: ['Holiday', 'Off sick', 'Training', 'Other work'],
  machine: ['Off the road (repair)', 'Service', 'Inspection', 'Lent out'],
  firm: ['Works shutdown', 'Christmas and New Year', 'Training day'],
} as const;

const days = {
  from: WorkDate,
  to: WorkDate,
  reason: oneLineText(120).min(1, 'is required: say why, in a few words'),
};

/** A time of day on the firm's clock, `HH:MM` (24-hour). */
const ClockTime = z
  .string({ message: 'must be a time of day like 13:00' })
  .regex(/^([01]\d|2[0-3]):[0-5]\d$/, 'must be a time of day like 13:00');

// Each day's own problem is the thing to say when there is one: these compare two good days.
const whenDaysAreGood = (p: { issues: readonly unknown[] }) => p.issues.length === 0;
const toOnOrAfterFrom = (a: { from: string; to: string }) => a.to >= a.from;
const TO_ON_OR_AFTER_FROM = { path: ['to'], message: 'must be on or after the first day', when: whenDaysAreGood };
const atMostAYear = (a: { from: string; to: string }) =>
  a.to < a.from || dayOfDate(a.to) - dayOfDate(a.from) < ABSENCE_MAX_DAYS;
const AT_MOST_A_YEAR = {
  path: ['to'],
  message: `must be at most ${ABSENCE_MAX_DAYS} days after the first day`,
  when: whenDaysAreGood,
};

/**
 * POST /api/resources/:id/absences: local days in the resource's firm's time zone, `to` included,
 * and why; part of a day with `fromTime` (away from then on the first day: a dentist at 14:00) and
 * `toTime` (back by then on the last day), each `HH:MM`. The board shades the time and flags any
 * booking that falls in it.
 */
export const CreateAbsence = z
  .object({ ...days, fromTime: ClockTime.optional(), toTime: ClockTime.optional() })
  .strict()
  .refine(toOnOrAfterFrom, TO_ON_OR_AFTER_FROM)
  .refine(atMostAYear, AT_MOST_A_YEAR)
  .refine((a) => a.toTime !== '00:00', {
    path: ['toTime'],
    message: 'must be after 00:00: leave it out when the last day is away whole',
    when: whenDaysAreGood,
  })
  .refine((a) => a.from !== a.to || a.fromTime === undefined || a.toTime === undefined || a.toTime > a.fromTime, {
    path: ['toTime'],
    message: 'must be after the time away starts',
    when: whenDaysAreGood,
  });
export type CreateAbsence = z.infer<typeof CreateAbsence>;

/**
 * POST /api/firm/closures: the same days, times and reason, for the whole firm (a works shutdown,
 * or closing at 13:00 on Christmas Eve).
 */
export const CreateClosure = CreateAbsence;
export type CreateClosure = CreateAbsence;

/** One absence as the firm that owns the resource reads it. */
export interface AbsenceView {
  id: string;
  resourceId: string;
  /** First and last day away (local dates, `to` included). */
  from: string;
  to: string;
  /** Away from this time on the first day (null: the whole day). */
  fromTime: string | null;
  /** Back by this time on the last day (null: away the whole day). */
  toTime: string | null;
  reason: string;
}

/** A booking that falls in a new absence: the firm's own job named; another installer's only its times. */
export interface AffectedBooking {
  bookingId: string;
  startsAt: string;
  endsAt: string;
  jobReference: string | null;
  stageName: string | null;
}

/** What POST /api/resources/:id/absences answers. */
export interface AbsenceCreated {
  absence: AbsenceView;
  /** Bookings of the resource (not declined, not done) in the time now away: the board flags them. */
  affected: AffectedBooking[];
}

/** Days the whole firm is closed (a works shutdown), as the firm reads them. */
export interface ClosureView {
  id: string;
  from: string;
  to: string;
  /** Closed from this time on the first day, open again at this time on the last (null: whole days). */
  fromTime: string | null;
  toTime: string | null;
  reason: string;
}

/** What POST /api/firm/closures answers: the closure, and the firm's bookings now inside it. */
export interface ClosureCreated {
  closure: ClosureView;
  affected: AffectedBooking[];
}
