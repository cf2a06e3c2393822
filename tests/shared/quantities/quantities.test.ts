import { describe, expect, it } from 'vitest';
import {
  accessCheck, baseConcrete, baseLoading, craneDecision, excavationTime, excavationVolume, pitSize, retainingWallBlocks, spoil, supplyCheck,
  CUBIC_YARD_M3, DEFAULT_QUANTITY_SETTINGS, STANDARD_GRAVITY, jobQuantities, settingsWith,
} from '../../../shared/quantities/index.ts';

// The invented catalogue unit "Aurora 6": 2200 × 2200 × 900 mm, 380 kg dry, 2300 kg filled, one 32 A supply.
const AURORA_6 = { lengthMm: 2200, widthMm: 2200, heightMm: 900, dryWeightKg: 380, filledWeightKg: 2300, supplies: [{ amps: 32 }] };
// "Tarn Swim 45": 4500 × 2300 × 1300 mm, 1600 kg dry, 10 500 kg filled, two 32 A supplies.
const TARN_SWIM_45 = { lengthMm: 4500, widthMm: 2300, heightMm: 1300, dryWeightKg: 1600, filledWeightKg: 10500, supplies: [{ amps: 32 }, { amps: 32 }] };

describe('pit size', () => {
  it('adds the perimeter gap on every side', () => {
    // (2200 + 2 × 150) × (2200 + 2 × 150) = 2500 × 2500 mm = 6.25 m². Gap 150 mm: common practice, no source.
    const c = pitSize({ unitLengthMm: 2200, unitWidthMm: 2200, perimeterGapMm: 150 });
    expect(c.result).toEqual({ lengthMm: 2500, widthMm: 2500, areaM2: 6.25 });
    expect(c.inputs).toEqual({ unitLengthMm: 2200, unitWidthMm: 2200, perimeterGapMm: 150 });
    expect(c.formula).toContain('2500 × 2500 mm = 6.25 m²');
  });

  it('refuses a unit with no size', () => {
    expect(() => pitSize({ unitLengthMm: 0, unitWidthMm: 2000, perimeterGapMm: 150 })).toThrow(RangeError);
  });
});

describe('excavation volume and spoil', () => {
  it('digs plan area × (unit depth + base + sub-base)', () => {
    // 6.25 m² × (900 + 150 + 100) mm = 6.25 × 1.15 = 7.1875 → 7.188 m³ (3 dp).
    const c = excavationVolume({ pitAreaM2: 6.25, unitDepthBelowGroundMm: 900, baseThicknessMm: 150, subBaseMm: 100 });
    expect(c.result).toEqual({ depthMm: 1150, volumeM3: 7.188 });
  });

  it('bulks the spoil and counts skips and grab-lorry loads', () => {
    // 7.188 × 1.25 = 8.985 m³ loose. Skips of 6 yd³ = 6 × 0.764555 = 4.587 m³: 8.985 ÷ 4.587 = 1.96 → 2 skips.
    // Grab lorry ~10 m³ (common practice): 8.985 ÷ 10 = 0.9 → 1 load. Bulking 1.25: common practice, no source.
    const c = spoil({ bankVolumeM3: 7.188, bulkingFactor: 1.25, skipVolumeM3: 4.587, grabLorryVolumeM3: 10, grabLorryPayloadT: 16 });
    expect(c.result).toEqual({ looseVolumeM3: 8.985, skips: 2, grabLorryLoads: 1 });
  });

  it('takes a 6 yd³ skip as 4.587 m³', () => {
    // 1 yd = 0.9144 m exactly (international yard, 1959): 0.9144³ = 0.764554857984 m³; × 6 = 4.5873 m³.
    expect(CUBIC_YARD_M3).toBeCloseTo(0.764554857984, 12);
    expect(DEFAULT_QUANTITY_SETTINGS.skipVolumeM3).toBe(4.587);
  });

  it('times the dig from the excavator rate, rounded up to half an hour', () => {
    // 7.188 m³ ÷ 1.5 m³/h (3 t machine, common practice, no source) = 4.792 h = 287.5 min → 300 min.
    const c = excavationTime({ volumeM3: 7.188, excavator: '3t', rateM3PerHour: 1.5 });
    expect(c.result).toEqual({ hours: 4.792, minutes: 300 });
  });
});

describe('base concrete', () => {
  it('orders area × thickness plus the waste allowance', () => {
    // 6.25 m² × 0.15 m = 0.9375 → 0.938 m³ net; 0.9375 × 1.05 = 0.984375 → 0.984 m³ to order.
    // 150 mm and 5 %: common practice, no source.
    const c = baseConcrete({ areaM2: 6.25, thicknessMm: 150, wasteFraction: 0.05 });
    expect(c.result).toEqual({ netVolumeM3: 0.938, orderVolumeM3: 0.984 });
  });
});

