import { z } from 'zod';
import { EXCAVATOR_SIZES } from '../quantities/settings.ts';

const positive = z.number().gt(0);

/** A firm's own figures over the defaults; every field is optional (left out = the default). */
export const QuantitySettingsPatch = z.object({
  perimeterGapMm: z.number().min(0).max(1000),
  baseThicknessMm: z.number().min(50).max(600),
  subBaseMm: z.number().min(0).max(600),
  bulkingFactor: z.number().min(1).max(2),
  skipVolumeM3: positive.max(40),
  grabLorryVolumeM3: positive.max(40),
  grabLorryPayloadT: positive.max(44),
  concreteWasteFraction: z.number().min(0).max(0.5),
  blockLengthMm: positive.max(1000),
  blockHeightMm: positive.max(1000),
  jointMm: z.number().min(0).max(30),
  accessWidthAllowanceMm: z.number().min(0).max(1000),
  dollyHeightMm: z.number().min(0).max(1000),
  uprightRaiseMm: z.number().min(0).max(1000),
  maxDollyDryWeightKg: positive.max(5000),
  supplyCheckFraction: z.number().gt(0).max(1),
  semiRecessedDepthFraction: z.number().gt(0).lt(1),
  excavatorRatesM3PerHour: z.object({ '1.5t': positive.max(50), '3t': positive.max(50), '5t': positive.max(50) }).partial(),
  defaultExcavator: z.enum(EXCAVATOR_SIZES),
}).partial().strict();
export type QuantitySettingsPatch = z.infer<typeof QuantitySettingsPatch>;

export const PutFirmSettings = z.object({ version: z.number().int().min(0), quantities: QuantitySettingsPatch });
export type PutFirmSettings = z.infer<typeof PutFirmSettings>;
