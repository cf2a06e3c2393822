import { z } from 'zod';
import { EmailAddress, oneLineText, requiredAs } from './common.ts';
import { HANDOVER_ITEM_IDS, type HandoverItemId } from '../handover.ts';
import type { ServicePlan } from '../service-plan.ts';

/** Largest signature image accepted, as a base64 data URL (a 390 px pad's PNG is a few kB). */
export const MAX_SIGNATURE_CHARS = 400_000;

const ticked = z.literal(true, { message: 'must be gone through with the householder' });

/** POST /api/jobs/:id/handover: every checklist item gone through, the householder's name and signature. */
export const SignHandover = z.object({
  checklist: z
    .object(Object.fromEntries(HANDOVER_ITEM_IDS.map((id) => [id, ticked])) as Record<HandoverItemId, typeof ticked>)
    .strict(),
  householderName: oneLineText(200).pipe(z.string().min(1, 'is required')),
  /** Where the pack goes; left out, the e-mail on the job. */
  householderEmail: EmailAddress.optional(),
  /** The signature drawn on the pad, as a PNG data URL. */
  signature: z
    .string(requiredAs('ask the householder to sign'))
    .max(MAX_SIGNATURE_CHARS, 'is too large')
    .regex(/^data:image\/png;base64,[A-Za-z0-9+/]+=*$/, 'must be a PNG image from the signature pad'),
});
export type SignHandover = z.infer<typeof SignHandover>;

/** PUT /api/firm/service-plan: the whole plan, and the version it was based on (GET gives it). */
export const PutServicePlan = z
  .object({
    version: z.number(requiredAs('the version of the plan you loaded')).int().min(0),
    firstAfterMonths: z
      .number()
      .int('must be whole months')
      .min(1, 'must be at least 1 month')
      .max(36, 'must be at most 36 months'),
    everyMonths: z
      .number()
      .int('must be whole months')
      .min(1, 'must be at least 1 month')
      .max(60, 'must be at most 60 months'),
    visitsAhead: z
      .number()
      .int('must be a whole number')
      .min(1, 'must be at least 1 visit')
      .max(5, 'must be at most 5 visits'),
  })
  .strict();
export type PutServicePlan = z.infer<typeof PutServicePlan>;

export interface ServicePlanView extends ServicePlan {
  isDefault: boolean;
  source: string;
  /** Counts the plan's saves (0: never saved); a save based on an older one is refused. */
  version: number;
}

/** GET /api/jobs/:id/handover: what the page needs, and the handover once signed. */
export interface HandoverView {
  job: {
    id: string;
    reference: string;
    customerName: string;
    siteTown: string;
    unitName: string | null;
    kind: 'install' | 'service';
  };
  /** The job's e-mail for the office; for crew only a hint ("m…@home.example"), as the read policy says. */
  householderEmail: string | null;
  householderEmailHint: string | null;
  /** The handover stage's bookings the reader may mark done, and whether they are. */
  stageBooked: boolean;
  /**
   * What the job still needs before the householder signs (commissioning done, the electrical
   * certificate), in plain words; empty when ready. Signing is refused until it is.
   */
  notReady: string[];
  signed: null | {
    signedAt: string;
    householderName: string;
    signedBy: string | null;
    serviceVisits: { jobId: string; reference: string; dueOn: string }[];
    packEmailed: boolean;
  };
}

export interface SignHandoverResult {
  signedAt: string;
  packFileId: string;
  serviceVisits: { jobId: string; reference: string; dueOn: string }[];
  balanceRequested: boolean;
}
