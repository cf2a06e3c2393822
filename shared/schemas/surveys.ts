import { z } from 'zod';
import { IsoInstant, multiLineText, oneLineText } from './common.ts';
import { EXCAVATOR_SIZES, GROUND_TYPES } from '../quantities/settings.ts';
import { EARTHING_ARRANGEMENTS } from '../quantities/supply.ts';

// The ground types live with the quantities (they set the digging rate); kept exported from here for the forms.
export { GROUND_TYPES, type GroundType } from '../quantities/settings.ts';
export { EARTHING_ARRANGEMENTS, type EarthingArrangement } from '../quantities/supply.ts';

const mm = (label: string, max: number) =>
  z
    .number({ message: `${label} must be a number of millimetres` })
    .int('must be whole millimetres')
    .min(1, 'must be more than 0')
    .max(max, `must be at most ${max} mm`);
const metres = z
  .number({ message: 'must be a number of metres' })
  .min(0, 'cannot be negative')
  .max(500, 'must be at most 500 m');
/** A large load already on the house's supply, at its rated current; null when there is none. */
const loadAmps = z
  .number({ message: 'must be a number of amps' })
  .int('must be whole amps')
  .min(1, 'must be more than 0')
  .max(100, 'must be at most 100 A')
  .nullable()
  .default(null);

/**
 * What the surveyor records on site. Shared by the phone form and PUT /api/jobs/:id/survey.
 * Empty optional fields are null, so clearing a field on the form clears it on the server.
 */
export const SurveyFields = z
  .object({
    /** Narrowest width and height along the route from the road to the position. */
    accessWidthMm: mm('Narrowest width', 20_000),
    /** null when nothing limits the height. */
    accessHeightMm: mm('Narrowest height', 20_000).nullable().default(null),
    steps: z.number().int('must be a whole number').min(0, 'cannot be negative').max(200).default(0),
    gates: z.number().int('must be a whole number').min(0, 'cannot be negative').max(20).default(0),
    overheadObstructions: z.boolean().default(false),
    overheadNotes: multiLineText(1000).nullable().default(null),
    groundType: z.enum(GROUND_TYPES, { message: 'pick a ground type' }),
    buriedServicesNotes: multiLineText(2000).nullable().default(null),
    craneStandingPosition: oneLineText(500).nullable().default(null),
    /**
     * Which way the unit faces: its controls and service side ("controls towards the house"). It
     * can't be turned once in a pit, so it is settled with the householder before the lift.
     */
    unitFacing: oneLineText(200).nullable().default(null),
    craneDistanceToSetDownM: metres.nullable().default(null),
    consumerUnitDistanceM: metres.nullable().default(null),
    /** Where the consumer unit is, in a few words ("Garage, left of the door"): the electrician plans the run from it. */
    consumerUnitLocation: oneLineText(120).nullable().default(null),
    mainFuseAmps: z
      .number({ message: 'must be a number of amps' })
      .int('must be whole amps')
      .min(1, 'must be more than 0')
      .max(400, 'must be at most 400 A')
      .nullable()
      .default(null),
    drainage: oneLineText(1000).nullable().default(null),
    /** The surveyor's own call on a crane; null leaves it to the access check. */
    craneRequired: z.boolean().nullable().default(null),
    excavatorSize: z.enum(EXCAVATOR_SIZES).nullable().default(null),
    /** Large loads already on the supply, for the supply check against the main fuse. */
    evChargerAmps: loadAmps,
    electricShowerAmps: loadAmps,
    heatPumpAmps: loadAmps,
    otherLargeLoadAmps: loadAmps,
    otherLargeLoadNotes: oneLineText(200).nullable().default(null),
    /** How the house is earthed, as read at the meter or consumer unit; null when not recorded. */
    earthingArrangement: z
      .enum(EARTHING_ARRANGEMENTS, { message: 'pick an earthing arrangement' })
      .nullable()
      .default(null),
    /** Hose flow at the tap the unit will be filled from (time a bucket); null leaves the firm's default. */
    hoseFlowLitresPerMinute: z
      .number({ message: 'must be a number of litres a minute' })
      .gt(0, 'must be more than 0')
      .max(200, 'must be at most 200 L/min')
      .nullable()
      .default(null),
    /** Where the site is, WGS84 degrees (the phone's position or typed): its weather forecast sets the cure. */
    siteLatitude: z
      .number({ message: 'must be a latitude in degrees' })
      .min(-90, 'must be between −90 and 90 degrees')
      .max(90, 'must be between −90 and 90 degrees')
      .nullable()
      .default(null),
    siteLongitude: z
      .number({ message: 'must be a longitude in degrees' })
      .min(-180, 'must be between −180 and 180 degrees')
      .max(180, 'must be between −180 and 180 degrees')
      .nullable()
      .default(null),
    notes: multiLineText(4000).nullable().default(null),
    surveyedAt: IsoInstant.optional(),
  })
  .refine((s) => !s.overheadObstructions || Boolean(s.overheadNotes?.trim()), {
    path: ['overheadNotes'],
    message: 'say what is overhead (lines, trees, eaves)',
  })
  .refine((s) => (s.siteLatitude === null) === (s.siteLongitude === null), {
    path: ['siteLongitude'],
    message: 'give both the latitude and the longitude, or neither',
  });
export type SurveyFields = z.infer<typeof SurveyFields>;
export type SurveyInput = z.input<typeof SurveyFields>;

/** PUT body: the fields and the version they were based on (0 for the first survey). */
export const PutSurvey = z.object({ version: z.number().int().min(0), survey: SurveyFields });
export type PutSurvey = z.infer<typeof PutSurvey>;

export interface SurveyView extends SurveyFields {
  jobId: string;
  surveyedAt: string;
  surveyedBy: { id: string; name: string } | null;
  version: number;
}
