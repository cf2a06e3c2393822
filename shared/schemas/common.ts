import { z } from 'zod';

/** Database ids travel as decimal strings (bigint columns). */
export const Id = z.string().regex(/^[1-9][0-9]{0,17}$/, 'must be a numeric id');
export type Id = z.infer<typeof Id>;

export const IsoInstant = z.iso.datetime({ offset: true, message: 'must be an ISO 8601 date-time with an offset, e.g. 2026-05-12T08:00:00Z' });
export const IsoDate = z.iso.date({ message: 'must be a date like 2026-05-12' });

export const IdParams = z.object({ id: Id });

export const Paging = z.object({
  page: z.coerce.number().int().min(1).default(1),
  pageSize: z.coerce.number().int().min(1).max(200).default(20),
});

/** RFC 9457 problem details as the API sends them. */
export const Problem = z.object({
  type: z.string(),
  title: z.string(),
  status: z.number(),
  detail: z.string().optional(),
  errors: z.array(z.object({ field: z.string(), message: z.string() })).optional(),
});
export type Problem = z.infer<typeof Problem>;
