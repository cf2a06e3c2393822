import { z } from 'zod';
import { Id, IsoInstant } from './common.ts';

export const BOOKING_STATES = ['pencilled', 'sent', 'confirmed', 'declined', 'on_site', 'done'] as const;
export type BookingState = (typeof BOOKING_STATES)[number];

export const BookingRange = z
  .object({
    from: IsoInstant,
    to: IsoInstant,
  })
  .refine((r) => Date.parse(r.to) > Date.parse(r.from), { path: ['to'], message: 'must be after from' })
  .refine((r) => Date.parse(r.to) - Date.parse(r.from) <= 1000 * 60 * 60 * 24 * 100, {
    path: ['to'],
    message: 'range may span at most 100 days',
  });

const times = <T extends { startsAt: string; endsAt: string }>(b: T) => Date.parse(b.endsAt) > Date.parse(b.startsAt);

const endsAfterStart = (b: { startsAt: string; endsAt?: string | undefined }) =>
  b.endsAt === undefined || Date.parse(b.endsAt) > Date.parse(b.startsAt);

/** A stage booked on a resource; without `endsAt` the stage's working duration on that resource's calendar is used. */
export const CreateBooking = z
  .object({
    stageId: Id,
    resourceId: Id,
    startsAt: IsoInstant,
    endsAt: IsoInstant.optional(),
    state: z.enum(['pencilled', 'confirmed']).default('pencilled'),
  })
  .refine(endsAfterStart, { path: ['endsAt'], message: 'must be after the start' });
export type CreateBooking = z.infer<typeof CreateBooking>;

export const UpdateBooking = z
  .object({
    version: z.number().int().min(1),
    resourceId: Id.optional(),
    startsAt: IsoInstant,
    endsAt: IsoInstant,
    state: z.enum(BOOKING_STATES).optional(),
  })
  // A field it doesn't take is refused, not dropped: a misspelt resourceId never looks moved.
  .strict()
  .refine(times, { path: ['endsAt'], message: 'must be after the start' });
export type UpdateBooking = z.infer<typeof UpdateBooking>;

export const CreateBookings = z.object({
  bookings: z.array(CreateBooking).min(1, 'needs at least one booking').max(500, 'at most 500 bookings at once'),
});
export type CreateBookings = z.infer<typeof CreateBookings>;

/**
 * Which booked stages after a moved stage move with it: none ("only this"), those starting within
 * the next `withinDays` days of the moved stage's start before the move, or all of them.
 */
export const DEPENDENT_CHOICES = ['none', 'within', 'all'] as const;
export type DependentChoice = (typeof DEPENDENT_CHOICES)[number];

/** A drag on the board: all of a stage's bookings move together; optionally one changes resource. */
export const MoveStage = z
  .object({
    startsAt: IsoInstant,
    endsAt: IsoInstant.optional(),
    resourceId: Id.optional(),
    bookingId: Id.optional(),
    /** The version of each booking the move was based on: any newer one refuses the move (409). */
    versions: z.record(Id, z.number().int().min(1)),
    /** The older switch: true means `dependents: 'all'`. `dependents` wins when both are given. */
    moveDependents: z.boolean().default(false),
    dependents: z.enum(DEPENDENT_CHOICES).optional(),
    /** With `dependents: 'within'`: how many days ahead of the stage its dependents move with it. */
    withinDays: z.number().int().min(1, 'must be at least 1 day').max(365, 'must be at most 365 days').optional(),
    /**
     * Sent or confirmed bookings of partner firms, among the stages after it, that the scheduler
     * agreed to move (each partner is asked again). Any other one refuses the move (409), listing them.
     */
    askAgain: z.array(Id).max(500, 'at most 500 bookings').default([]),
  })
  .refine(endsAfterStart, { path: ['endsAt'], message: 'must be after the start' })
  .refine((m) => !m.resourceId || m.bookingId, { path: ['bookingId'], message: 'is required when changing resource' })
  .refine((m) => m.dependents !== 'within' || m.withinDays !== undefined, {
    path: ['withinDays'],
    message: "is required when dependents is 'within'",
  });
export type MoveStage = z.infer<typeof MoveStage>;

/** Which stages after a move go with it, as the move's input says. */
export function dependentChoiceOf(input: Pick<MoveStage, 'dependents' | 'moveDependents'>): DependentChoice {
  return input.dependents ?? (input.moveDependents ? 'all' : 'none');
}

