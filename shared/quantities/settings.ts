/**
 * The defaults behind Waterline's quantities. Each firm may change any of them (PUT /api/firm/settings);
 * the notes say where each figure comes from. "Common practice, no source" means a rule of thumb of
 * the trade with no published reference: check it against your own jobs.
 */
export const EXCAVATOR_SIZES = ['1.5t', '3t', '5t'] as const;
export type ExcavatorSize = (typeof EXCAVATOR_SIZES)[number];

/** The ground the surveyor records; it changes how fast the excavator digs. */
export const GROUND_TYPES = ['clay', 'loam', 'sand_gravel', 'chalk', 'rock', 'made_ground', 'unknown'] as const;
export type GroundType = (typeof GROUND_TYPES)[number];

/** How the retaining-wall blocks are laid: on edge (a wall the block's thickness) or flat (a wall the block's height). */
export const BLOCK_LAYINGS = ['on_edge', 'flat'] as const;
export type BlockLaying = (typeof BLOCK_LAYINGS)[number];

export interface QuantitySettings {
  /** Service gap left between the unit and the pit wall on each side (common practice, no source). */
  perimeterGapMm: number;
  /**
   * The wider gap at the equipment end of a pit (along the unit's length), where someone kneels to reach
   * the pumps and heater (common practice, no source). Slabs have no walls, so no such gap.
   */
  serviceSideGapMm: number;
  /** Room dug outside the walls to lay the blocks and backfill behind them (common practice, no source). */
  workingRoomMm: number;
  /** Thickness of the reinforced base or slab (common practice, no source). */
  baseThicknessMm: number;
  /** Compacted hardcore under the base (common practice, no source). */
  subBaseMm: number;
  /** Compacted density of a Type 1-like crushed-stone sub-base, t/m³ (from memory; common practice, no source). */
  subBaseDensityTPerM3: number;
  /** Sub-base is ordered in whole steps of this many tonnes (bag or part-load size; firm choice). */
  subBaseOrderStepT: number;
  /** Loose volume of dug soil over its volume in the ground (common practice, no source). */
  bulkingFactor: number;
  /** One skip's volume: 6 cubic yards = 6 × 0.764555 m³ ≈ 4.587 m³. */
  skipVolumeM3: number;
  /** Loose volume one grab lorry takes (common practice, no source). */
  grabLorryVolumeM3: number;
  /** A grab lorry's payload: a load is limited by this weight as well as its volume (common practice, no source). */
  grabLorryPayloadT: number;
  /** A skip's weight limit, set by the skip firm and its lorry (from memory: about 1 t a cubic yard; ask your skip firm). */
  skipPayloadT: number;
  /** Weight of a cubic metre of loose, wet dug soil (common practice, no source: about 1.6–1.8 t/m³; the heavy end taken). */
  spoilDensityTPerM3: number;
  /** Concrete ordered over the net volume, for spillage and uneven ground (common practice, no source). */
  concreteWasteFraction: number;
  /** Ready-mixed concrete is ordered in whole steps of this many m³ (the supplier's step; firm choice). */
  concreteOrderStepM3: number;
  /** Face of one dense concrete block, its thickness and its mortar joint (common practice, no source). */
  blockLengthMm: number;
  blockHeightMm: number;
  blockThicknessMm: number;
  jointMm: number;
  /** How the pit's retaining walls are laid; flat makes a wall the block's height thick (common practice, no source). */
  blockLaying: BlockLaying;
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
  /**
   * The digging rate times this for the ground the survey records: clay and chalk dig slower, sand and
   * gravel faster, rock much slower (common practice, no source). Unknown ground is not adjusted.
   */
  groundRateFactors: Record<GroundType, number>;
  /** People to move a unit in along a level route, and the extra people (and boards) when there are steps (common practice, no source). */
  moveCrew: number;
  moveExtraCrewOnSteps: number;
  /** Minutes to move a unit in along a level route, and the minutes each step adds (common practice, no source). */
  moveMinutes: number;
  moveMinutesPerStep: number;
  /** A garden tap's flow through a hose, used until the survey measures it (from memory: about 10–20 L/min on mains). */
  hoseFlowLitresPerMinute: number;
  /** Cold-water temperature at fill, °C (from memory: mains water is about 5–15 °C through the year). */
  fillWaterTempC: number;
  /** Water temperature to reach before commissioning, °C (common practice, no source). */
  targetWaterTempC: number;
  /** The unit's heater power, kW, until the unit's own figure is recorded (from memory: many units have a 3 kW heater). */
  heaterKw: number;
}

/** 1 yd = 0.9144 m exactly (international yard, 1959), so 1 yd³ = 0.9144³ m³. */
export const CUBIC_YARD_M3 = 0.9144 ** 3;

