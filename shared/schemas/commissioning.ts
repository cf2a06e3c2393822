import { z } from 'zod';
import { Id, multiLineText } from './common.ts';
import { SANITISER_KINDS, type ReadingCheck, type WaterTargets } from '../water-balance.ts';
import type { FileView } from './files.ts';

const reading = (label: string, max: number) =>
  z
    .number({ message: `${label} must be a number` })
    .min(0, 'cannot be negative')
    .max(max, `must be at most ${max}`)
    .nullable()
    .default(null);

/** The checks of the commissioning record, each ticked or not. */
export const CommissioningChecks = z.object({
  pumpsPrimed: z.boolean().default(false),
  pumpsTested: z.boolean().default(false),
  heaterWorking: z.boolean().default(false),
  lightsWorking: z.boolean().default(false),
  noLeaks: z.boolean().default(false),
});
export type CommissioningChecks = z.infer<typeof CommissioningChecks>;

/**
 * PUT /api/jobs/:id/commissioning: the whole record as the phone has it, saved as the crew goes.
 * `version` is the one the page loaded (0 when there was no record yet): an older one is 409.
 * Readings left empty are null; pH is 0–14, alkalinity ≤ 1000 ppm, sanitiser ≤ 100 ppm.
 */
export const PutCommissioning = z.object({
  version: z.number().int().min(0),
  checks: CommissioningChecks,
  ph: reading('pH', 14),
  totalAlkalinityPpm: reading('Total alkalinity', 1000),
  sanitiserPpm: reading('Sanitiser', 100),
  sanitiserKind: z.enum(SANITISER_KINDS, { message: 'must be chlorine or bromine' }).nullable().default(null),
  notes: multiLineText(2000).nullable().default(null),
  /** The job's photos that belong to the record (uploaded through the job's files first). */
  photoFileIds: z.array(Id).max(20, 'at most 20 photos').default([]),
});
export type PutCommissioning = z.infer<typeof PutCommissioning>;

/** What GET and PUT /api/jobs/:id/commissioning answer. */
export interface CommissioningView {
  jobId: string;
  jobReference: string;
  /** 0 until the first save. */
  version: number;
  checks: CommissioningChecks;
  ph: number | null;
  totalAlkalinityPpm: number | null;
  sanitiserPpm: number | null;
  sanitiserKind: (typeof SANITISER_KINDS)[number] | null;
  notes: string | null;
  photos: FileView[];
  recordedBy: string | null;
  updatedAt: string | null;
  completedAt: string | null;
  targets: WaterTargets;
  readings: ReadingCheck[];
  /** What still stops the commission stage being marked done (empty when complete). */
  gaps: string[];
  cautions: string[];
  /** Whether this reader may change it (the office, or the crew booked on the commission stage). */
  canEdit: boolean;
}

/**
 * PUT /api/jobs/:id/certificate-waiver: why the job may be handed over without the certificate (null
 * takes it back). `reasonWas` is the reason as the page loaded it (null: none), so a reason someone
 * else has recorded or taken back since is not quietly replaced (409).
 */
export const PutCertificateWaiver = z.object({
  reason: multiLineText(1000).pipe(z.string().min(1, 'say why')).nullable(),
  reasonWas: z
    .string({ message: 'must be the reason as loaded (GET waiver.reason), or null when there was none' })
    // No stored reason is longer than the reason allows: a longer one can only be a mistake.
    .max(1000, 'must be at most 1000 characters (the reason as loaded)')
    .nullable(),
});
export type PutCertificateWaiver = z.infer<typeof PutCertificateWaiver>;

/** The electrical certificate of a job as the installer reads it. */
export interface CertificateView {
  jobId: string;
  certificate: { fileId: string; name: string; uploadedAt: string; uploadedByFirm: string; url: string } | null;
  waiver: { reason: string; by: string | null; at: string } | null;
}