describe('retaining-wall blocks', () => {
  it('counts about ten 440 × 215 mm blocks a square metre', () => {
    // Perimeter 2 × (2.5 + 2.5) = 10 m × 0.9 m high = 9 m². 1 ÷ (0.45 × 0.225) = 1 ÷ 0.10125 = 9.877 → 10 per m²
    // (common practice, no source); 9 × 10 = 90 blocks.
    const c = retainingWallBlocks({ pitLengthMm: 2500, pitWidthMm: 2500, wallHeightMm: 900, blockLengthMm: 440, blockHeightMm: 215, jointMm: 10 });
    expect(c.result).toEqual({ wallAreaM2: 9, blocksPerM2Exact: 9.877, blocksPerM2: 10, blocks: 90 });
  });
});

describe('access check', () => {
  const allowances = { widthAllowanceMm: 100, dollyHeightMm: 150, uprightRaiseMm: 100, maxDollyDryWeightKg: 600 };

  it('goes upright when the route is wide enough', () => {
    // Upright: 2200 + 100 = 2300 mm ≤ 2500 wide; 900 + 100 = 1000 mm high, no height limit.
    const c = accessCheck({ unitWidthMm: 2200, unitHeightMm: 900, unitDryWeightKg: 380, routeWidthMm: 2500, routeHeightMm: null, ...allowances });
    expect(c.result.way).toBe('upright');
    expect(c.result.upright).toEqual({ widthNeededMm: 2300, heightNeededMm: 1000, fits: true });
  });

  it('goes on its side on a dolly through a narrower gate', () => {
    // Upright 2300 > 1100. On its side: 900 + 100 = 1000 ≤ 1100 wide; 2200 + 150 = 2350 ≤ 2400 high.
    const c = accessCheck({ unitWidthMm: 2200, unitHeightMm: 900, unitDryWeightKg: 380, routeWidthMm: 1100, routeHeightMm: 2400, ...allowances });
    expect(c.result.way).toBe('on_side');
    expect(c.result.onSide).toEqual({ widthNeededMm: 1000, heightNeededMm: 2350, fits: true, tooHeavy: false });
  });

  it('needs a crane when the gate is too low for the unit on its side', () => {
    // On its side it needs 2350 mm of height; the archway is 2100 mm.
    const c = accessCheck({ unitWidthMm: 2200, unitHeightMm: 900, unitDryWeightKg: 380, routeWidthMm: 1100, routeHeightMm: 2100, ...allowances });
    expect(c.result.way).toBe('crane');
  });

  it('needs a crane for a unit too heavy for a dolly even where it would fit', () => {
    // Tarn Swim 45 on its side: 1300 + 100 = 1400 ≤ 1500 wide, but 1600 kg > 600 kg (common practice, no source).
    const c = accessCheck({ unitWidthMm: 2300, unitHeightMm: 1300, unitDryWeightKg: 1600, routeWidthMm: 1500, routeHeightMm: null, ...allowances });
    expect(c.result.way).toBe('crane');
    expect(c.result.onSide.tooHeavy).toBe(true);
    expect(c.result.reason).toMatch(/1600 kg/);
  });
});

describe('load on the base', () => {
  it('spreads the filled weight over the footprint, with standard gravity', () => {
    // 2300 kg × 9.80665 m/s² = 22 555.295 N = 22.555 kN; ÷ (2.2 × 2.2 = 4.84 m²) = 4.660 kN/m².
    // g = 9.80665 m/s²: standard gravity, 3rd CGPM (1901).
    expect(STANDARD_GRAVITY).toBe(9.80665);
    const c = baseLoading({ filledWeightKg: 2300, unitLengthMm: 2200, unitWidthMm: 2200 });
    expect(c.result).toEqual({ forceKN: 22.555, footprintM2: 4.84, pressureKNPerM2: 4.66 });
  });
});

describe('supply check', () => {
  it('is fine for one 32 A circuit on a 100 A fuse', () => {
    // 32 ÷ 100 = 32 % ≤ 50 % (threshold common practice, no source).
    const c = supplyCheck({ circuitAmps: [32], mainFuseAmps: 100, checkFraction: 0.5 });
    expect(c.result).toMatchObject({ totalAmps: 32, shareOfFuse: 0.32, verdict: 'ok' });
  });

  it('asks for a check over half the main fuse', () => {
    // 32 ÷ 60 = 0.533 > 0.5.
    const c = supplyCheck({ circuitAmps: [32], mainFuseAmps: 60, checkFraction: 0.5 });
    expect(c.result).toMatchObject({ totalAmps: 32, shareOfFuse: 0.533, verdict: 'check' });
  });

  it('flags two 32 A circuits on a 60 A fuse as exceeding it', () => {
    // 32 + 32 = 64 A ≥ 60 A; 64 ÷ 60 = 1.067.
    const c = supplyCheck({ circuitAmps: [32, 32], mainFuseAmps: 60, checkFraction: 0.5 });
    expect(c.result).toMatchObject({ totalAmps: 64, shareOfFuse: 1.067, verdict: 'exceeds' });
    expect(c.result.message).toMatch(/network operator/);
  });

  it('asks for the fuse rating when the survey has none', () => {
    expect(supplyCheck({ circuitAmps: [16], mainFuseAmps: null, checkFraction: 0.5 }).result.verdict).toBe('unknown');
  });
});

