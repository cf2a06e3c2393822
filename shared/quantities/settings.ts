/**
 * The defaults behind Waterline's quantities. Each firm may change any of them (PUT /api/firm/settings);
 * the notes say where each figure comes from. "Common practice, no source" means a rule of thumb of
 * the trade with no published reference: check it against your own jobs.
 */
export const EXCAVATOR_SIZES = ['1.5t', '3t', '5t'] as const;
export type ExcavatorSize = (typeof EXCAVATOR_SIZES)[number];

export interface QuantitySettings {
  /** Gap left around the unit on each side, for air and service access (common practice, no source). */
  perimeterGapMm: number;
  /** Thickness of the reinforced base or slab (common practice, no source). */
  baseThicknessMm: number;
  /** Compacted hardcore under the base (common practice, no source). */
  subBaseMm: number;
  /** Loose volume of dug soil over its volume in the ground (common practice, no source). */
  bulkingFactor: number;
  /** One skip's volume: 6 cubic yards = 6 × 0.764555 m³ ≈ 4.587 m³. */
  skipVolumeM3: number;
  /** Loose volume one grab lorry takes (common practice, no source). */
  grabLorryVolumeM3: number;
  /** A grab lorry's payload, shown beside its volume (common practice, no source). */
  grabLorryPayloadT: number;
  /** Concrete ordered over the net volume, for spillage and uneven ground (common practice, no source). */
  concreteWasteFraction: number;
  /** Face of one dense concrete block and its mortar joint (common practice, no source). */
  blockLengthMm: number;
  blockHeightMm: number;
  jointMm: number;
  /** Extra width a route needs beyond the unit, for hands and steering (common practice, no source). */
  accessWidthAllowanceMm: number;
  /** Height a spa dolly adds under a unit on its side (common practice, no source). */
  dollyHeightMm: number;
  /** Height pallet trucks or skates lift an upright unit (common practice, no source). */
  uprightRaiseMm: number;
  /** Heavier units (dry) are not moved by hand on a dolly (common practice, no source). */
  maxDollyDryWeightKg: number;
  /** New circuits above this share of the main fuse need a supply check (common practice, no source). */
  supplyCheckFraction: number;
  /** A semi-recessed unit sits this share of its height below ground (common practice, no source). */
  semiRecessedDepthFraction: number;
  /**
   * Digging, loading and dumper runs by excavator size, m³ an hour (common practice, no source; chosen so a
   * large pit of about 19 m³ takes about a day and a half with a 3 t machine, as the trade reckons).
   */
  excavatorRatesM3PerHour: Record<ExcavatorSize, number>;
  /** The excavator a job gets unless the survey names another. */
  defaultExcavator: ExcavatorSize;
}

/** 1 yd = 0.9144 m exactly (international yard, 1959), so 1 yd³ = 0.9144³ m³. */
export const CUBIC_YARD_M3 = 0.9144 ** 3;

export const DEFAULT_QUANTITY_SETTINGS: QuantitySettings = {
  perimeterGapMm: 150,
  baseThicknessMm: 150,
  subBaseMm: 100,
  bulkingFactor: 1.25,
  skipVolumeM3: Math.round(6 * CUBIC_YARD_M3 * 1000) / 1000,
  grabLorryVolumeM3: 10,
  grabLorryPayloadT: 16,
  concreteWasteFraction: 0.05,
  blockLengthMm: 440,
  blockHeightMm: 215,
  jointMm: 10,
  accessWidthAllowanceMm: 100,
  dollyHeightMm: 150,
  uprightRaiseMm: 100,
  maxDollyDryWeightKg: 600,
  supplyCheckFraction: 0.5,
  semiRecessedDepthFraction: 0.5,
  excavatorRatesM3PerHour: { '1.5t': 0.8, '3t': 1.5, '5t': 2.5 },
  defaultExcavator: '3t',
};

/** Where each default comes from, shown beside the figures. */
export const SETTING_SOURCES: Record<keyof QuantitySettings, string> = {
  perimeterGapMm: 'common practice, no source',
  baseThicknessMm: 'common practice, no source',
  subBaseMm: 'common practice, no source',
  bulkingFactor: 'common practice, no source (from memory: soils bulk by roughly 10–50 % depending on type)',
  skipVolumeM3: '6 yd³ × 0.764555 m³/yd³ (international yard, 1959)',
  grabLorryVolumeM3: 'common practice, no source',
  grabLorryPayloadT: 'common practice, no source',
  concreteWasteFraction: 'common practice, no source',
  blockLengthMm: 'common practice, no source (the usual dense block face)',
  blockHeightMm: 'common practice, no source (the usual dense block face)',
  jointMm: 'common practice, no source',
  accessWidthAllowanceMm: 'common practice, no source',
  dollyHeightMm: 'common practice, no source',
  uprightRaiseMm: 'common practice, no source',
  maxDollyDryWeightKg: 'common practice, no source',
  supplyCheckFraction: 'common practice, no source',
  semiRecessedDepthFraction: 'common practice, no source',
  excavatorRatesM3PerHour: 'common practice, no source',
  defaultExcavator: 'firm choice',
};

/** A firm's settings over the defaults; unknown keys are ignored. */
export function settingsWith(overrides: Partial<QuantitySettings> | null | undefined): QuantitySettings {
  const o = overrides ?? {};
  return {
    ...DEFAULT_QUANTITY_SETTINGS,
    ...o,
    excavatorRatesM3PerHour: { ...DEFAULT_QUANTITY_SETTINGS.excavatorRatesM3PerHour, ...(o.excavatorRatesM3PerHour ?? {}) },
  };
}