export const DEFAULT_QUANTITY_SETTINGS: QuantitySettings = {
  perimeterGapMm: 150,
  serviceSideGapMm: 600,
  workingRoomMm: 300,
  baseThicknessMm: 150,
  subBaseMm: 100,
  subBaseDensityTPerM3: 2.1,
  subBaseOrderStepT: 0.5,
  bulkingFactor: 1.25,
  skipVolumeM3: Math.round(6 * CUBIC_YARD_M3 * 1000) / 1000,
  grabLorryVolumeM3: 10,
  grabLorryPayloadT: 16,
  skipPayloadT: 6,
  spoilDensityTPerM3: 1.8,
  concreteWasteFraction: 0.05,
  concreteOrderStepM3: 0.25,
  blockLengthMm: 440,
  blockHeightMm: 215,
  blockThicknessMm: 100,
  jointMm: 10,
  blockLaying: 'flat',
  accessWidthAllowanceMm: 100,
  dollyHeightMm: 150,
  uprightRaiseMm: 100,
  maxDollyDryWeightKg: 600,
  supplyCheckFraction: 0.5,
  semiRecessedDepthFraction: 0.5,
  excavatorRatesM3PerHour: { '1.5t': 0.8, '3t': 1.5, '5t': 2.5 },
  defaultExcavator: '3t',
  groundRateFactors: { clay: 0.75, loam: 1, sand_gravel: 1.2, chalk: 0.8, rock: 0.4, made_ground: 0.8, unknown: 1 },
  moveCrew: 2,
  moveExtraCrewOnSteps: 2,
  moveMinutes: 30,
  moveMinutesPerStep: 5,
  hoseFlowLitresPerMinute: 15,
  fillWaterTempC: 10,
  targetWaterTempC: 38,
  heaterKw: 3,
};

/** Where each default comes from, shown beside the figures. */
export const SETTING_SOURCES: Record<keyof QuantitySettings, string> = {
  perimeterGapMm: 'common practice, no source',
  serviceSideGapMm: 'common practice, no source',
  workingRoomMm: 'common practice, no source',
  baseThicknessMm: 'common practice, no source',
  subBaseMm: 'common practice, no source',
  subBaseDensityTPerM3:
    'from memory: suppliers quote about 2.0–2.2 t/m³ for compacted Type 1-like crushed stone; common practice, no source',
  subBaseOrderStepT: "firm choice (the supplier's bag or part load)",
  bulkingFactor: 'common practice, no source (from memory: soils bulk by roughly 10–50 % depending on type)',
  skipVolumeM3: '6 yd³ × 0.764555 m³/yd³ (international yard, 1959)',
  grabLorryVolumeM3: 'common practice, no source',
  grabLorryPayloadT: 'common practice, no source',
  skipPayloadT: 'from memory: skip firms allow about 1 t a cubic yard for heavy waste; ask your skip firm',
  spoilDensityTPerM3: 'common practice, no source (wet soil about 1.6–1.8 t/m³ loose; the heavy end taken)',
  concreteWasteFraction: 'common practice, no source',
  concreteOrderStepM3: "firm choice (the ready-mix supplier's step, often 0.25 or 0.5 m³)",
  blockLengthMm: 'common practice, no source (the usual dense block face)',
  blockHeightMm: 'common practice, no source (the usual dense block face)',
  blockThicknessMm: 'common practice, no source (the usual dense block)',
  jointMm: 'common practice, no source',
  blockLaying: 'common practice, no source (retaining walls are often laid flat)',
  accessWidthAllowanceMm: 'common practice, no source',
  dollyHeightMm: 'common practice, no source',
  uprightRaiseMm: 'common practice, no source',
  maxDollyDryWeightKg: 'common practice, no source',
  supplyCheckFraction: 'common practice, no source',
  semiRecessedDepthFraction: 'common practice, no source',
  excavatorRatesM3PerHour: 'common practice, no source',
  defaultExcavator: 'firm choice',
  groundRateFactors: 'common practice, no source',
  moveCrew: 'common practice, no source',
  moveExtraCrewOnSteps: 'common practice, no source',
  moveMinutes: 'common practice, no source',
  moveMinutesPerStep: 'common practice, no source',
  hoseFlowLitresPerMinute: 'from memory: a garden tap on mains gives about 10–20 L/min; time a bucket at the survey',
  fillWaterTempC: 'from memory: mains water is about 5–15 °C through the year',
  targetWaterTempC: 'common practice, no source',
  heaterKw: "from memory: many units have a 3 kW heater; the maker's figure overrides it",
};

/** A firm's own figures: any setting, and any entry of the per-excavator and per-ground tables. */
export type QuantityOverrides = Partial<Omit<QuantitySettings, 'excavatorRatesM3PerHour' | 'groundRateFactors'>> & {
  excavatorRatesM3PerHour?: Partial<Record<ExcavatorSize, number>>;
  groundRateFactors?: Partial<Record<GroundType, number>>;
};

/** A firm's settings over the defaults; unknown keys are ignored. */
export function settingsWith(overrides: QuantityOverrides | null | undefined): QuantitySettings {
  const o = overrides ?? {};
  return {
    ...DEFAULT_QUANTITY_SETTINGS,
    ...o,
    excavatorRatesM3PerHour: {
      ...DEFAULT_QUANTITY_SETTINGS.excavatorRatesM3PerHour,
      ...(o.excavatorRatesM3PerHour ?? {}),
    },
    groundRateFactors: { ...DEFAULT_QUANTITY_SETTINGS.groundRateFactors, ...(o.groundRateFactors ?? {}) },
  };
}
