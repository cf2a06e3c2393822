import { z } from 'zod';
import './messages.ts';
import { BLOCK_LAYINGS, EXCAVATOR_SIZES, GROUND_TYPES } from '../quantities/settings.ts';
import type { WaterTargets } from '../water-balance.ts';

const positive = z.number().gt(0);

/** A firm's own figures over the defaults; every field is optional (left out = the default). */
export const QuantitySettingsPatch = z
  .object({
    perimeterGapMm: z.number().min(0).max(1000),
    serviceSideGapMm: z.number().min(0).max(2000),
    workingRoomMm: z.number().min(0).max(2000),
    baseThicknessMm: z.number().min(50).max(600),
    subBaseMm: z.number().min(0).max(600),
    subBaseDensityTPerM3: positive.max(3),
    subBaseOrderStepT: positive.max(30),
    bulkingFactor: z.number().min(1).max(2),
    skipVolumeM3: positive.max(40),
    grabLorryVolumeM3: positive.max(40),
    grabLorryPayloadT: positive.max(44),
    skipPayloadT: positive.max(20),
    spoilDensityTPerM3: positive.max(3),
    concreteWasteFraction: z.number().min(0).max(0.5),
    concreteOrderStepM3: positive.max(10),
    blockLengthMm: positive.max(1000),
    blockHeightMm: positive.max(1000),
    blockThicknessMm: positive.max(500),
    jointMm: z.number().min(0).max(30),
    blockLaying: z.enum(BLOCK_LAYINGS),
    accessWidthAllowanceMm: z.number().min(0).max(1000),
    dollyHeightMm: z.number().min(0).max(1000),
    uprightRaiseMm: z.number().min(0).max(1000),
    maxDollyDryWeightKg: positive.max(5000),
    supplyCheckFraction: z.number().gt(0).max(1),
    semiRecessedDepthFraction: z.number().gt(0).lt(1),
    excavatorRatesM3PerHour: z
      .object({ '1.5t': positive.max(50), '3t': positive.max(50), '5t': positive.max(50) })
      .partial(),
    defaultExcavator: z.enum(EXCAVATOR_SIZES),
    groundRateFactors: z.partialRecord(z.enum(GROUND_TYPES), positive.max(5)),
    moveCrew: z.number().int().min(1).max(20),
    moveExtraCrewOnSteps: z.number().int().min(0).max(20),
    moveMinutes: z.number().min(0).max(600),
    moveMinutesPerStep: z.number().min(0).max(60),
    hoseFlowLitresPerMinute: positive.max(200),
    fillWaterTempC: z.number().min(0).max(40),
    targetWaterTempC: z.number().min(20).max(40),
    heaterKw: positive.max(20),
  })
  .partial()
  .strict();
export type QuantitySettingsPatch = z.infer<typeof QuantitySettingsPatch>;

/** One of the firm's own water ranges: its bounds, and where the figures come from. */
const waterRange = (lowest: number, highest: number, unit: string) =>
  z
    .object({
      min: z
        .number({ message: `must be a number${unit}` })
        .min(lowest, `must be between ${lowest} and ${highest}${unit}`)
        .max(highest, `must be between ${lowest} and ${highest}${unit}`),
      max: z
        .number({ message: `must be a number${unit}` })
        .min(lowest, `must be between ${lowest} and ${highest}${unit}`)
        .max(highest, `must be between ${lowest} and ${highest}${unit}`),
      source: z
        .string({ message: 'must say where the figures come from' })
        .trim()
        .min(1, 'must say where the figures come from, e.g. the unit maker’s manual')
        .max(200, 'must be at most 200 characters')
        // eslint-disable-next-line no-control-regex
        .refine((s) => !/[\u0000-\u001f\u007f]/.test(s), 'must not contain control characters'),
    })
    .strict()
    .refine((r) => r.min <= r.max, { path: ['max'], message: 'must not be below the lowest value' });

/**
 * The firm's own target ranges for the commissioning readings (water-balance.ts); a range left out
 * is the usual figure. The whole set is sent each time, so it needs no version.
 */
