import { z } from 'zod';
import { WorkInstant } from './common.ts';

const MAX_DAYS = 100;

/** The span of a report: ISO instants, `to` after `from`, at most 100 days (the board's limit). */
export const ReportQuery = z
  .object({
    from: WorkInstant,
    to: WorkInstant,
  })
  .refine((r) => Date.parse(r.to) > Date.parse(r.from), { path: ['to'], message: 'must be after from' })
  .refine((r) => Date.parse(r.to) - Date.parse(r.from) <= MAX_DAYS * 86_400_000, {
    path: ['to'],
    message: `range may span at most ${MAX_DAYS} days`,
  });
export type ReportQuery = z.infer<typeof ReportQuery>;
