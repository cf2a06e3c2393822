import { z } from 'zod';
import { ROLES } from '../permissions.ts';
import { EmailAddress, Id, WorkInstant, oneLineText } from './common.ts';

export const ANSWER_ACTIONS = ['confirm', 'decline', 'propose'] as const;
export type AnswerActionName = (typeof ANSWER_ACTIONS)[number];

/** The scheduler's publish, cancel and proposal decisions name the version they were made on. */
export const VersionBody = z.object({ version: z.number().int().min(1) });
export type VersionBody = z.infer<typeof VersionBody>;

/** The longest reason a partner may give with a decline or a proposal, in characters. */
export const ANSWER_REASON_MAX = 500;

/** Quick choices the decline forms offer (the page behind the e-mailed link and the partner's own page). */
export const DECLINE_REASON_CHOICES = ['Not free that day', 'Too short notice', 'Job not for us'] as const;

/** The label of the reason field, the same on every form: the partner should know who reads it. */
export const REASON_LABEL = 'Why? (optional — the installer sees this)';

/**
 * Why a partner declines or proposes another time, in their own words: one line, trimmed, no
 * control characters, at most ANSWER_REASON_MAX characters; empty is no reason.
 */
export const AnswerReason = oneLineText(ANSWER_REASON_MAX).transform((s) => s || undefined);

/**
 * The reason a form sends: a quick choice, the partner's own words, or both joined.
 * @example reasonText('Not free that day', 'we are at a wedding') // 'Not free that day — we are at a wedding'
 */
export function reasonText(choice: string | null | undefined, text: string | null | undefined): string {
  return [choice?.trim(), text?.trim()].filter(Boolean).join(' — ');
}

/** The slot's version as the partner's page loaded it (GET /api/partner/slots `version`). */
const SlotVersion = z
  .number({ message: 'must be the slot’s version as loaded (GET /api/partner/slots)' })
  .int('must be the slot’s version as loaded (GET /api/partner/slots)')
  .min(1, 'must be the slot’s version as loaded (GET /api/partner/slots)');

/**
 * A partner's answer to a booking request. A proposal names the time that would suit; a decline or
 * proposal may say why. `version` is the slot as the partner saw it: a slot the installer has moved
 * or changed since is not confirmed unseen (409 stale-version), as a signed link names its version.
 */
export const PartnerAnswer = z
  .object({
    version: SlotVersion,
    action: z.enum(ANSWER_ACTIONS),
    proposedStart: WorkInstant.optional(),
    proposedEnd: WorkInstant.optional(),
    reason: AnswerReason.optional(),
  })
  .refine((a) => a.action !== 'propose' || (a.proposedStart && a.proposedEnd), {
    path: ['proposedStart'],
    message: 'a proposal needs a start and an end',
  })
  .refine((a) => !a.proposedStart || !a.proposedEnd || Date.parse(a.proposedEnd) > Date.parse(a.proposedStart), {
    path: ['proposedEnd'],
    message: 'must be after the start',
  });
export type PartnerAnswer = z.infer<typeof PartnerAnswer>;

/** PUT /api/partner/slots/:id/person: which of the partner's people does the slot, on the slot as loaded. */
export const AssignPerson = z.object({ resourceId: Id, version: SlotVersion });
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
  /** The partner's own words with a decline or proposal; null when none was given. */
  reason: z.string().nullable(),
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
  /** The installer's job, by the reference its e-mails give (what the partner quotes on the phone). */
  job: z.object({ reference: z.string() }),
  /** The unit and, for electrical work, the house's supply and the unit's load as lines (shared/slot-supply.ts). */
  unit: z.string().nullable(),
  supply: z.array(z.string()).nullable(),
  /** Which way the unit faces, for the delivery, lift and placement (shared/unit-facing.ts); null for other work. */
  facing: z.string().nullable(),
  /** Whom to call on the day, as the read policy gives it (the householder only where the installer shares it). */
  contacts: z.array(z.object({ name: z.string(), phone: z.string().nullable(), role: z.string() })),
  cautions: z.array(z.string()),
  answer: BookingAnswerView.nullable(),
  /** An electrical connection: whether it takes a certificate, and the one this firm uploaded (null: none yet). */
  certificate: z
    .object({ wanted: z.boolean(), uploaded: z.object({ name: z.string(), uploadedAt: z.string() }).nullable() })
    .optional(),
  /**
   * The firm's own time away that falls in the slot, in words ("Priya Nair is marked away then
   * (Training)", "Your firm is closed then (Works shutdown)"); null when the slot's person is free.
   */
  away: z.string().nullable().optional(),
});
export type PartnerSlot = z.infer<typeof PartnerSlot>;
