import { z } from 'zod';
import { ROLES } from '../permissions.ts';
import { EmailAddress, Id, WorkInstant } from './common.ts';

export const ANSWER_ACTIONS = ['confirm', 'decline', 'propose'] as const;
export type AnswerActionName = (typeof ANSWER_ACTIONS)[number];

/** The scheduler's publish, cancel and proposal decisions name the version they were made on. */
export const VersionBody = z.object({ version: z.number().int().min(1) });
export type VersionBody = z.infer<typeof VersionBody>;

/** A partner's answer to a booking request. A proposal names the time that would suit. */
export const PartnerAnswer = z.object({
  action: z.enum(ANSWER_ACTIONS),
  proposedStart: WorkInstant.optional(),
  proposedEnd: WorkInstant.optional(),
}).refine((a) => a.action !== 'propose' || (a.proposedStart && a.proposedEnd), { path: ['proposedStart'], message: 'a proposal needs a start and an end' })
  .refine((a) => !a.proposedStart || !a.proposedEnd || Date.parse(a.proposedEnd) > Date.parse(a.proposedStart), { path: ['proposedEnd'], message: 'must be after the start' });
export type PartnerAnswer = z.infer<typeof PartnerAnswer>;

export const AssignPerson = z.object({ resourceId: Id });
export type AssignPerson = z.infer<typeof AssignPerson>;

export const CreateInvitation = z.object({
  email: EmailAddress.transform((e) => e.toLowerCase()),
  role: z.enum(ROLES),
});
export type CreateInvitation = z.infer<typeof CreateInvitation>;

export const SlotQuery = z.object({ from: WorkInstant.optional() });

/** The latest answer to a booking, as the board shows it. */
export const BookingAnswerView = z.object({
  id: Id,
  action: z.enum(ANSWER_ACTIONS),
  version: z.number(),
  via: z.enum(['link', 'app']),
  at: z.string(),
  proposedStart: z.string().nullable(),
  proposedEnd: z.string().nullable(),
  proposalStatus: z.enum(['open', 'accepted', 'refused']).nullable(),
});
export type BookingAnswerView = z.infer<typeof BookingAnswerView>;

export const BookingAnswerFields = z.object({
  answer: BookingAnswerView.nullable(),
  /** A request for the current version went unanswered past REMINDER_HOURS (a reminder has gone). */
  overdue: z.boolean(),
});
export type BookingAnswerFields = z.infer<typeof BookingAnswerFields>;

/** One slot in a partner's own list: only what the day needs, never the householder's contact or prices. */
export const PartnerSlot = z.object({
  id: Id,
  version: z.number(),
  state: z.string(),
  startsAt: z.string(),
  endsAt: z.string(),
  timeZone: z.string(),
  stage: z.object({ name: z.string(), kind: z.string() }),
  resource: z.object({ id: Id, name: z.string(), kind: z.string() }),
  site: z.object({ address: z.string(), town: z.string(), postcode: z.string(), accessNotes: z.string().nullable() }),
  installer: z.object({ name: z.string(), phone: z.string().nullable() }),
  cautions: z.array(z.string()),
  answer: BookingAnswerView.nullable(),
});
export type PartnerSlot = z.infer<typeof PartnerSlot>;
