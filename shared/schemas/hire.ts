import { z } from 'zod';
import { Id, namesAChange, requiredAs, WorkInstant } from './common.ts';
import type { AffectedBooking } from './absences.ts';

const pence = (what: string) =>
  z
    .number({ message: `${what} must be a whole number of pence` })
    .int(`${what} must be a whole number of pence`)
    .min(0, `${what} can't be negative`)
    .max(100_000_000, `${what} is too large`);

/** A hire period the manager records: which machine, from which supplier, when, at what price. */
export const CreateHirePeriod = z
  .object({
    supplierFirmId: Id,
    resourceId: Id,
    onHireAt: WorkInstant,
    offHireAt: WorkInstant,
    dayRatePence: pence('The day rate'),
    deliveryPence: pence('The delivery charge').default(0),
    collectionPence: pence('The collection charge').default(0),
    /** Record it already approved (the manager's own hire) or as requested. */
    approve: z.boolean().default(false),
    /** The manager was told it overlaps another hire of the machine, and records it as well. */
    alsoOverlapping: z.boolean().default(false),
  })
  .refine((h) => Date.parse(h.offHireAt) > Date.parse(h.onHireAt), {
    path: ['offHireAt'],
    message: 'must be after the on-hire',
  });
export type CreateHirePeriod = z.infer<typeof CreateHirePeriod>;

/** Approve, end or change a hire period; `version` is the one the change was based on. */
export const UpdateHirePeriod = z
  .object({
    version: z.number(requiredAs('the version of the hire you loaded')).int().min(1),
    status: z.enum(['approved', 'ended']).optional(),
    onHireAt: WorkInstant.optional(),
    offHireAt: WorkInstant.optional(),
    dayRatePence: pence('The day rate').optional(),
    deliveryPence: pence('The delivery charge').optional(),
    collectionPence: pence('The collection charge').optional(),
    /** As on recording one: new days that overlap another hire of the machine are saved as well. */
    alsoOverlapping: z.boolean().optional(),
  })
  // A field it doesn't take is refused, not dropped, and so is a change that names no field.
  .strict()
  .refine(...namesAChange('alsoOverlapping'))
  .refine(
    (h) => h.onHireAt === undefined || h.offHireAt === undefined || Date.parse(h.offHireAt) > Date.parse(h.onHireAt),
    { path: ['offHireAt'], message: 'must be after the on-hire' },
  );
export type UpdateHirePeriod = z.infer<typeof UpdateHirePeriod>;

/** DELETE /api/hire-periods/:id?version=N: cancels a hire not yet started, from the version the page showed. */
export const CancelHirePeriod = z.object({
  version: z
    .string(requiredAs('the version of the hire you loaded'))
    .regex(/^[1-9]\d{0,8}$/, 'must be a whole number from 1')
    .transform(Number),
});

/** What cancelling a hire answers: the machine's bookings from now on it leaves off hire. */
export interface HirePeriodCancelled {
  affected: AffectedBooking[];
}

/** A hire period as the API returns it. */
export interface HirePeriodView {
  id: string;
  resourceId: string;
  hirerFirmId: string;
  supplierFirmId: string;
  onHireAt: string;
  offHireAt: string;
  dayRatePence: number;
  deliveryPence: number;
  collectionPence: number;
  status: 'requested' | 'approved' | 'ended';
  approvedBy: string | null;
  version: number;
  updatedAt: string;
}

/**
 * What PATCH /api/hire-periods/:id answers: the hire as changed, and the machine's bookings from
 * now on that its new dates leave outside every hire of the machine (the board flags them).
 */
export interface HirePeriodSaved {
  hire: HirePeriodView;
  affected: AffectedBooking[];
}
