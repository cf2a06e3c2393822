import { round, requireNumber, type Computation } from './types.ts';

export interface DigSizeInputs {
  unitLengthMm: number;
  unitWidthMm: number;
  /** Service gap between the unit and the wall on each side. */
  serviceGapMm: number;
  /** The wider gap at the equipment end (one end, along the unit's length). */
  serviceSideGapMm: number;
  /** Thickness of each retaining wall; 0 for a slab. */
  wallThicknessMm: number;
  /** Room dug outside each wall to lay the blocks and backfill; 0 for a slab. */
  workingRoomMm: number;
}
export interface DigSize {
  /** The pit inside its walls: where the unit and its service gaps go. */
  insideLengthMm: number;
  insideWidthMm: number;
  /** The base: to the outside faces of the walls, which stand on it. */
  baseLengthMm: number;
  baseWidthMm: number;
  baseAreaM2: number;
  /** The hole the groundworker digs: the base plus working room all round. */
  lengthMm: number;
  widthMm: number;
  areaM2: number;
}

/**
 * Plan size of the dig. Along the unit's length: unit + service gap + the wider equipment-end gap; across
 * it: unit + 2 × service gap. That is the pit inside its walls; add a wall's thickness on both sides for the
 * base, then working room on both sides for the dig. A slab has no walls and no working room, and its
 * equipment end needs no gap of its own (pass the service gap as the equipment-end gap).
 * @example
 * digSize({ unitLengthMm: 2200, unitWidthMm: 2200, serviceGapMm: 150, serviceSideGapMm: 600, wallThicknessMm: 215, workingRoomMm: 300 }).result
 * // inside 2950 × 2500, base 3380 × 2930 (9.9034 m²), dig 3980 × 3530 mm (14.0494 m²)
 */
export function digSize(inputs: DigSizeInputs): Computation<DigSizeInputs, DigSize> {
  const {
    unitLengthMm: l,
    unitWidthMm: w,
    serviceGapMm: g,
    serviceSideGapMm: s,
    wallThicknessMm: t,
    workingRoomMm: r,
  } = inputs;
  requireNumber('unitLengthMm', l, 0, true);
  requireNumber('unitWidthMm', w, 0, true);
  requireNumber('serviceGapMm', g);
  requireNumber('serviceSideGapMm', s);
  requireNumber('wallThicknessMm', t);
  requireNumber('workingRoomMm', r);
  const insideLengthMm = l + g + s;
  const insideWidthMm = w + 2 * g;
  const baseLengthMm = insideLengthMm + 2 * t;
  const baseWidthMm = insideWidthMm + 2 * t;
  const lengthMm = baseLengthMm + 2 * r;
  const widthMm = baseWidthMm + 2 * r;
  const areaM2 = round((lengthMm / 1000) * (widthMm / 1000), 4);
  const baseAreaM2 = round((baseLengthMm / 1000) * (baseWidthMm / 1000), 4);
  const walled = t > 0 || r > 0;
  // Zero terms (a slab's walls and working room) are left out, so the formula reads as the groundworker would say it.
  const terms = (inside: string, insideMm: number, total: number) =>
    [
      `${inside} = ${insideMm}`,
      t > 0 ? ` + 2 × ${t} walls = ${insideMm + 2 * t}` : '',
      r > 0 ? ` + 2 × ${r} working room = ${total}` : '',
    ].join('');
  return {
    name: 'Dig size',
    inputs: { ...inputs },
    formula:
      `length ${terms(`${l} + ${g} + ${s}${walled ? ' at the equipment end' : ''}`, insideLengthMm, lengthMm)} mm; ` +
      `width ${terms(`${w} + 2 × ${g}`, insideWidthMm, widthMm)} mm; ` +
      `dig ${lengthMm / 1000} × ${widthMm / 1000} = ${areaM2} m²` +
      (walled ? `; base ${baseLengthMm / 1000} × ${baseWidthMm / 1000} = ${baseAreaM2} m²` : ''),
    result: { insideLengthMm, insideWidthMm, baseLengthMm, baseWidthMm, baseAreaM2, lengthMm, widthMm, areaM2 },
    unit: 'mm',
    notes: [
      'Defaults: service gap 150 mm, equipment-end gap 600 mm, working room 300 mm each side (common practice, no source); each firm may set its own.',
      'Sides are taken as dug vertical; a dig that must be battered back or shored for safety is bigger. Excavation safety is for a competent person.',
    ],
  };
}

