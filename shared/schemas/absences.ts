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

/**
 * POST /api/resources/:id/absences: whole local days in the resource's firm's time zone, `to`
 * included, and why. The board shades them and flags any booking that falls in them.
 */
export const CreateAbsence = z
  .object({
    from: WorkDate,
    to: WorkDate,
    reason: oneLineText(120).min(1, 'is required: say why, in a few words'),
  })
  .strict()
  // Each day's own problem is the thing to say when there is one: these compare two good days.
  .refine((a) => a.to >= a.from, {
    path: ['to'],
    message: 'must be on or after the first day away',
    when: (payload) => payload.issues.length === 0,
  })
  .refine((a) => a.to < a.from || dayOfDate(a.to) - dayOfDate(a.from) < ABSENCE_MAX_DAYS, {
    path: ['to'],
    message: `must be at most ${ABSENCE_MAX_DAYS} days after the first day away`,
    when: (payload) => payload.issues.length === 0,
  });
export type CreateAbsence = z.infer<typeof CreateAbsence>;

/** One absence as the firm that owns the resource reads it. */
export interface AbsenceView {
  id: string;
  resourceId: string;
  /** First and last day away (local dates, `to` included). */
  from: string;
  to: string;
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
  reason: string;
}

/** What POST /api/firm/closures answers: the closure, and the firm's bookings now inside it. */
export interface ClosureCreated {
  closure: ClosureView;
  affected: AffectedBooking[];
}
