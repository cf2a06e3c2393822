import { z } from 'zod';
import { Id, oneLineText, requiredAs } from './common.ts';
import { ResourceKind } from './placement.ts';

export const RESOURCE_CATEGORIES = ['crew', 'person', 'machine'] as const;

/**
 * The kinds stages ask for, as the add form offers them by category (the stage templates' own
 * kinds; any other may be typed, as long as a stage asks for it by the same word).
 */
export const USUAL_RESOURCE_KINDS = {
  crew: ['install_crew', 'groundworks_crew'],
  person: ['electrician', 'lift_planner', 'surveyor'],
  machine: ['excavator', 'dumper', 'pallet_truck', 'rollers', 'crane', 'lorry', 'spoil_removal'],
} as const satisfies Record<(typeof RESOURCE_CATEGORIES)[number], readonly string[]>;

/**
 * POST /api/resources: a crew, person or machine of the caller's own firm, booked from then on.
 * It works the firm's standard week (its first working calendar).
 */
export const CreateResource = z
  .object({
    name: oneLineText(80).min(1, 'is required'),
    category: z.enum(RESOURCE_CATEGORIES, { message: 'must be a crew, a person or a machine' }),
    kind: ResourceKind,
    ownership: z.enum(['owned', 'hired'], { message: 'must be owned or hired' }).default('owned'),
    phone: oneLineText(40).optional(),
  })
  .strict();
export type CreateResource = z.infer<typeof CreateResource>;

/**
 * PATCH /api/resources/:id: a new name for one of the firm's own resources. `previousName` is the
 * name the page showed: a rename by someone else meanwhile is refused (409), not overwritten.
 */
export const RenameResource = z
  .object({
    name: oneLineText(80).min(1, 'is required'),
    previousName: z.string(requiredAs('the name the page showed')).max(200),
  })
  .strict();
export type RenameResource = z.infer<typeof RenameResource>;

/**
 * PUT /api/resources/:id/members: the people in one of the firm's own crews (its person rows).
 * `previousPersonIds` is the list the page showed: a change made meanwhile is refused (409), not
 * overwritten.
 */
export const SetCrewMembers = z
  .object({
    personIds: z.array(Id).max(50, 'may list at most 50 people'),
    previousPersonIds: z.array(Id).max(50, 'may list at most 50 people'),
  })
  .strict();
export type SetCrewMembers = z.infer<typeof SetCrewMembers>;

/** A person of the firm as a crew's page lists them. */
export interface CrewPerson {
  id: string;
  name: string;
  /** The firm's other crews the person is in (by name). */
  alsoIn: string[];
}

/** GET /api/resources/:id/members: who is in the crew, and the firm's people who could be. */
export interface CrewMembers {
  crewId: string;
  members: CrewPerson[];
  people: CrewPerson[];
}
