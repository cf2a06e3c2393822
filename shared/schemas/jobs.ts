import { z } from 'zod';
import { EmailAddress, Id, NAMES_A_CHANGE, OneLine, Paging, WorkDate, multiLineText, oneLineText } from './common.ts';

export const INSTALLATION_TYPES = ['in_ground', 'semi_recessed', 'slab', 'deck'] as const;
export const JOB_STATUSES = ['enquiry', 'surveyed', 'planned', 'in_progress', 'handed_over', 'cancelled'] as const;

/** The longest search the jobs list takes (the box stops there too). */
export const JOB_SEARCH_MAX = 100;

export const JobQuery = Paging.extend({
  search: oneLineText(JOB_SEARCH_MAX).optional(),
  status: z.enum(JOB_STATUSES).optional(),
  installationType: z.enum(INSTALLATION_TYPES).optional(),
  sort: z.enum(['promisedFrom', 'reference', 'customerName', 'status', 'orderedOn']).default('promisedFrom'),
  order: z.enum(['asc', 'desc']).default('asc'),
});
export type JobQuery = z.infer<typeof JobQuery>;

const UkPostcode = OneLine.toUpperCase().regex(
  /^[A-Z]{1,2}[0-9][A-Z0-9]? ?[0-9][A-Z]{2}$/,
  'must be a UK postcode such as LS6 2AB',
);

/** A job's editable fields, without the cross-field rules (zod cannot make a refined object partial). */
export const JobFields = z.object({
  reference: oneLineText(40).min(1, 'is required'),
  customerName: oneLineText(200).min(1, 'is required'),
  customerPhone: oneLineText(40).optional(),
  customerEmail: EmailAddress.optional(),
  siteAddress: oneLineText(500).min(1, 'is required'),
  siteTown: oneLineText(100).min(1, 'is required'),
  sitePostcode: UkPostcode,
  accessNotes: multiLineText(2000).optional(),
  unitId: Id.optional(),
  installationType: z.enum(INSTALLATION_TYPES, { message: 'pick an installation type' }),
  promisedFrom: WorkDate.optional(),
  promisedTo: WorkDate.optional(),
  orderedOn: WorkDate.optional(),
});

const promisedInOrder = (j: { promisedFrom?: string | null | undefined; promisedTo?: string | null | undefined }) =>
  !j.promisedFrom || !j.promisedTo || j.promisedTo >= j.promisedFrom;
const promisedRule = { path: ['promisedTo'], message: 'must be on or after the start of the promised window' };

export const CreateJob = JobFields.refine(promisedInOrder, promisedRule);
export type CreateJob = z.infer<typeof CreateJob>;

/** An optional field an edit may also clear: null empties it (left out, it stays as it is). */
const clearable = <T extends z.ZodType>(field: z.ZodOptional<T>) => field.unwrap().nullable().optional();

/**
 * PATCH /api/jobs/:id: any of the job's fields, and the version the change is based on. An
 * optional field sent as null is cleared. A field it doesn't know is refused (not dropped, so a
 * misspelt one never looks saved), and so is a change that names no field.
 */
export const UpdateJob = JobFields.partial()
  .extend({
    customerPhone: clearable(JobFields.shape.customerPhone),
    customerEmail: clearable(JobFields.shape.customerEmail),
    accessNotes: clearable(JobFields.shape.accessNotes),
    unitId: clearable(JobFields.shape.unitId),
    promisedFrom: clearable(JobFields.shape.promisedFrom),
    promisedTo: clearable(JobFields.shape.promisedTo),
    orderedOn: clearable(JobFields.shape.orderedOn),
    version: z.number().int().min(1),
    status: z.enum(JOB_STATUSES).optional(),
  })
  .strict()
  .refine(...NAMES_A_CHANGE)
  .refine(promisedInOrder, promisedRule);
export type UpdateJob = z.infer<typeof UpdateJob>;

/** GET /api/job-references/next: the prefix to count in (default: the prefix of the firm's latest job). */
export const NextReferenceQuery = z.object({
  prefix: oneLineText(30)
    .regex(/^[^0-9]*$|^.*[^0-9]$/, 'must not end in a digit')
    .optional(),
});
export type NextReferenceQuery = z.infer<typeof NextReferenceQuery>;

/** The reference a new job would get: the highest of its prefix + 1, the digits as wide as before. */
export interface NextReference {
  prefix: string;
  nextReference: string;
}

export const JobSummary = z.object({
  id: Id,
  reference: z.string(),
  customerName: z.string(),
  siteTown: z.string(),
  unitName: z.string().nullable(),
  installationType: z.enum(INSTALLATION_TYPES),
  status: z.enum(JOB_STATUSES),
  promisedFrom: z.string().nullable(),
  promisedTo: z.string().nullable(),
  orderedOn: z.string().nullable(),
});
export type JobSummary = z.infer<typeof JobSummary>;