export interface ExcavationInputs {
  digAreaM2: number;
  unitDepthBelowGroundMm: number;
  baseThicknessMm: number;
  subBaseMm: number;
}
export interface Excavation {
  depthMm: number;
  volumeM3: number;
}

/**
 * Volume dug out: dig plan area × depth, where depth = the part of the unit below ground + base + sub-base
 * (the whole dig is taken down to the bottom of the sub-base).
 * @example
 * excavationVolume({ digAreaM2: 6.25, unitDepthBelowGroundMm: 900, baseThicknessMm: 150, subBaseMm: 100 }).result
 * // { depthMm: 1150, volumeM3: 7.188 }  (6.25 × 1.15 = 7.1875)
 */
export function excavationVolume(inputs: ExcavationInputs): Computation<ExcavationInputs, Excavation> {
  const { digAreaM2: a, unitDepthBelowGroundMm: d, baseThicknessMm: b, subBaseMm: s } = inputs;
  requireNumber('digAreaM2', a);
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

export type LoadLimit = 'volume' | 'weight';
export interface SpoilInputs {
  bankVolumeM3: number;
  bulkingFactor: number;
  /** Weight of a cubic metre of the loose spoil. */
  densityTPerM3: number;
  skipVolumeM3: number;
  skipPayloadT: number;
  grabLorryVolumeM3: number;
  grabLorryPayloadT: number;
}
export interface SpoilLoads {
  byVolume: number;
  byWeight: number;
  /** What one load really takes: the lesser of its volume and its payload ÷ the spoil's density. */
  m3PerLoad: number;
  /** Which limit fills a load first, and so decides the count. */
  limit: LoadLimit;
  loads: number;
}
export interface Spoil {
  looseVolumeM3: number;
  weightT: number;
  /** Skips to order: the larger of the counts by volume and by weight. */
  skips: number;
  /** Grab-lorry loads to book: the larger of the counts by volume and by weight. */
  grabLorryLoads: number;
  skip: SpoilLoads;
  grabLorry: SpoilLoads;
}

function loadsOf(looseM3: number, weightT: number, volumeM3: number, payloadT: number, density: number): SpoilLoads {
  const byVolume = Math.ceil(round(looseM3 / volumeM3, 9));
  const byWeight = Math.ceil(round(weightT / payloadT, 9));
  const weightLimited = payloadT / density < volumeM3;
  return {
    byVolume,
    byWeight,
    m3PerLoad: round(weightLimited ? payloadT / density : volumeM3),
    limit: weightLimited ? 'weight' : 'volume',
    loads: Math.max(byVolume, byWeight),
  };
}

/**
 * Spoil to take away: dug volume × bulking factor, its weight (loose volume × density), and how many skips
 * or grab-lorry loads it makes. Each is limited by volume and by weight; whichever fills a load first decides.
 * @example
 * spoil({ bankVolumeM3: 7.188, bulkingFactor: 1.25, densityTPerM3: 1.8, skipVolumeM3: 4.587, skipPayloadT: 6, grabLorryVolumeM3: 10, grabLorryPayloadT: 16 }).result
 * // 8.985 m³ loose, 16.173 t: skips 2 by volume, 3 by weight → 3 (weight decides); grab lorry 1 by volume, 2 by weight → 2
 */
export function spoil(inputs: SpoilInputs): Computation<SpoilInputs, Spoil> {
  const {
    bankVolumeM3: v,
    bulkingFactor: k,
    densityTPerM3: d,
    skipVolumeM3: skipV,
    skipPayloadT: skipT,
    grabLorryVolumeM3: grabV,
    grabLorryPayloadT: grabT,
  } = inputs;
  requireNumber('bankVolumeM3', v);
  requireNumber('bulkingFactor', k, 1);
  requireNumber('densityTPerM3', d, 0, true);
  requireNumber('skipVolumeM3', skipV, 0, true);
  requireNumber('skipPayloadT', skipT, 0, true);
  requireNumber('grabLorryVolumeM3', grabV, 0, true);
  requireNumber('grabLorryPayloadT', grabT, 0, true);
  const looseVolumeM3 = round(v * k);
  const weightT = round(looseVolumeM3 * d);
  const skip = loadsOf(looseVolumeM3, weightT, skipV, skipT, d);
  const grabLorry = loadsOf(looseVolumeM3, weightT, grabV, grabT, d);
  const line = (what: string, l: SpoilLoads, vol: number, payload: number) =>
    `${what}: ⌈${looseVolumeM3} ÷ ${vol}⌉ = ${l.byVolume} by volume, ⌈${weightT} ÷ ${payload}⌉ = ${l.byWeight} by weight → ${l.loads} (${l.limit} decides)`;
  return {
    name: 'Spoil',
    inputs: { ...inputs },
    formula:
      `${v} m³ × ${k} = ${looseVolumeM3} m³ loose; × ${d} t/m³ = ${weightT} t; ` +
      `${line('skips', skip, skipV, skipT)}; or ${line('grab-lorry loads', grabLorry, grabV, grabT)}`,
    result: { looseVolumeM3, weightT, skips: skip.loads, grabLorryLoads: grabLorry.loads, skip, grabLorry },
    unit: 'm³',
    notes: [
      'Bulking factor default 1.25 for a typical soil: common practice, no source (from memory: soils bulk by roughly 10–50 %).',
      `Loose wet soil about 1.6–1.8 t/m³ (common practice, no source): ${d} t/m³ taken. Clay, stone and rubble weigh more; dry sand less.`,
      `A 6 yd³ skip holds 6 × 0.764555 ≈ 4.587 m³; its weight limit (${skipT} t here) is the skip firm's: from memory about 1 t a cubic yard for heavy waste, so ask them.`,
      `A grab lorry takes about ${grabV} m³ or ${grabT} t: common practice, no source.`,
      'All the dug soil is counted as leaving; whatever goes back behind the walls comes off it.',
    ],
  };
}

export interface ExcavationTimeInputs {
  volumeM3: number;
  excavator: string;
  rateM3PerHour: number;
  groundType: string;
  groundRateFactor: number;
}
export interface ExcavationTime {
  rateM3PerHour: number;
  hours: number;
  minutes: number;
}

/**
 * Working time to dig and load the pit: volume ÷ (the excavator's rate × the ground's factor), rounded up to
 * half an hour.
 * @example
 * excavationTime({ volumeM3: 7.188, excavator: '3t', rateM3PerHour: 1.5, groundType: 'clay', groundRateFactor: 0.75 }).result
 * // { rateM3PerHour: 1.125, hours: 6.3893, minutes: 390 }  (7.188 ÷ 1.125 = 6.389 h = 383.4 min → 390)
 */
export function excavationTime(inputs: ExcavationTimeInputs): Computation<ExcavationTimeInputs, ExcavationTime> {
  const { volumeM3: v, rateM3PerHour: r, groundType, groundRateFactor: f } = inputs;
  requireNumber('volumeM3', v);
  requireNumber('rateM3PerHour', r, 0, true);
  requireNumber('groundRateFactor', f, 0, true);
  const rate = r * f;
  const hours = round(v / rate, 4);
  const minutes = Math.max(30, Math.ceil(round(hours * 2, 9)) * 30);
  const ground = groundType.replace(/_/g, ' ');
  return {
    name: 'Excavation time',
    inputs: { ...inputs },
    formula: `${v} m³ ÷ (${r} m³/h × ${f} for ${ground}) = ${v} ÷ ${round(rate, 4)} = ${hours} h → ${minutes} min (rounded up to half an hour)`,
    result: { rateM3PerHour: round(rate, 4), hours, minutes },
    unit: 'min',
    notes: [
      'Digging rates by excavator size and the factors for each ground type: common practice, no source. Access and the dumper run change them a lot.',
      ...(groundType === 'rock' ? ['Rock usually needs a breaker: plan and price it separately.'] : []),
      ...(groundType === 'unknown' ? ['Ground not recorded: no adjustment made; a trial hole tells.'] : []),
      ...(groundType === 'made_ground' ? ['Made ground can hide rubble and old foundations.'] : []),
    ],
  };
}
