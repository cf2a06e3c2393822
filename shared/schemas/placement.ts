import { z } from 'zod';
import { Id } from './common.ts';
import type { AutoPlaceResult, Slot } from '../scheduler/index.ts';

/** A resource kind as stages and resources name it: `excavator`, `install_crew`, `pallet_truck`. */
export const ResourceKind = z
  .string()
  .regex(/^[a-z][a-z0-9_]{0,39}$/, 'must be a resource kind such as excavator or install_crew');

/**
 * POST /api/plan/slots: where a stage could go. On one resource (`resourceId`), on any resource of
 * one kind (`resourceKind`), or, with neither, on each kind the stage needs.
 */
export const SlotSearch = z
  .object({
    stageId: Id,
    resourceKind: ResourceKind.optional(),
    resourceId: Id.optional(),
    /** How many slots after the earliest one, per kind (the engine's default is 3). */
    alternatives: z
      .number()
      .int('must be a whole number')
      .min(0, 'must be 0 or more')
      .max(10, 'must be at most 10')
      .default(3),
  })
  .strict()
  .refine((s) => s.resourceKind === undefined || s.resourceId === undefined, {
    path: ['resourceId'],
    message: 'give either resourceKind or resourceId, not both',
  });
export type SlotSearch = z.infer<typeof SlotSearch>;

/** A slot as the server returns it: where, when (epoch ms, as the board's data) and what it costs. */
export type SlotView = Omit<Slot, 'bookings'>;

/** The slots of one kind the stage needs. */
export interface KindSlots {
  kind: string;
  slots: SlotView[];
}

/** What POST /api/plan/slots returns. */
export interface SlotAnswer {
  stageId: string;
  /** How far ahead the search looked, in days from each resource's first possible start. */
  horizonDays: number;
  kinds: KindSlots[];
}

/** POST /api/plan/auto-place: place the unbooked stages of these jobs. */
export const AutoPlaceRequest = z
  .object({
    jobIds: z
      .array(Id)
      .min(1, 'needs at least one job')
      .max(20, 'at most 20 jobs at once')
      .refine((ids) => new Set(ids).size === ids.length, 'names a job twice'),
    /** How long the planner may search beyond its first plan, in milliseconds of its reference machine (0: the first plan alone). */
    budgetMs: z
      .number()
      .int('must be a whole number')
      .min(0, 'must be 0 or more')
      .max(60_000, 'must be at most 60000')
      .optional(),
    /** The caller's name for this run: progress events on the caller's board stream carry it. */
    planId: z
      .string()
      .regex(/^[A-Za-z0-9-]{8,64}$/, 'must be 8 to 64 letters, digits or hyphens')
      .optional(),
  })
  .strict();
export type AutoPlaceRequest = z.infer<typeof AutoPlaceRequest>;

/**
 * What POST /api/plan/auto-place returns: the engine's proposal (instants in epoch ms, new
 * pencilled bookings with placeholder ids), never saved. The board books `bookings` through
 * POST /api/bookings/batch, the guarded write path.
 */
export interface AutoPlaceAnswer extends AutoPlaceResult {
  horizonDays: number;
}

/** The `plan-progress` event on the board stream while an auto-place of the caller's runs. */
export interface PlanProgress {
  planId: string;
  /** The first plan, the search for better ones, or placing the best ones for real. */
  phase: 'single-pass' | 'search' | 'placing';
  /** Plans tried so far. */
  schedules: number;
  /** Share of the budget used, 0–1. */
  used: number;
}
