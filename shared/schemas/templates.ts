import { z } from 'zod';
import { INSTALLATION_TYPES } from './jobs.ts';
import { oneLineText } from './common.ts';

const Kind = z
  .string()
  .trim()
  .regex(/^[a-z][a-z0-9_]{1,39}$/, 'must be lower_snake_case');

/** A stage's minutes of work: from a quarter of an hour to 14,400 (ten whole days). */
const WorkMinutes = z
  .number({ message: 'must be a number of minutes' })
  .int('must be whole minutes')
  .min(15, 'must be at least 15 minutes')
  .max(60 * 24 * 10, 'must be at most 14,400 minutes');

export const StageTemplateSchema = z.object({
  kind: Kind,
  name: oneLineText(120).min(1, 'is required'),
  duration: z.discriminatedUnion('kind', [
    z.object({
      kind: z.literal('fixed'),
      minutes: WorkMinutes,
    }),
    z.object({
      kind: z.literal('excavation'),
      fallbackMinutes: WorkMinutes,
    }),
  ]),
  requirements: z
    .array(
      z.object({
        kind: Kind,
        count: z
          .number({ message: 'must be a number' })
          .int('must be a whole number')
          .min(1, 'must be at least 1')
          .max(10, 'must be at most 10'),
      }),
    )
    .max(10),
  cure: z
    .object({
      targetFraction: z
        .number({ message: 'must be a number' })
        .gt(0, 'must be more than 0')
        .max(1, 'must be at most 1 (full strength)'),
    })
    .nullable()
    .optional(),
  /** Notice the stage needs (checked on each job's stage); with resourceKind, that party's booking only. */
  leadTime: z
    .object({
      workingDays: z
        .number({ message: 'must be a number of working days' })
        .int('must be whole working days')
        .min(0, 'cannot be negative')
        .max(250, 'must be at most 250 working days'),
      countedFrom: z.enum(['now', 'order']),
      resourceKind: Kind.nullable().optional(),
      reason: oneLineText(120).nullable().optional(),
    })
    .nullable()
    .optional(),
  when: z.enum(['always', 'crane', 'no_crane']).optional(),
  mayContinueNextDay: z.boolean().optional(),
  justInTime: z.boolean().optional(),
});

export const LinkTemplateSchema = z.object({
  from: Kind,
  to: Kind,
  type: z.enum(['FS', 'SS', 'FF', 'SF']).default('FS'),
  lagAmount: z
    .number({ message: 'must be a number' })
    .min(0, 'cannot be negative')
    .max(1000, 'must be at most 1,000')
    .default(0),
  lagUnit: z.enum(['working_hours', 'working_days', 'elapsed_hours', 'elapsed_days']).default('working_hours'),
  /** The successor loads the base and waits for its cure, not only the lag. */
  waitsForCure: z.boolean().default(false),
});

export const InstallationTypeParams = z.object({ installationType: z.enum(INSTALLATION_TYPES) });

/** PUT /api/templates/:installationType — the whole template and the version it was based on (0 = the default). */
export const PutTemplate = z.object({
  version: z.number().int().min(0),
  name: oneLineText(120).min(1, 'is required'),
  stages: z.array(StageTemplateSchema).min(1, 'needs at least one stage').max(40),
  links: z.array(LinkTemplateSchema).max(200),
});
export type PutTemplate = z.infer<typeof PutTemplate>;
