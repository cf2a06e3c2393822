import { accessCheck, moveIn, type AccessCheck, type AccessInputs, type MoveIn, type MoveInInputs } from './access.ts';
import { retainingWallBlocks, wallThicknessFor, type WallBlocks, type WallBlocksInputs } from './blocks.ts';
import { baseConcrete, type BaseConcrete, type BaseConcreteInputs } from './concrete.ts';
import { craneDecision, type CraneDecision, type CraneInputs } from './crane.ts';
import { baseLoading, type BaseLoading, type BaseLoadingInputs } from './loading.ts';
import {
  digSize,
  excavationTime,
  excavationVolume,
  spoil,
  type DigSize,
  type DigSizeInputs,
  type Excavation,
  type ExcavationInputs,
  type ExcavationTime,
  type ExcavationTimeInputs,
  type Spoil,
  type SpoilInputs,
} from './pit.ts';
import { GROUND_TYPES, type ExcavatorSize, type GroundType, type QuantitySettings } from './settings.ts';
import { subBase, type SubBase, type SubBaseInputs } from './sub-base.ts';
import {
  supplyCheck,
  type EarthingArrangement,
  type ExistingLoad,
  type SupplyCheck,
  type SupplyInputs,
} from './supply.ts';
import type { Computation } from './types.ts';
import { fillTime, heatUpTime, type FillTime, type FillTimeInputs, type HeatUp, type HeatUpInputs } from './water.ts';

export type InstallationType = 'in_ground' | 'semi_recessed' | 'slab' | 'deck';

/** The unit's catalogue figures the quantities use. */
export interface UnitFigures {
  lengthMm: number;
  widthMm: number;
  heightMm: number;
  dryWeightKg: number;
  filledWeightKg: number;
  supplies: { amps: number }[];
  /** Water it holds; without it there is no fill or heat-up time. */
  waterLitres?: number | null;
  /** The heater's power; without it the firm's default is used. */
  heaterKw?: number | null;
}

/** The survey's measurements the quantities use (all optional until surveyed). */
export interface SurveyFigures {
  accessWidthMm?: number | null;
  accessHeightMm?: number | null;
  steps?: number | null;
  overheadObstructions?: boolean | null;
  craneRequired?: boolean | null;
  excavatorSize?: ExcavatorSize | null;
  /** One of GROUND_TYPES; anything else counts as unknown. */
  groundType?: string | null;
  mainFuseAmps?: number | null;
  /** Large loads already on the house's supply, in amps; null or absent when there is none. */
  evChargerAmps?: number | null;
  electricShowerAmps?: number | null;
  heatPumpAmps?: number | null;
  otherLargeLoadAmps?: number | null;
  /** What the other large load is, as the surveyor wrote it. */
  otherLargeLoadNotes?: string | null;
  earthingArrangement?: EarthingArrangement | null;
  /** The hose's flow measured at the survey. */
  hoseFlowLitresPerMinute?: number | null;
}

export interface JobQuantities {
  installationType: InstallationType;
  /** How far below ground the unit sits. */
  depthBelowGroundMm: number;
  /** The dig: the pit inside its walls, the base, and the hole with its working room (kept as `pit` for readers). */
  pit: Computation<DigSizeInputs, DigSize> | null;
  excavation: Computation<ExcavationInputs, Excavation> | null;
  spoil: Computation<SpoilInputs, Spoil> | null;
  excavationTime: Computation<ExcavationTimeInputs, ExcavationTime> | null;
  subBase: Computation<SubBaseInputs, SubBase> | null;
  concrete: Computation<BaseConcreteInputs, BaseConcrete> | null;
  blocks: Computation<WallBlocksInputs, WallBlocks> | null;
  access: Computation<AccessInputs, AccessCheck> | null;
  move: Computation<MoveInInputs, MoveIn> | null;
  crane: Computation<CraneInputs, CraneDecision>;
  loading: Computation<BaseLoadingInputs, BaseLoading>;
  fill: Computation<FillTimeInputs, FillTime> | null;
  heatUp: Computation<HeatUpInputs, HeatUp> | null;
  supply: Computation<SupplyInputs, SupplyCheck>;
}

/** The survey's ground type, or unknown for none or one this version does not know. */
export function groundTypeOf(value: string | null | undefined): GroundType {
  return (GROUND_TYPES as readonly string[]).includes(value ?? '') ? (value as GroundType) : 'unknown';
}