export const WaterTargetsPatch = z
  .object({
    ph: waterRange(0, 14, ''),
    totalAlkalinityPpm: waterRange(0, 1000, ' ppm'),
    freeChlorinePpm: waterRange(0, 50, ' ppm'),
    brominePpm: waterRange(0, 50, ' ppm'),
  })
  .partial()
  .strict() satisfies z.ZodType<Partial<Record<keyof WaterTargets, unknown>>>;
export type WaterTargetsPatch = z.infer<typeof WaterTargetsPatch>;

/**
 * PUT /api/firm/settings. `version` guards the quantity figures: a form of many values where a save
 * based on old figures would quietly undo someone else's. The water targets, the deposit percentage
 * and the cure datum each come with the value as loaded (`…Was`) for the same reason. The photo and
 * sharing switches are yes/no: flipping one states the whole outcome, so it is sent on its own.
 */
export const PutFirmSettings = z
  .object({
    version: z.number().int().min(0).optional(),
    quantities: QuantitySettingsPatch.optional(),
    /** Keep where a photo was taken (EXIF GPS) in the stored original; off by default. */
    keepPhotoLocation: z.boolean().optional(),
    /** Show the householder's name and phone to the partner firms booked on the job (their day sheet); off by default. */
    shareCustomerContactWithPartners: z.boolean().optional(),
    /**
     * The firm's concrete's Nurse–Saul datum temperature, °C, for the cure from the site's weather.
     * ASTM C1074 asks for it to be found for the mix and recommends 0 °C as the working default.
     * Sent with `cureDatumCWas`.
     */
    cureDatumC: z
      .number({ message: 'must be a temperature in °C' })
      .min(-15, 'must be between −15 and 15 °C')
      .max(15, 'must be between −15 and 15 °C')
      .optional(),
    waterTargets: WaterTargetsPatch.optional(),
    /**
     * The water targets as the form loaded them (GET's `waterTargets`): like the quantities, a form
     * of many values, so a save based on targets someone else has changed since is refused.
     */
    waterTargetsWas: z
      .record(z.string(), z.unknown(), { message: 'must be the water targets as loaded (GET waterTargets)' })
      .optional(),
    /** The deposit asked for by default, as a whole percentage of the job's price (25 unless set); sent with `depositPercentWas`. */
    depositPercent: z
      .number({ message: 'must be a whole percentage from 1 to 100' })
      .int('must be a whole percentage from 1 to 100')
      .min(1, 'must be a whole percentage from 1 to 100')
      .max(100, 'must be a whole percentage from 1 to 100')
      .optional(),
    /**
     * The deposit percentage and the cure datum as the form loaded them (GET's values). A number
     * typed over one someone else has just changed would quietly undo theirs, so a save based on an
     * old value is refused (409); the switches need none: flipping one from what you saw can only
     * ask for what it already is when someone else flipped it first.
     */
    depositPercentWas: z
      .number({ message: 'must be the deposit percentage as loaded (GET depositPercent)' })
      .optional(),
    cureDatumCWas: z.number({ message: 'must be the cure datum as loaded (GET cureDatumC)' }).optional(),
  })
  .refine((s) => s.quantities === undefined || s.version !== undefined, {
    path: ['version'],
    message: 'is required when changing the quantities',
  })
  .refine((s) => s.waterTargets === undefined || s.waterTargetsWas !== undefined, {
    path: ['waterTargetsWas'],
    message: 'is required when changing the water targets: the targets you loaded',
  })
  .refine((s) => s.depositPercent === undefined || s.depositPercentWas !== undefined, {
    path: ['depositPercentWas'],
    message: 'is required when changing the deposit percentage: the percentage you loaded',
  })
  .refine((s) => s.cureDatumC === undefined || s.cureDatumCWas !== undefined, {
    path: ['cureDatumCWas'],
    message: 'is required when changing the cure datum: the datum you loaded',
  })
  .refine(
    (s) =>
      s.quantities !== undefined ||
      s.keepPhotoLocation !== undefined ||
      s.shareCustomerContactWithPartners !== undefined ||
      s.cureDatumC !== undefined ||
      s.depositPercent !== undefined ||
      s.waterTargets !== undefined,
    {
      path: ['quantities'],
      message:
        'send the quantities, the photo setting, the sharing setting, the cure datum, the deposit percentage or the water targets',
    },
  );
export type PutFirmSettings = z.infer<typeof PutFirmSettings>;
