import { accessCheck, type AccessCheck, type AccessInputs } from './access.ts';
import { retainingWallBlocks, type WallBlocks, type WallBlocksInputs } from './blocks.ts';
import { baseConcrete, type BaseConcrete, type BaseConcreteInputs } from './concrete.ts';
import { craneDecision, type CraneDecision, type CraneInputs } from './crane.ts';
import { baseLoading, type BaseLoading, type BaseLoadingInputs } from './loading.ts';
import {
  excavationTime, excavationVolume, pitSize, spoil,
  type Excavation, type ExcavationInputs, type ExcavationTime, type ExcavationTimeInputs, type PitSize, type PitSizeInputs, type Spoil, type SpoilInputs,
} from './pit.ts';
import type { ExcavatorSize, QuantitySettings } from './settings.ts';
import { supplyCheck, type SupplyCheck, type SupplyInputs } from './supply.ts';
import type { Computation } from './types.ts';

export type InstallationType = 'in_ground' | 'semi_recessed' | 'slab' | 'deck';

/** The unit's catalogue figures the quantities use. */
export interface UnitFigures {
  lengthMm: number;
  widthMm: number;
  heightMm: number;
  dryWeightKg: number;
  filledWeightKg: number;
  supplies: { amps: number }[];
}

/** The survey's measurements the quantities use (all optional until surveyed). */
export interface SurveyFigures {
  accessWidthMm?: number | null;
  accessHeightMm?: number | null;
  overheadObstructions?: boolean | null;
  craneRequired?: boolean | null;
  excavatorSize?: ExcavatorSize | null;
  mainFuseAmps?: number | null;
}

export interface JobQuantities {
  installationType: InstallationType;
  /** How far below ground the unit sits. */
  depthBelowGroundMm: number;
  pit: Computation<PitSizeInputs, PitSize> | null;
  excavation: Computation<ExcavationInputs, Excavation> | null;
  spoil: Computation<SpoilInputs, Spoil> | null;
  excavationTime: Computation<ExcavationTimeInputs, ExcavationTime> | null;
  concrete: Computation<BaseConcreteInputs, BaseConcrete> | null;
  blocks: Computation<WallBlocksInputs, WallBlocks> | null;
  access: Computation<AccessInputs, AccessCheck> | null;
  crane: Computation<CraneInputs, CraneDecision>;
  loading: Computation<BaseLoadingInputs, BaseLoading>;
  supply: Computation<SupplyInputs, SupplyCheck>;
}

/**
 * Every quantity for one job, from its unit, its survey (if any) and the firm's settings.
 * In-ground: pit, walls, base. Semi-recessed: the same, part-depth. Slab: slab dig and concrete only.
 * Deck: no groundworks; the deck's capacity is for a structural engineer.
 * @example
 * jobQuantities({ installationType: 'slab', unit: aurora6, survey: null, settings: DEFAULT_QUANTITY_SETTINGS }).concrete?.result.orderVolumeM3
 */
export function jobQuantities(args: { installationType: InstallationType; unit: UnitFigures; survey: SurveyFigures | null; settings: QuantitySettings }): JobQuantities {
  const { installationType: type, unit, settings: s } = args;
  const survey = args.survey ?? {};
  const groundworks = type !== 'deck';
  const depthBelowGroundMm = type === 'in_ground' ? unit.heightMm
    : type === 'semi_recessed' ? Math.round(unit.heightMm * s.semiRecessedDepthFraction) : 0;

  const pit = groundworks ? pitSize({ unitLengthMm: unit.lengthMm, unitWidthMm: unit.widthMm, perimeterGapMm: s.perimeterGapMm }) : null;
  const excavation = pit ? excavationVolume({ pitAreaM2: pit.result.areaM2, unitDepthBelowGroundMm: depthBelowGroundMm, baseThicknessMm: s.baseThicknessMm, subBaseMm: s.subBaseMm }) : null;
  const spoilOut = excavation ? spoil({ bankVolumeM3: excavation.result.volumeM3, bulkingFactor: s.bulkingFactor, skipVolumeM3: s.skipVolumeM3, grabLorryVolumeM3: s.grabLorryVolumeM3, grabLorryPayloadT: s.grabLorryPayloadT }) : null;
  const excavator = survey.excavatorSize ?? s.defaultExcavator;
  const time = excavation ? excavationTime({ volumeM3: excavation.result.volumeM3, excavator, rateM3PerHour: s.excavatorRatesM3PerHour[excavator] }) : null;
  const concrete = pit ? baseConcrete({ areaM2: pit.result.areaM2, thicknessMm: s.baseThicknessMm, wasteFraction: s.concreteWasteFraction }) : null;
  const blocks = pit && depthBelowGroundMm > 0
    ? retainingWallBlocks({ pitLengthMm: pit.result.lengthMm, pitWidthMm: pit.result.widthMm, wallHeightMm: depthBelowGroundMm, blockLengthMm: s.blockLengthMm, blockHeightMm: s.blockHeightMm, jointMm: s.jointMm })
    : null;
  const access = survey.accessWidthMm != null
    ? accessCheck({
      unitWidthMm: unit.widthMm, unitHeightMm: unit.heightMm, unitDryWeightKg: unit.dryWeightKg,
      routeWidthMm: survey.accessWidthMm, routeHeightMm: survey.accessHeightMm ?? null,
      widthAllowanceMm: s.accessWidthAllowanceMm, dollyHeightMm: s.dollyHeightMm, uprightRaiseMm: s.uprightRaiseMm, maxDollyDryWeightKg: s.maxDollyDryWeightKg,
    })
    : null;
  const crane = craneDecision({ accessWay: access?.result.way ?? null, surveyorSaysCrane: survey.craneRequired ?? null, overheadObstructions: Boolean(survey.overheadObstructions) });
  return {
    installationType: type, depthBelowGroundMm, pit, excavation, spoil: spoilOut, excavationTime: time, concrete, blocks, access, crane,
    loading: baseLoading({ filledWeightKg: unit.filledWeightKg, unitLengthMm: unit.lengthMm, unitWidthMm: unit.widthMm }),
    supply: supplyCheck({ circuitAmps: unit.supplies.map((x) => x.amps), mainFuseAmps: survey.mainFuseAmps ?? null, checkFraction: s.supplyCheckFraction }),
  };
}
