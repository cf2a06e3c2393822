import { round, requireNumber, type Computation } from './types.ts';

export interface PitSizeInputs { unitLengthMm: number; unitWidthMm: number; perimeterGapMm: number }
export interface PitSize { lengthMm: number; widthMm: number; areaM2: number }

/**
 * Plan size of the pit (or slab): the unit's footprint plus the gap on every side.
 * @example
 * pitSize({ unitLengthMm: 2200, unitWidthMm: 2200, perimeterGapMm: 150 }).result
 * // { lengthMm: 2500, widthMm: 2500, areaM2: 6.25 }
 */
export function pitSize(inputs: PitSizeInputs): Computation<PitSizeInputs, PitSize> {
  const { unitLengthMm: l, unitWidthMm: w, perimeterGapMm: g } = inputs;
  requireNumber('unitLengthMm', l, 0, true);
  requireNumber('unitWidthMm', w, 0, true);
  requireNumber('perimeterGapMm', g);
  const lengthMm = l + 2 * g;
  const widthMm = w + 2 * g;
  const areaM2 = round((lengthMm / 1000) * (widthMm / 1000), 4);
  return {
    name: 'Pit size',
    inputs: { ...inputs },
    formula: `(${l} + 2 × ${g}) mm × (${w} + 2 × ${g}) mm = ${lengthMm} × ${widthMm} mm = ${areaM2} m²`,
    result: { lengthMm, widthMm, areaM2 },
    unit: 'mm',
    notes: ['Perimeter gap default 150 mm each side: common practice, no source.'],
  };
}

export interface ExcavationInputs { pitAreaM2: number; unitDepthBelowGroundMm: number; baseThicknessMm: number; subBaseMm: number }
export interface Excavation { depthMm: number; volumeM3: number }

/**
 * Volume dug out: pit plan area × depth, where depth = the part of the unit below ground + base + sub-base.
 * @example
 * excavationVolume({ pitAreaM2: 6.25, unitDepthBelowGroundMm: 900, baseThicknessMm: 150, subBaseMm: 100 }).result
 * // { depthMm: 1150, volumeM3: 7.188 }  (6.25 × 1.15 = 7.1875)
 */
export function excavationVolume(inputs: ExcavationInputs): Computation<ExcavationInputs, Excavation> {
  const { pitAreaM2: a, unitDepthBelowGroundMm: d, baseThicknessMm: b, subBaseMm: s } = inputs;
  requireNumber('pitAreaM2', a);
  requireNumber('unitDepthBelowGroundMm', d);
  requireNumber('baseThicknessMm', b);
  requireNumber('subBaseMm', s);
  const depthMm = d + b + s;
  const volumeM3 = round(a * (depthMm / 1000));
  return {
    name: 'Excavation volume',
    inputs: { ...inputs },
    formula: `${a} m² × (${d} + ${b} + ${s}) mm = ${a} m² × ${depthMm / 1000} m = ${volumeM3} m³`,
    result: { depthMm, volumeM3 },
    unit: 'm³',
    notes: ['Depth = unit below ground + base thickness + sub-base.'],
  };
}

export interface SpoilInputs { bankVolumeM3: number; bulkingFactor: number; skipVolumeM3: number; grabLorryVolumeM3: number; grabLorryPayloadT: number }
export interface Spoil { looseVolumeM3: number; skips: number; grabLorryLoads: number }

/**
 * Spoil to take away: dug volume × bulking factor, and how many skips or grab-lorry loads that fills.
 * @example
 * spoil({ bankVolumeM3: 7.188, bulkingFactor: 1.25, skipVolumeM3: 4.587, grabLorryVolumeM3: 10, grabLorryPayloadT: 16 }).result
 * // { looseVolumeM3: 8.985, skips: 2, grabLorryLoads: 1 }
 */
export function spoil(inputs: SpoilInputs): Computation<SpoilInputs, Spoil> {
  const { bankVolumeM3: v, bulkingFactor: k, skipVolumeM3: skip, grabLorryVolumeM3: grab } = inputs;
  requireNumber('bankVolumeM3', v);
  requireNumber('bulkingFactor', k, 1);
  requireNumber('skipVolumeM3', skip, 0, true);
  requireNumber('grabLorryVolumeM3', grab, 0, true);
  const looseVolumeM3 = round(v * k);
  const skips = Math.ceil(looseVolumeM3 / skip - 1e-9);
  const grabLorryLoads = Math.ceil(looseVolumeM3 / grab - 1e-9);
  return {
    name: 'Spoil',
    inputs: { ...inputs },
    formula: `${v} m³ × ${k} = ${looseVolumeM3} m³ loose; ⌈${looseVolumeM3} ÷ ${skip}⌉ = ${skips} skips, or ⌈${looseVolumeM3} ÷ ${grab}⌉ = ${grabLorryLoads} grab-lorry loads`,
    result: { looseVolumeM3, skips, grabLorryLoads },
    unit: 'm³',
    notes: [
      'Bulking factor default 1.25 for a typical soil: common practice, no source (from memory: soils bulk by roughly 10–50 %).',
      'A 6 yd³ skip holds 6 × 0.764555 ≈ 4.587 m³.',
      `A grab lorry takes about ${grab} m³ or ${inputs.grabLorryPayloadT} t: common practice, no source. Wet clay may reach the weight limit first.`,
    ],
  };
}

export interface ExcavationTimeInputs { volumeM3: number; excavator: string; rateM3PerHour: number }
export interface ExcavationTime { hours: number; minutes: number }

/**
 * Working time to dig and load the pit: volume ÷ the excavator's rate, rounded up to half an hour.
 * @example
 * excavationTime({ volumeM3: 7.188, excavator: '3t', rateM3PerHour: 1.5 }).result
 * // { hours: 4.792, minutes: 300 }  (7.188 ÷ 1.5 = 4.792 h = 287.5 min → 300)
 */
export function excavationTime(inputs: ExcavationTimeInputs): Computation<ExcavationTimeInputs, ExcavationTime> {
  const { volumeM3: v, rateM3PerHour: r } = inputs;
  requireNumber('volumeM3', v);
  requireNumber('rateM3PerHour', r, 0, true);
  const hours = round(v / r, 4);
  const minutes = Math.max(30, Math.ceil((hours * 60 - 1e-9) / 30) * 30);
  return {
    name: 'Excavation time',
    inputs: { ...inputs },
    formula: `${v} m³ ÷ ${r} m³/h = ${hours} h → ${minutes} min (rounded up to half an hour)`,
    result: { hours, minutes },
    unit: 'min',
    notes: ['Digging rates by excavator size: common practice, no source. Ground, access and the dumper run change them a lot.'],
  };
}