describe('crane decision', () => {
  it("follows the surveyor's call over the access check", () => {
    expect(craneDecision({ accessWay: 'upright', surveyorSaysCrane: true, overheadObstructions: false }).result.needed).toBe(true);
    expect(craneDecision({ accessWay: 'crane', surveyorSaysCrane: false, overheadObstructions: false }).result.needed).toBe(false);
  });

  it('follows the access check otherwise, and plans a crane until the route is measured', () => {
    expect(craneDecision({ accessWay: 'on_side', surveyorSaysCrane: null, overheadObstructions: false }).result.needed).toBe(false);
    expect(craneDecision({ accessWay: 'crane', surveyorSaysCrane: null, overheadObstructions: true }).notes[0]).toMatch(/overhead/i);
    expect(craneDecision({ accessWay: null, surveyorSaysCrane: null, overheadObstructions: false }).result.needed).toBe(true);
  });
});

describe("a job's quantities", () => {
  it('works out an in-ground Aurora 6 from the defaults', () => {
    const q = jobQuantities({ installationType: 'in_ground', unit: AURORA_6, survey: { accessWidthMm: 1200, accessHeightMm: null, mainFuseAmps: 80 }, settings: DEFAULT_QUANTITY_SETTINGS });
    expect(q.depthBelowGroundMm).toBe(900);
    expect(q.pit?.result.areaM2).toBe(6.25);
    expect(q.excavation?.result.volumeM3).toBe(7.188);
    expect(q.excavationTime?.result.minutes).toBe(300);
    expect(q.blocks?.result.blocks).toBe(90);
    // On its side: 900 + 100 = 1000 ≤ 1200 → no crane. 32 ÷ 80 = 40 % → ok.
    expect(q.access?.result.way).toBe('on_side');
    expect(q.crane.result.needed).toBe(false);
    expect(q.supply.result.verdict).toBe('ok');
  });

  it('digs a semi-recessed pit to half the unit height', () => {
    // Tarn Swim 45: pit (4500 + 300) × (2300 + 300) = 4.8 × 2.6 = 12.48 m²; depth 1300 × 0.5 = 650 + 150 + 100 = 900 mm;
    // 12.48 × 0.9 = 11.232 m³. Walls: 2 × (4.8 + 2.6) = 14.8 m × 0.65 = 9.62 m² × 10 = 96.2 → 97 blocks.
    const q = jobQuantities({ installationType: 'semi_recessed', unit: TARN_SWIM_45, survey: null, settings: DEFAULT_QUANTITY_SETTINGS });
    expect(q.depthBelowGroundMm).toBe(650);
    expect(q.excavation?.result.volumeM3).toBe(11.232);
    expect(q.blocks?.result).toMatchObject({ wallAreaM2: 9.62, blocks: 97 });
    expect(q.access).toBeNull();
    expect(q.crane.result.needed).toBe(true);
  });

  it('has no walls on a slab and no groundworks on a deck', () => {
    // Slab: 6.25 m² × (0 + 150 + 100) mm = 1.5625 → 1.563 m³ dug.
    const slab = jobQuantities({ installationType: 'slab', unit: AURORA_6, survey: null, settings: DEFAULT_QUANTITY_SETTINGS });
    expect(slab.excavation?.result.volumeM3).toBe(1.563);
    expect(slab.blocks).toBeNull();
    const deck = jobQuantities({ installationType: 'deck', unit: AURORA_6, survey: null, settings: DEFAULT_QUANTITY_SETTINGS });
    expect([deck.pit, deck.excavation, deck.concrete, deck.blocks]).toEqual([null, null, null, null]);
    expect(deck.loading.result.pressureKNPerM2).toBe(4.66);
  });

  it("uses a firm's own figures over the defaults", () => {
    // Gap 200 mm: (2200 + 400)² = 2.6 × 2.6 = 6.76 m².
    const settings = settingsWith({ perimeterGapMm: 200, excavatorRatesM3PerHour: { '3t': 2 } as never });
    expect(settings.excavatorRatesM3PerHour).toEqual({ '1.5t': 0.8, '3t': 2, '5t': 2.5 });
    expect(jobQuantities({ installationType: 'in_ground', unit: AURORA_6, survey: null, settings }).pit?.result.areaM2).toBe(6.76);
  });

  it('does not change its inputs', () => {
    const unit = structuredClone(TARN_SWIM_45);
    jobQuantities({ installationType: 'in_ground', unit, survey: { accessWidthMm: 900 }, settings: DEFAULT_QUANTITY_SETTINGS });
    expect(unit).toEqual(TARN_SWIM_45);
  });
});
