import { z } from 'zod';
import { INSTALLATION_TYPES } from './jobs.ts';
import { oneLineText } from './common.ts';

const Kind = z
  .string()
  .trim()
  .regex(/^[a-z][a-z0-9_]{1,39}$/, 'must be lower_snake_case');

export const StageTemplateSchema = z.object({
  kind: Kind,
  name: oneLineText(120).min(1, 'is required'),
  duration: z.discriminatedUnion('kind', [
    z.object({
      kind: z.literal('fixed'),
      minutes: z
        .number()
        .int()
        .min(15)
        .max(60 * 24 * 10),
    }),
    z.object({
      kind: z.literal('excavation'),
      fallbackMinutes: z
        .number()
        .int()
        .min(15)
        .max(60 * 24 * 10),
    }),
  ]),
  requirements: z.array(z.object({ kind: Kind, count: z.number().int().min(1).max(10) })).max(10),
  cure: z
    .object({ targetFraction: z.number().gt(0).max(1) })
    .nullable()
    .optional(),
  /** Notice the stage needs (checked on each job's stage); with resourceKind, that party's booking only. */
  leadTime: z
    .object({
      workingDays: z.number().int().min(0).max(250),
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
  lagAmount: z.number().min(0).max(1000).default(0),
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