/** The survey's large loads already on the supply, named for the electrician. */
export function existingLoadsOf(survey: SurveyFigures): ExistingLoad[] {
  const other = survey.otherLargeLoadNotes?.trim();
  const loads: [string, number | null | undefined][] = [
    ['EV charger', survey.evChargerAmps],
    ['electric shower', survey.electricShowerAmps],
    ['heat pump', survey.heatPumpAmps],
    [other ? `other (${other})` : 'other large load', survey.otherLargeLoadAmps],
  ];
  return loads
    .filter((l): l is [string, number] => typeof l[1] === 'number' && l[1] > 0)
    .map(([name, amps]) => ({ name, amps }));
}

const positive = (n: number | null | undefined): n is number => typeof n === 'number' && Number.isFinite(n) && n > 0;

/**
 * Every quantity for one job, from its unit, its survey (if any) and the firm's settings.
 * In-ground: the dig with walls and working room, base, sub-base and walls. Semi-recessed: the same, part-depth.
 * Slab: the slab's dig, sub-base and concrete only. Deck: no groundworks; the deck's capacity is for a structural engineer.
 * @example
 * jobQuantities({ installationType: 'slab', unit: aurora6, survey: null, settings: DEFAULT_QUANTITY_SETTINGS }).concrete?.result.orderVolumeM3
 */
export function jobQuantities(args: {
  installationType: InstallationType;
  unit: UnitFigures;
  survey: SurveyFigures | null;
  settings: QuantitySettings;
}): JobQuantities {
  const { installationType: type, unit, settings: s } = args;
  const survey = args.survey ?? {};
  const groundworks = type !== 'deck';
  const walled = type === 'in_ground' || type === 'semi_recessed';
  const depthBelowGroundMm =
    type === 'in_ground'
      ? unit.heightMm
      : type === 'semi_recessed'
        ? Math.round(unit.heightMm * s.semiRecessedDepthFraction)
        : 0;

  const wallThicknessMm = walled ? wallThicknessFor(s.blockLaying, s) : 0;
  const pit = groundworks
    ? digSize({
        unitLengthMm: unit.lengthMm,
        unitWidthMm: unit.widthMm,
        serviceGapMm: s.perimeterGapMm,
        // A slab has no pit walls to kneel between: the equipment end gets the ordinary margin.
        serviceSideGapMm: walled ? s.serviceSideGapMm : s.perimeterGapMm,
        wallThicknessMm,
        workingRoomMm: walled ? s.workingRoomMm : 0,
      })
    : null;
  const excavation = pit
    ? excavationVolume({
        digAreaM2: pit.result.areaM2,
        unitDepthBelowGroundMm: depthBelowGroundMm,
        baseThicknessMm: s.baseThicknessMm,
        subBaseMm: s.subBaseMm,
      })
    : null;
  const spoilOut = excavation
    ? spoil({
        bankVolumeM3: excavation.result.volumeM3,
        bulkingFactor: s.bulkingFactor,
        densityTPerM3: s.spoilDensityTPerM3,
        skipVolumeM3: s.skipVolumeM3,
        skipPayloadT: s.skipPayloadT,
        grabLorryVolumeM3: s.grabLorryVolumeM3,
        grabLorryPayloadT: s.grabLorryPayloadT,
      })
    : null;
  const excavator = survey.excavatorSize ?? s.defaultExcavator;
  const ground = groundTypeOf(survey.groundType);
  const time = excavation
    ? excavationTime({
        volumeM3: excavation.result.volumeM3,
        excavator,
        rateM3PerHour: s.excavatorRatesM3PerHour[excavator],
        groundType: ground,
        groundRateFactor: s.groundRateFactors[ground],
      })
    : null;
  const subBaseOut =
    pit && s.subBaseMm > 0
      ? subBase({
          areaM2: pit.result.baseAreaM2,
          thicknessMm: s.subBaseMm,
          densityTPerM3: s.subBaseDensityTPerM3,
          orderStepT: s.subBaseOrderStepT,
        })
      : null;
  const concrete = pit
    ? baseConcrete({
        areaM2: pit.result.baseAreaM2,
        thicknessMm: s.baseThicknessMm,
        wasteFraction: s.concreteWasteFraction,
        orderStepM3: s.concreteOrderStepM3,
      })
    : null;
  const blocks =
    pit && walled && depthBelowGroundMm > 0
      ? retainingWallBlocks({
          insideLengthMm: pit.result.insideLengthMm,
          insideWidthMm: pit.result.insideWidthMm,
          wallHeightMm: depthBelowGroundMm,
          blockLengthMm: s.blockLengthMm,
          blockHeightMm: s.blockHeightMm,
          blockThicknessMm: s.blockThicknessMm,
          jointMm: s.jointMm,
          laying: s.blockLaying,
        })
      : null;
  const access =
    survey.accessWidthMm != null
      ? accessCheck({
          unitWidthMm: unit.widthMm,
          unitHeightMm: unit.heightMm,
          unitDryWeightKg: unit.dryWeightKg,
          routeWidthMm: survey.accessWidthMm,
          routeHeightMm: survey.accessHeightMm ?? null,
          widthAllowanceMm: s.accessWidthAllowanceMm,
          dollyHeightMm: s.dollyHeightMm,
          uprightRaiseMm: s.uprightRaiseMm,
          maxDollyDryWeightKg: s.maxDollyDryWeightKg,
        })
      : null;
  const crane = craneDecision({
    accessWay: access?.result.way ?? null,
    surveyorSaysCrane: survey.craneRequired ?? null,
    overheadObstructions: Boolean(survey.overheadObstructions),
  });
  // The crane decision (the surveyor's call first) says how it goes in: a crane lifts the unit over the steps.
  const move = access
    ? moveIn({
        byCrane: crane.result.needed,
        steps: survey.steps ?? 0,
        crew: s.moveCrew,
        extraCrewOnSteps: s.moveExtraCrewOnSteps,
        minutes: s.moveMinutes,
        minutesPerStep: s.moveMinutesPerStep,
      })
    : null;
  const litres = positive(unit.waterLitres) ? unit.waterLitres : null;
  const measuredFlow = positive(survey.hoseFlowLitresPerMinute) ? survey.hoseFlowLitresPerMinute : null;
  const fill =
    litres !== null
      ? fillTime({
          litres,
          flowLitresPerMinute: measuredFlow ?? s.hoseFlowLitresPerMinute,
          flowFrom: measuredFlow !== null ? 'survey' : 'default',
        })
      : null;
  const heatUp =
    litres !== null
      ? heatUpTime({
          litres,
          startTempC: s.fillWaterTempC,
          targetTempC: s.targetWaterTempC,
          heaterKw: positive(unit.heaterKw) ? unit.heaterKw : s.heaterKw,
          heaterFrom: positive(unit.heaterKw) ? 'unit' : 'default',
        })
      : null;
  return {
    installationType: type,
    depthBelowGroundMm,
    pit,
    excavation,
    spoil: spoilOut,
    excavationTime: time,
    subBase: subBaseOut,
    concrete,
    blocks,
    access,
    move,
    crane,
    loading: baseLoading({
      filledWeightKg: unit.filledWeightKg,
      unitLengthMm: unit.lengthMm,
      unitWidthMm: unit.widthMm,
    }),
    fill,
    heatUp,
    supply: supplyCheck({
      circuitAmps: unit.supplies.map((x) => x.amps),
      existingLoads: existingLoadsOf(survey),
      mainFuseAmps: survey.mainFuseAmps ?? null,
      checkFraction: s.supplyCheckFraction,
      earthing: survey.earthingArrangement ?? null,
    }),
  };
}

