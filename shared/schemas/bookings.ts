import { z } from 'zod';
import { Id, IsoInstant } from './common.ts';

export const BOOKING_STATES = ['pencilled', 'sent', 'confirmed', 'declined', 'on_site', 'done'] as const;
export type BookingState = (typeof BOOKING_STATES)[number];

export const BookingRange = z.object({
  from: IsoInstant,
  to: IsoInstant,
}).refine((r) => Date.parse(r.to) > Date.parse(r.from), { path: ['to'], message: 'must be after from' })
  .refine((r) => Date.parse(r.to) - Date.parse(r.from) <= 1000 * 60 * 60 * 24 * 100, { path: ['to'], message: 'range may span at most 100 days' });

const times = <T extends { startsAt: string; endsAt: string }>(b: T) => Date.parse(b.endsAt) > Date.parse(b.startsAt);

const endsAfterStart = (b: { startsAt: string; endsAt?: string | undefined }) => b.endsAt === undefined || Date.parse(b.endsAt) > Date.parse(b.startsAt);

/** A stage booked on a resource; without `endsAt` the stage's working duration on that resource's calendar is used. */
export const CreateBooking = z.object({
  stageId: Id,
  resourceId: Id,
  startsAt: IsoInstant,
  endsAt: IsoInstant.optional(),
  state: z.enum(['pencilled', 'confirmed']).default('pencilled'),
}).refine(endsAfterStart, { path: ['endsAt'], message: 'must be after the start' });
export type CreateBooking = z.infer<typeof CreateBooking>;

export const UpdateBooking = z.object({
  version: z.number().int().min(1),
  resourceId: Id.optional(),
  startsAt: IsoInstant,
  endsAt: IsoInstant,
  state: z.enum(BOOKING_STATES).optional(),
}).refine(times, { path: ['endsAt'], message: 'must be after the start' });
export type UpdateBooking = z.infer<typeof UpdateBooking>;

export const CreateBookings = z.object({
  bookings: z.array(CreateBooking).min(1, 'needs at least one booking').max(500, 'at most 500 bookings at once'),
});
export type CreateBookings = z.infer<typeof CreateBookings>;

/** A drag on the board: all of a stage's bookings move together; optionally one changes resource. */
export const MoveStage = z.object({
  startsAt: IsoInstant,
  endsAt: IsoInstant.optional(),
  resourceId: Id.optional(),
  bookingId: Id.optional(),
  /** The version of each booking the move was based on: any newer one refuses the move (409). */
  versions: z.record(Id, z.number().int().min(1)),
  moveDependents: z.boolean().default(false),
}).refine(endsAfterStart, { path: ['endsAt'], message: 'must be after the start' })
  .refine((m) => !m.resourceId || m.bookingId, { path: ['bookingId'], message: 'is required when changing resource' });
export type MoveStage = z.infer<typeof MoveStage>;

export const RemoveBooking = z.object({ version: z.coerce.number().int().min(1) });

/** A crew marks its own work: arrived on site, then done. */
export const MarkProgress = z.object({
  state: z.enum(['on_site', 'done']),
  version: z.number().int().min(1),
});
export type MarkProgress = z.infer<typeof MarkProgress>;

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