/** A partner firm's sent or confirmed booking that a move touches (it is asked again), named for the scheduler. */
export interface PartnerBookingNote {
  bookingId: string;
  stageName: string;
  jobReference: string;
  resourceName: string;
  firmName: string;
  state: BookingState;
  startsAt: string;
}

/** GET /api/stages/:id/completion: the time (default: the stage's booked start) and the resource just dropped on. */
export const CompletionQuery = z.object({
  resourceId: Id.optional(),
  startsAt: IsoInstant.optional(),
});
export type CompletionQuery = z.infer<typeof CompletionQuery>;

/** A resource offered to complete a stage, with when it would work and, when it can't, why. */
export interface CompletionCandidate {
  resourceId: string;
  name: string;
  firmName: string;
  ownership: 'owned' | 'hired' | 'partner';
  startsAt: string;
  endsAt: string;
  free: boolean;
  /** Why it can't (the engine's first refusal), when not free. */
  reason?: string;
}

/** One requirement of the stage: what is booked, what is proposed, what else there is. */
export interface CompletionRequirement {
  kind: string;
  count: number;
  /** Resources of this kind the stage already has (with the one just dropped). */
  booked: string[];
  /** The engine's choice for the rest: free resources, own before hired before partners'. */
  proposed: CompletionCandidate[];
  /** Other resources of the kind: free ones to swap in, and busy ones with the reason. */
  alternatives: CompletionCandidate[];
  /** How many are still missing when not enough are free. */
  short: number;
}

/** What completing a stage at a time needs (GET /api/stages/:id/completion). */
export interface StageCompletion {
  stageId: string;
  jobId: string;
  stageName: string;
  jobReference: string;
  startsAt: string;
  requirements: CompletionRequirement[];
  /** True when nothing is missing once the proposals are booked. */
  complete: boolean;
}

/** One step of the undo stack kept for a signed-in session (GET /api/undo). */
export interface UndoEntryView {
  id: string;
  label: string;
  at: string;
}

export const RemoveBooking = z.object({ version: z.coerce.number().int().min(1) });

/** What progress a crew (or the office) marks: arrived, done, or either taken back. */
export const PROGRESS_ACTIONS = ['arrive', 'finish', 'undo-arrive', 'undo-finish'] as const;
export type ProgressAction = (typeof PROGRESS_ACTIONS)[number];

/**
 * How long a phone without a signal keeps a step it marked (and the server still takes it): a
 * weekend out of reach, with a day to spare. Older, the office marks it.
 */
export const MARK_KEPT_AT_MOST_MS = 48 * 3_600_000;

/**
 * A crew marks its own work: `{ action, version }`, or the older `{ state: 'on_site' | 'done', version }`
 * (on site = arrive, done = finish). Exactly one of the two is given. `markedMsAgo`: when a phone
 * without a signal kept the step to send later, how long before sending it was marked, by the
 * phone's own clock (a time elapsed stays right on a phone whose clock is set wrong, where a time
 * of day would not); the server counts it back from its own clock.
 */
export const MarkProgress = z
  .object({
    action: z.enum(PROGRESS_ACTIONS).optional(),
    state: z.enum(['on_site', 'done']).optional(),
    version: z.number().int().min(1),
    markedMsAgo: z
      .number()
      .int()
      .min(0, 'must not be negative')
      .max(MARK_KEPT_AT_MOST_MS, `must be within the last ${MARK_KEPT_AT_MOST_MS / 3_600_000} hours`)
      .optional(),
  })
  .refine((m) => (m.action === undefined) !== (m.state === undefined), {
    path: ['action'],
    message: 'give either action or state, not both',
  });
export type MarkProgress = z.infer<typeof MarkProgress>;

/** The state machine's action a progress request asks for. @example progressActionOf({ state: 'done', version: 2 }) // 'finish' */
export function progressActionOf(input: MarkProgress): ProgressAction {
  return input.action ?? (input.state === 'on_site' ? 'arrive' : 'finish');
}

export const BookingView = z.object({
  id: Id,
  stageId: Id,
  jobId: Id,
  resourceId: Id,
  startsAt: z.string(),
  endsAt: z.string(),
  state: z.enum(BOOKING_STATES),
  version: z.number(),
  stageName: z.string(),
  stageKind: z.string(),
  jobReference: z.string(),
  siteTown: z.string(),
});
export type BookingView = z.infer<typeof BookingView>;