/**
 * Minutes to fill the job's unit through a hose (the unit's litres ÷ the survey's measured flow, else the firm's
 * default), rounded up to a quarter of an hour: crew time for the plan's fill stage. null when the unit's
 * water volume is not known.
 * @example
 * fillMinutes(jobQuantities({ installationType: 'slab', unit: { ...brook4, waterLitres: 1250 }, survey: { hoseFlowLitresPerMinute: 12.5 }, settings }))
 * // 105  (1250 ÷ 12.5 = 100 min → 105)
 */
export function fillMinutes(q: Pick<JobQuantities, 'fill'>): number | null {
  return q.fill?.result.minutes ?? null;
}

/**
 * Minutes for the unit's heater to bring the fresh fill to temperature (litres × 4.186 kJ/(kg·K) × ΔT ÷ heater
 * power), rounded up to a quarter of an hour: elapsed time between filling and commissioning, not crew time
 * (the heater works overnight). 0 when no heating is needed; null when the unit's water volume is not known.
 * @example
 * heatUpMinutes(jobQuantities({ installationType: 'in_ground', unit: { ...aurora6, waterLitres: 1500 }, survey: null, settings: DEFAULT_QUANTITY_SETTINGS }))
 * // 990  (1500 × 4.186 × 28 = 175 812 kJ ÷ 3 kW = 58 604 s = 976.7 min → 990)
 */
export function heatUpMinutes(q: Pick<JobQuantities, 'heatUp'>): number | null {
  return q.heatUp?.result.minutes ?? null;
}
