import { describe, expect, it } from 'vitest';
import {
  accessCheck,
  baseConcrete,
  baseLoading,
  craneDecision,
  digSize,
  excavationTime,
  excavationVolume,
  fillTime,
  heatUpTime,
  moveIn,
  retainingWallBlocks,
  roundUpToStep,
  spoil,
  subBase,
  supplyCheck,
  CUBIC_YARD_M3,
  DEFAULT_QUANTITY_SETTINGS,
  fillMinutes,
  heatUpMinutes,
  STANDARD_GRAVITY,
  WATER_SPECIFIC_HEAT_KJ_PER_KG_K,
  jobQuantities,
  settingsWith,
} from '../../../shared/quantities/index.ts';

// The invented catalogue unit "Aurora 6": 2200 × 2200 × 900 mm, 380 kg dry, 2300 kg filled, 1500 L, one 32 A supply.
const AURORA_6 = {
  lengthMm: 2200,
  widthMm: 2200,
  heightMm: 900,
  dryWeightKg: 380,
  filledWeightKg: 2300,
  waterLitres: 1500,
  supplies: [{ amps: 32 }],
};
// "Tarn Swim 45": 4500 × 2300 × 1300 mm, 1600 kg dry, 10 500 kg filled, 8900 L, two 32 A supplies.
const TARN_SWIM_45 = {
  lengthMm: 4500,
  widthMm: 2300,
  heightMm: 1300,
  dryWeightKg: 1600,
  filledWeightKg: 10500,
  waterLitres: 8900,
  supplies: [{ amps: 32 }, { amps: 32 }],
};

describe('dig size', () => {
  it('adds the service gaps, a wider equipment end, the walls and working room', () => {
    // Length: 2200 + 150 + 600 (equipment end) = 2950 inside; + 2 × 215 (blocks laid flat) = 3380; + 2 × 300 = 3980 mm.
    // Width: 2200 + 2 × 150 = 2500 inside; + 430 = 2930; + 600 = 3530 mm. Dig 3.98 × 3.53 = 14.0494 m²; base 3.38 × 2.93 = 9.9034 m².
    // Gaps, wall and working room: common practice, no source.
    const c = digSize({
      unitLengthMm: 2200,
      unitWidthMm: 2200,
      serviceGapMm: 150,
      serviceSideGapMm: 600,
      wallThicknessMm: 215,
      workingRoomMm: 300,
    });
    expect(c.result).toEqual({
      insideLengthMm: 2950,
      insideWidthMm: 2500,
      baseLengthMm: 3380,
      baseWidthMm: 2930,
      baseAreaM2: 9.9034,
      lengthMm: 3980,
      widthMm: 3530,
      areaM2: 14.0494,
    });
    expect(c.formula).toContain(
      '2200 + 150 + 600 at the equipment end = 2950 + 2 × 215 walls = 3380 + 2 × 300 working room = 3980',
    );
    expect(c.formula).toContain('dig 3.98 × 3.53 = 14.0494 m²');
  });

  it('leaves the full service gap between the unit and the wall, walls outside it', () => {
    // The walls stand outside the gaps: inside the walls, 150 mm is left on three sides and 600 mm at the equipment end.
    const r = digSize({
      unitLengthMm: 2200,
      unitWidthMm: 2200,
      serviceGapMm: 150,
      serviceSideGapMm: 600,
      wallThicknessMm: 100,
      workingRoomMm: 0,
    }).result;
    expect(r.insideWidthMm - 2200).toBe(300);
    expect(r.insideLengthMm - 2200).toBe(750);
    expect(r.lengthMm).toBe(2950 + 200);
  });

  it('is the unit plus the gap all round for a slab', () => {
    // (2200 + 2 × 150)² = 2500 × 2500 mm = 6.25 m²; no walls, no working room.
    const c = digSize({
      unitLengthMm: 2200,
      unitWidthMm: 2200,
      serviceGapMm: 150,
      serviceSideGapMm: 150,
      wallThicknessMm: 0,
      workingRoomMm: 0,
    });
    expect(c.result).toMatchObject({ lengthMm: 2500, widthMm: 2500, areaM2: 6.25, baseAreaM2: 6.25 });
    expect(c.formula).not.toContain('walls');
  });

  it('refuses a unit with no size', () => {
    expect(() =>
      digSize({
        unitLengthMm: 0,
        unitWidthMm: 2000,
        serviceGapMm: 150,
        serviceSideGapMm: 600,
        wallThicknessMm: 215,
        workingRoomMm: 300,
      }),
    ).toThrow(RangeError);
  });
});

describe('excavation volume and spoil', () => {
  it('digs plan area × (unit depth + base + sub-base)', () => {
    // 14.0494 m² × (900 + 150 + 100) mm = 14.0494 × 1.15 = 16.15681 → 16.157 m³ (3 dp).
    const c = excavationVolume({
      digAreaM2: 14.0494,
      unitDepthBelowGroundMm: 900,
      baseThicknessMm: 150,
      subBaseMm: 100,
    });
    expect(c.result).toEqual({ depthMm: 1150, volumeM3: 16.157 });
  });

  it('counts skips by weight as well as volume: 9 m³ of wet soil is three 6 yd³ skips, not two', () => {
    // 7.2 × 1.25 = 9 m³ loose; × 1.8 t/m³ (wet soil 1.6–1.8 t/m³: common practice, no source) = 16.2 t.
    // Skip 6 yd³ = 4.587 m³, limit 6 t (from memory: ~1 t a yd³): ⌈9 ÷ 4.587 = 1.96⌉ = 2 by volume, ⌈16.2 ÷ 6 = 2.7⌉ = 3 by weight.
    // A full skip would weigh 4.587 × 1.8 = 8.26 t > 6 t, so the weight decides: 6 ÷ 1.8 = 3.333 m³ a skip.
    // Grab lorry 10 m³ / 16 t (common practice, no source): 1 by volume, ⌈16.2 ÷ 16 = 1.0125⌉ = 2 by weight.
    const c = spoil({
      bankVolumeM3: 7.2,
      bulkingFactor: 1.25,
      densityTPerM3: 1.8,
      skipVolumeM3: 4.587,
      skipPayloadT: 6,
      grabLorryVolumeM3: 10,
      grabLorryPayloadT: 16,
    });
    expect(c.result).toEqual({
      looseVolumeM3: 9,
      weightT: 16.2,
      skips: 3,
      grabLorryLoads: 2,
      skip: { byVolume: 2, byWeight: 3, m3PerLoad: 3.333, limit: 'weight', loads: 3 },
      grabLorry: { byVolume: 1, byWeight: 2, m3PerLoad: 8.889, limit: 'weight', loads: 2 },
    });
    expect(c.formula).toContain('⌈16.2 ÷ 6⌉ = 3 by weight → 3 (weight decides)');
  });

  it('lets the volume decide for light spoil', () => {
    // Dry sand at 1.2 t/m³: 9 m³ = 10.8 t. A full skip weighs 4.587 × 1.2 = 5.5 t < 6 t, so volume decides: 2 skips (⌈1.8⌉ = 2 by weight too).
    const c = spoil({
      bankVolumeM3: 7.2,
      bulkingFactor: 1.25,
      densityTPerM3: 1.2,
      skipVolumeM3: 4.587,
      skipPayloadT: 6,
      grabLorryVolumeM3: 10,
      grabLorryPayloadT: 16,
    });
    expect(c.result.skip).toEqual({ byVolume: 2, byWeight: 2, m3PerLoad: 4.587, limit: 'volume', loads: 2 });
    expect(c.result.grabLorry).toMatchObject({ limit: 'volume', loads: 1 });
  });

  it('takes a 6 yd³ skip as 4.587 m³', () => {
    // 1 yd = 0.9144 m exactly (international yard, 1959): 0.9144³ = 0.764554857984 m³; × 6 = 4.5873 m³.
    expect(CUBIC_YARD_M3).toBeCloseTo(0.764554857984, 12);
    expect(DEFAULT_QUANTITY_SETTINGS.skipVolumeM3).toBe(4.587);
  });
});

describe('excavation time', () => {
  const dig = { volumeM3: 7.188, excavator: '3t', rateM3PerHour: 1.5 };

  it('times the dig from the excavator rate, rounded up to half an hour', () => {
    // Loam, factor 1: 7.188 m³ ÷ 1.5 m³/h (3 t machine, common practice, no source) = 4.792 h = 287.5 min → 300 min.
    expect(excavationTime({ ...dig, groundType: 'loam', groundRateFactor: 1 }).result).toEqual({
      rateM3PerHour: 1.5,
      hours: 4.792,
      minutes: 300,
    });
  });

  it('digs clay slower and sand faster', () => {
    // Clay × 0.75 (common practice, no source): 1.5 × 0.75 = 1.125 m³/h; 7.188 ÷ 1.125 = 6.3893 h = 383.4 min → 390 min.
    expect(excavationTime({ ...dig, groundType: 'clay', groundRateFactor: 0.75 }).result).toEqual({
      rateM3PerHour: 1.125,
      hours: 6.3893,
      minutes: 390,
    });
    // Sand and gravel × 1.2: 1.8 m³/h; 7.188 ÷ 1.8 = 3.9933 h = 239.6 min → 240 min.
    expect(excavationTime({ ...dig, groundType: 'sand_gravel', groundRateFactor: 1.2 }).result.minutes).toBe(240);
  });

  it('says rock needs a breaker', () => {
    expect(excavationTime({ ...dig, groundType: 'rock', groundRateFactor: 0.4 }).notes.join(' ')).toMatch(/breaker/);
  });
});

describe('sub-base', () => {
  it('orders the compacted stone by weight, rounded up to the order step', () => {
    // 9.9034 m² × 0.1 m = 0.99034 m³; × 2.1 t/m³ (Type 1-like, from memory 2.0–2.2) = 2.0797 t → 2.5 t in 0.5 t steps.
    const c = subBase({ areaM2: 9.9034, thicknessMm: 100, densityTPerM3: 2.1, orderStepT: 0.5 });
    expect(c.result).toEqual({ volumeM3: 0.99, tonnes: 2.08, orderTonnes: 2.5 });
    expect(subBase({ areaM2: 9.9034, thicknessMm: 100, densityTPerM3: 2.1, orderStepT: 1 }).result.orderTonnes).toBe(3);
  });

  it('does not add a step to a figure already on one', () => {
    // 10 m² × 0.1 m × 2 t/m³ = 2 t exactly → 2 t, not 2.5.
    expect(subBase({ areaM2: 10, thicknessMm: 100, densityTPerM3: 2, orderStepT: 0.5 }).result.orderTonnes).toBe(2);
    // 0.1 + 0.2 = 0.30000000000000004 in floating point: still 0.3 in 0.1 steps.
    expect(roundUpToStep(0.1 + 0.2, 0.1)).toBe(0.3);
  });
});

describe('base concrete', () => {
  it("shows the exact volume and the volume ordered in the supplier's steps", () => {
    // 9.9034 m² × 0.15 m = 1.48551 → 1.486 m³ net; × 1.05 = 1.5597855 → 1.56 m³; 1.56 ÷ 0.25 = 6.24 → 7 steps = 1.75 m³.
    // 150 mm and 5 %: common practice, no source; the 0.25 m³ step is the firm's.
    const c = baseConcrete({ areaM2: 9.9034, thicknessMm: 150, wasteFraction: 0.05, orderStepM3: 0.25 });
    expect(c.result).toEqual({ netVolumeM3: 1.486, withWasteM3: 1.56, orderVolumeM3: 1.75 });
    expect(c.formula).toContain('rounded up to 0.25 m³ steps = 1.75 m³ to order');
    // In 0.5 m³ steps: 1.56 ÷ 0.5 = 3.12 → 4 steps = 2 m³.
    expect(
      baseConcrete({ areaM2: 9.9034, thicknessMm: 150, wasteFraction: 0.05, orderStepM3: 0.5 }).result.orderVolumeM3,
    ).toBe(2);
  });

  it('orders a whole step when the volume is just under it', () => {
    // 6.25 × 0.15 = 0.9375; × 1.05 = 0.984375 → 1 m³ in 0.25 m³ steps.
    expect(baseConcrete({ areaM2: 6.25, thicknessMm: 150, wasteFraction: 0.05, orderStepM3: 0.25 }).result).toEqual({
      netVolumeM3: 0.938,
      withWasteM3: 0.984,
      orderVolumeM3: 1,
    });
  });
});

describe('retaining-wall blocks', () => {
  const pit = {
    insideLengthMm: 2950,
    insideWidthMm: 2500,
    wallHeightMm: 900,
    blockLengthMm: 440,
    blockHeightMm: 215,
    blockThicknessMm: 100,
    jointMm: 10,
  };

  it("counts the blocks laid flat and on edge, on the walls' centre line", () => {
    // Flat (wall 215 thick): centre line 2 × (2.95 + 2.5) + 4 × 0.215 = 11.76 m × 0.9 = 10.584 m²; face 440 × 100:
    //   1 ÷ (0.45 × 0.11) = 20.202 → 21/m²; 10.584 × 21 = 222.26 → 223 blocks.
    // On edge (wall 100 thick): 10.9 + 0.4 = 11.3 m × 0.9 = 10.17 m²; face 440 × 215: 1 ÷ (0.45 × 0.225) = 9.877 → 10/m²; 101.7 → 102.
    // Block sizes and rounding up per m² for cuts: common practice, no source.
    const c = retainingWallBlocks({ ...pit, laying: 'flat' });
    expect(c.result.flat).toEqual({
      wallThicknessMm: 215,
      wallAreaM2: 10.584,
      blocksPerM2Exact: 20.202,
      blocksPerM2: 21,
      blocks: 223,
    });
    expect(c.result.onEdge).toEqual({
      wallThicknessMm: 100,
      wallAreaM2: 10.17,
      blocksPerM2Exact: 9.877,
      blocksPerM2: 10,
      blocks: 102,
    });
    expect(c.result).toMatchObject({ laying: 'flat', blocks: 223, wallAreaM2: 10.584 });
  });

  it('gives the count for the way the firm lays them', () => {
    expect(retainingWallBlocks({ ...pit, laying: 'on_edge' }).result).toMatchObject({
      laying: 'on_edge',
      blocks: 102,
      wallThicknessMm: 100,
    });
  });
});

describe('access check', () => {
  const allowances = { widthAllowanceMm: 100, dollyHeightMm: 150, uprightRaiseMm: 100, maxDollyDryWeightKg: 600 };

  it('goes upright when the route is wide enough', () => {
    // Upright: 2200 + 100 = 2300 mm ≤ 2500 wide; 900 + 100 = 1000 mm high, no height limit.
    const c = accessCheck({
      unitWidthMm: 2200,
      unitHeightMm: 900,
      unitDryWeightKg: 380,
      routeWidthMm: 2500,
      routeHeightMm: null,
      ...allowances,
    });
    expect(c.result.way).toBe('upright');
    expect(c.result.upright).toEqual({ widthNeededMm: 2300, heightNeededMm: 1000, fits: true });
  });

  it('goes on its side on a dolly through a narrower gate', () => {
    // Upright 2300 > 1100. On its side: 900 + 100 = 1000 ≤ 1100 wide; 2200 + 150 = 2350 ≤ 2400 high.
    const c = accessCheck({
      unitWidthMm: 2200,
      unitHeightMm: 900,
      unitDryWeightKg: 380,
      routeWidthMm: 1100,
      routeHeightMm: 2400,
      ...allowances,
    });
    expect(c.result.way).toBe('on_side');
    expect(c.result.onSide).toEqual({ widthNeededMm: 1000, heightNeededMm: 2350, fits: true, tooHeavy: false });
  });

  it('needs a crane when the gate is too low for the unit on its side', () => {
    // On its side it needs 2350 mm of height; the archway is 2100 mm.
    const c = accessCheck({
      unitWidthMm: 2200,
      unitHeightMm: 900,
      unitDryWeightKg: 380,
      routeWidthMm: 1100,
      routeHeightMm: 2100,
      ...allowances,
    });
    expect(c.result.way).toBe('crane');
  });

  it('needs a crane for a unit too heavy for a dolly even where it would fit', () => {
    // Tarn Swim 45 on its side: 1300 + 100 = 1400 ≤ 1500 wide, but 1600 kg > 600 kg (common practice, no source).
    const c = accessCheck({
      unitWidthMm: 2300,
      unitHeightMm: 1300,
      unitDryWeightKg: 1600,
      routeWidthMm: 1500,
      routeHeightMm: null,
      ...allowances,
    });
    expect(c.result.way).toBe('crane');
    expect(c.result.onSide.tooHeavy).toBe(true);
    expect(c.result.reason).toMatch(/1600 kg/);
  });
});

describe('moving the unit in', () => {
  const team = { crew: 2, extraCrewOnSteps: 2, minutes: 30, minutesPerStep: 5 };

  it('takes longer, more people and boards over steps', () => {
    // 30 + 4 × 5 = 50 min; 2 + 2 = 4 people (common practice, no source).
    expect(moveIn({ byCrane: false, steps: 4, ...team }).result).toEqual({ people: 4, minutes: 50, boards: true });
    expect(moveIn({ byCrane: false, steps: 0, ...team }).result).toEqual({ people: 2, minutes: 30, boards: false });
    expect(moveIn({ byCrane: false, steps: 1, ...team }).formula).toBe(
      '30 min + 1 step × 5 min = 35 min; 2 + 2 people on steps = 4; boards over the steps',
    );
  });

  it('is not slowed by steps the crane lifts it over', () => {
    expect(moveIn({ byCrane: true, steps: 6, ...team }).result).toEqual({ people: 2, minutes: 30, boards: false });
  });
});

describe('fill and heat-up', () => {
  it("fills from the unit's litres and the hose flow, rounded up to a quarter of an hour", () => {
    // 1500 L ÷ 15 L/min (from memory: a garden tap gives about 10–20 L/min) = 100 min → 105 min.
    expect(fillTime({ litres: 1500, flowLitresPerMinute: 15, flowFrom: 'default' }).result).toEqual({
      minutesExact: 100,
      minutes: 105,
      hours: 1.75,
    });
    // A swim spa: 8900 ÷ 15 = 593.3 min → 600 min = 10 h; on a measured 25 L/min, 8900 ÷ 25 = 356 → 360 min.
    expect(fillTime({ litres: 8900, flowLitresPerMinute: 15, flowFrom: 'default' }).result).toEqual({
      minutesExact: 593.3,
      minutes: 600,
      hours: 10,
    });
    const measured = fillTime({ litres: 8900, flowLitresPerMinute: 25, flowFrom: 'survey' });
    expect(measured.result.minutes).toBe(360);
    expect(measured.notes[0]).toBe('Flow measured at the survey.');
  });

  it('heats 1500 L from 10 °C to 38 °C on 3 kW in about 16.3 h', () => {
    // Source: specific heat of water 4.186 kJ/(kg·K) (physics; it varies 4.18–4.19 between 10 and 40 °C) and 1 kg a litre.
    // 1500 L × 1 kg/L × 4.186 kJ/(kg·K) × (38 − 10) K = 175 812 kJ (÷ 3600 = 48.837 kWh);
    // ÷ 3 kW (1 kW = 1 kJ/s) = 58 604 s = 16.28 h ≈ 16.3 h; planned as 976.7 min → 990 min (a quarter-hour step).
    expect(WATER_SPECIFIC_HEAT_KJ_PER_KG_K).toBe(4.186);
    const c = heatUpTime({ litres: 1500, startTempC: 10, targetTempC: 38, heaterKw: 3, heaterFrom: 'default' });
    expect(c.result).toEqual({
      temperatureRiseK: 28,
      energyKJ: 175812,
      energyKWh: 48.837,
      seconds: 58604,
      hours: 16.28,
      minutes: 990,
    });
    expect(c.formula).toBe(
      '1500 L × 1 kg/L × 4.186 kJ/(kg·K) × (38 − 10) K = 175812 kJ; ÷ 3 kW = 58604 s = 16.28 h → 990 min (rounded up to a quarter of an hour)',
    );
    expect(c.notes[0]).toBe('Specific heat of water 4.186 kJ/(kg·K) and 1 kg a litre: physics.');
  });

  it('takes days for a swim spa, and less on a bigger heater', () => {
    // 8900 × 4.186 × 28 = 1 043 151.2 kJ; ÷ 3 kW = 347 717 s = 96.59 h; ÷ 6 kW = 173 859 s = 48.29 h.
    expect(
      heatUpTime({ litres: 8900, startTempC: 10, targetTempC: 38, heaterKw: 3, heaterFrom: 'default' }).result,
    ).toMatchObject({ energyKJ: 1043151.2, seconds: 347717, hours: 96.59 });
    expect(
      heatUpTime({ litres: 8900, startTempC: 10, targetTempC: 38, heaterKw: 6, heaterFrom: 'unit' }).result.hours,
    ).toBe(48.29);
  });

  it('needs no heating when the water is already warm enough', () => {
    expect(
      heatUpTime({ litres: 1500, startTempC: 39, targetTempC: 38, heaterKw: 3, heaterFrom: 'default' }).result,
    ).toMatchObject({ hours: 0, minutes: 0 });
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
  const plain = { existingLoads: [], checkFraction: 0.5, earthing: 'TN-S' as const };

  it('is fine for one 32 A circuit on a 100 A fuse with nothing else large', () => {
    // 32 ÷ 100 = 32 % ≤ 50 % (threshold common practice, no source); TN-S.
    const c = supplyCheck({ ...plain, circuitAmps: [32], mainFuseAmps: 100 });
    expect(c.result).toMatchObject({
      newAmps: 32,
      existingAmps: 0,
      totalAmps: 32,
      shareOfFuse: 0.32,
      verdict: 'ok',
      electricianToLook: false,
      reasons: [],
    });
  });

  it('asks for a check over half the main fuse', () => {
    // 32 ÷ 60 = 0.533 > 0.5.
    const c = supplyCheck({ ...plain, circuitAmps: [32], mainFuseAmps: 60 });
    expect(c.result).toMatchObject({ totalAmps: 32, shareOfFuse: 0.533, verdict: 'check', electricianToLook: true });
  });

  it('flags two 32 A circuits on a 60 A fuse as exceeding it', () => {
    // 32 + 32 = 64 A ≥ 60 A; 64 ÷ 60 = 1.067.
    const c = supplyCheck({ ...plain, circuitAmps: [32, 32], mainFuseAmps: 60 });
    expect(c.result).toMatchObject({ totalAmps: 64, shareOfFuse: 1.067, verdict: 'exceeds' });
    expect(c.result.message).toMatch(/network operator/);
  });

  it('counts the large loads already in the house against the main fuse', () => {
    // Alone, 32 A on 100 A is 32 %: fine. With a 32 A EV charger and a 40 A shower: 32 + 72 = 104 A ≥ 100 A.
    const c = supplyCheck({
      ...plain,
      circuitAmps: [32],
      mainFuseAmps: 100,
      existingLoads: [
        { name: 'EV charger', amps: 32 },
        { name: 'electric shower', amps: 40 },
      ],
    });
    expect(c.result).toMatchObject({
      newAmps: 32,
      existingAmps: 72,
      totalAmps: 104,
      shareOfFuse: 1.04,
      verdict: 'exceeds',
      electricianToLook: true,
    });
    expect(c.formula).toContain('existing large loads EV charger 32 A + electric shower 40 A = 72 A; 32 + 72 = 104 A');
  });

  it('records the earthing for the electrician and asks them to look unless it is TN-S', () => {
    const look = (earthing: 'TN-C-S' | 'TN-S' | 'TT' | 'unknown' | null) =>
      supplyCheck({ ...plain, circuitAmps: [32], mainFuseAmps: 100, earthing }).result;
    expect(look('TN-S')).toMatchObject({ verdict: 'ok', earthing: 'TN-S', electricianToLook: false });
    expect(look('TN-C-S')).toMatchObject({ earthing: 'TN-C-S', electricianToLook: true });
    expect(look('TN-C-S').reasons.join(' ')).toMatch(/PME/);
    expect(look('TT').reasons.join(' ')).toMatch(/earth electrode/);
    expect(look('unknown').reasons.join(' ')).toMatch(/electrician establishes/);
    expect(look(null).reasons.join(' ')).toMatch(/not recorded/);
  });

  it('never claims to be an electrical design', () => {
    const c = supplyCheck({ ...plain, circuitAmps: [16], mainFuseAmps: 100 });
    expect(c.notes[0]).toMatch(/^Not an electrical design/);
    expect(c.notes[0]).toMatch(/registered electrician/);
    expect(c.notes[0]).toMatch(/wiring rules/);
  });

  it('asks for the fuse rating when the survey has none', () => {
    const c = supplyCheck({ ...plain, circuitAmps: [16], mainFuseAmps: null });
    expect(c.result).toMatchObject({ verdict: 'unknown', electricianToLook: true });
  });
});

describe('crane decision', () => {
  it("follows the surveyor's call over the access check", () => {
    expect(
      craneDecision({ accessWay: 'upright', surveyorSaysCrane: true, overheadObstructions: false }).result.needed,
    ).toBe(true);
    expect(
      craneDecision({ accessWay: 'crane', surveyorSaysCrane: false, overheadObstructions: false }).result.needed,
    ).toBe(false);
  });

  it('follows the access check otherwise, and plans a crane until the route is measured', () => {
    expect(
      craneDecision({ accessWay: 'on_side', surveyorSaysCrane: null, overheadObstructions: false }).result.needed,
    ).toBe(false);
    expect(craneDecision({ accessWay: 'crane', surveyorSaysCrane: null, overheadObstructions: true }).notes[0]).toMatch(
      /overhead/i,
    );
    expect(craneDecision({ accessWay: null, surveyorSaysCrane: null, overheadObstructions: false }).result.needed).toBe(
      true,
    );
  });
});

describe("a job's quantities", () => {
  it('works out an in-ground Aurora 6 from the defaults and the survey', () => {
    const survey = {
      accessWidthMm: 1200,
      accessHeightMm: null,
      steps: 3,
      groundType: 'clay',
      mainFuseAmps: 80,
      earthingArrangement: 'TN-S' as const,
    };
    const q = jobQuantities({
      installationType: 'in_ground',
      unit: AURORA_6,
      survey,
      settings: DEFAULT_QUANTITY_SETTINGS,
    });
    expect(q.depthBelowGroundMm).toBe(900);
    // Dig 3980 × 3530 mm = 14.0494 m² (blocks laid flat by default); × 1.15 m = 16.157 m³.
    expect(q.pit?.result).toMatchObject({ lengthMm: 3980, widthMm: 3530, areaM2: 14.0494, baseAreaM2: 9.9034 });
    expect(q.excavation?.result.volumeM3).toBe(16.157);
    // Clay: 16.157 ÷ (1.5 × 0.75) = 14.3618 h = 861.7 min → 870 min.
    expect(q.excavationTime?.result).toEqual({ rateM3PerHour: 1.125, hours: 14.3618, minutes: 870 });
    // 16.157 × 1.25 = 20.196 m³ loose × 1.8 = 36.353 t: skips ⌈4.40⌉ = 5 by volume, ⌈6.06⌉ = 7 by weight → 7;
    // grab lorry ⌈2.02⌉ = 3 by volume, ⌈2.27⌉ = 3 by weight → 3.
    expect(q.spoil?.result).toMatchObject({ looseVolumeM3: 20.196, weightT: 36.353, skips: 7, grabLorryLoads: 3 });
    expect(q.subBase?.result.orderTonnes).toBe(2.5);
    expect(q.concrete?.result).toEqual({ netVolumeM3: 1.486, withWasteM3: 1.56, orderVolumeM3: 1.75 });
    expect(q.blocks?.result).toMatchObject({ laying: 'flat', blocks: 223 });
    // On its side: 900 + 100 = 1000 ≤ 1200 → no crane; 3 steps: 30 + 15 = 45 min, 4 people, boards.
    expect(q.access?.result.way).toBe('on_side');
    expect(q.crane.result.needed).toBe(false);
    expect(q.move?.result).toEqual({ people: 4, minutes: 45, boards: true });
    // 1500 L: fill 105 min at the default 15 L/min; heat 10 → 38 °C on the default 3 kW: 16.28 h.
    expect(q.fill?.result.minutes).toBe(105);
    expect(q.heatUp?.result.hours).toBe(16.28);
    // 32 ÷ 80 = 40 % → ok, TN-S → nothing more for the electrician to look at before ordering.
    expect(q.supply.result).toMatchObject({ verdict: 'ok', electricianToLook: false });
  });

  it('digs a semi-recessed pit to half the unit height, and fills a swim spa for much longer', () => {
    // Tarn Swim 45: inside (4500 + 150 + 600) × (2300 + 300) = 5250 × 2600; base 5680 × 3030; dig 6280 × 3630 = 22.7964 m².
    // Depth 1300 × 0.5 = 650 + 150 + 100 = 900 mm; 22.7964 × 0.9 = 20.517 m³.
    // Walls flat: 2 × (5.25 + 2.6) + 4 × 0.215 = 16.56 m × 0.65 = 10.764 m² × 21 = 226.04 → 227 blocks.
    const q = jobQuantities({
      installationType: 'semi_recessed',
      unit: TARN_SWIM_45,
      survey: null,
      settings: DEFAULT_QUANTITY_SETTINGS,
    });
    expect(q.depthBelowGroundMm).toBe(650);
    expect(q.pit?.result).toMatchObject({ lengthMm: 6280, widthMm: 3630, areaM2: 22.7964 });
    expect(q.excavation?.result.volumeM3).toBe(20.517);
    expect(q.blocks?.result).toMatchObject({ wallAreaM2: 10.764, blocks: 227 });
    expect(q.access).toBeNull();
    expect(q.move).toBeNull();
    expect(q.crane.result.needed).toBe(true);
    // 8900 L: 600 min to fill (1500 L takes 105), 96.59 h to heat on 3 kW.
    expect(q.fill?.result.minutes).toBe(600);
    expect(q.heatUp?.result.hours).toBe(96.59);
    // No survey: ground unknown, not adjusted; main fuse and earthing not recorded.
    expect(q.excavationTime?.inputs).toMatchObject({ groundType: 'unknown', groundRateFactor: 1 });
    expect(q.supply.result).toMatchObject({ verdict: 'unknown', earthing: null, electricianToLook: true });
  });

  it('has no walls on a slab and no groundworks on a deck', () => {
    // Slab: 2500 × 2500 = 6.25 m² × (0 + 150 + 100) mm = 1.5625 → 1.563 m³ dug; concrete 0.984 → 1 m³;
    // sub-base 6.25 × 0.1 × 2.1 = 1.3125 t → 1.5 t.
    const slab = jobQuantities({
      installationType: 'slab',
      unit: AURORA_6,
      survey: null,
      settings: DEFAULT_QUANTITY_SETTINGS,
    });
    expect(slab.pit?.result).toMatchObject({ lengthMm: 2500, widthMm: 2500, areaM2: 6.25 });
    expect(slab.excavation?.result.volumeM3).toBe(1.563);
    expect(slab.concrete?.result.orderVolumeM3).toBe(1);
    expect(slab.subBase?.result).toEqual({ volumeM3: 0.625, tonnes: 1.313, orderTonnes: 1.5 });
    expect(slab.blocks).toBeNull();
    const deck = jobQuantities({
      installationType: 'deck',
      unit: AURORA_6,
      survey: null,
      settings: DEFAULT_QUANTITY_SETTINGS,
    });
    expect([deck.pit, deck.excavation, deck.subBase, deck.concrete, deck.blocks]).toEqual([
      null,
      null,
      null,
      null,
      null,
    ]);
    expect(deck.loading.result.pressureKNPerM2).toBe(4.66);
    expect(deck.fill?.result.minutes).toBe(105);
  });

  it("uses a firm's own figures over the defaults", () => {
    // Gap 200 mm, blocks on edge (100 mm): inside (2200 + 200 + 600) × (2200 + 400) = 3000 × 2600; base 3200 × 2800;
    // dig 3800 × 3400 = 12.92 m². Concrete 3.2 × 2.8 × 0.15 × 1.05 = 1.4112 m³ → 1.5 m³ in 0.5 m³ steps.
    const settings = settingsWith({
      perimeterGapMm: 200,
      blockLaying: 'on_edge',
      concreteOrderStepM3: 0.5,
      excavatorRatesM3PerHour: { '3t': 2 } as never,
      groundRateFactors: { clay: 0.5 } as never,
    });
    expect(settings.excavatorRatesM3PerHour).toEqual({ '1.5t': 0.8, '3t': 2, '5t': 2.5 });
    expect(settings.groundRateFactors).toMatchObject({ clay: 0.5, loam: 1, sand_gravel: 1.2 });
    const q = jobQuantities({ installationType: 'in_ground', unit: AURORA_6, survey: null, settings });
    expect(q.pit?.result).toMatchObject({ lengthMm: 3800, widthMm: 3400, areaM2: 12.92 });
    expect(q.concrete?.result.orderVolumeM3).toBe(1.5);
    expect(q.blocks?.result.laying).toBe('on_edge');
  });

  it('takes the hose flow, large loads and earthing from the survey and the heater from the unit', () => {
    const survey = {
      accessWidthMm: 900,
      craneRequired: true,
      steps: 6,
      mainFuseAmps: 100,
      hoseFlowLitresPerMinute: 25,
      evChargerAmps: 32,
      electricShowerAmps: 40,
      heatPumpAmps: null,
      otherLargeLoadAmps: 16,
      otherLargeLoadNotes: 'sauna heater',
      earthingArrangement: 'TN-C-S' as const,
    };
    const q = jobQuantities({
      installationType: 'slab',
      unit: { ...TARN_SWIM_45, heaterKw: 6 },
      survey,
      settings: DEFAULT_QUANTITY_SETTINGS,
    });
    // 8900 ÷ 25 = 356 → 360 min; 1 043 151.2 kJ ÷ 6 kW = 48.29 h.
    expect(q.fill?.result.minutes).toBe(360);
    expect(q.heatUp?.inputs).toMatchObject({ heaterKw: 6, heaterFrom: 'unit' });
    expect(q.heatUp?.result.hours).toBe(48.29);
    // 32 + 32 new; 32 + 40 + 16 = 88 existing; 152 A ≥ 100 A.
    expect(q.supply.inputs.existingLoads).toEqual([
      { name: 'EV charger', amps: 32 },
      { name: 'electric shower', amps: 40 },
      { name: 'other (sauna heater)', amps: 16 },
    ]);
    expect(q.supply.result).toMatchObject({
      newAmps: 64,
      existingAmps: 88,
      totalAmps: 152,
      verdict: 'exceeds',
      earthing: 'TN-C-S',
      electricianToLook: true,
    });
    // The surveyor called a crane: it lifts the unit over the six steps.
    expect(q.move?.result).toEqual({ people: 2, minutes: 30, boards: false });
  });

  it('gives the plan its fill and heat-up minutes', () => {
    // Aurora 6, 1500 L: fill 1500 ÷ 15 = 100 → 105 min; heat 58 604 s = 976.7 min → 990 min (physics, as above).
    const q = jobQuantities({
      installationType: 'in_ground',
      unit: AURORA_6,
      survey: null,
      settings: DEFAULT_QUANTITY_SETTINGS,
    });
    expect([fillMinutes(q), heatUpMinutes(q)]).toEqual([105, 990]);
    // Tarn Swim 45 on a measured 25 L/min and a 6 kW heater: 8900 ÷ 25 = 356 → 360 min; 173 858.5 s = 2897.6 min → 2910 min.
    const swim = jobQuantities({
      installationType: 'slab',
      unit: { ...TARN_SWIM_45, heaterKw: 6 },
      survey: { hoseFlowLitresPerMinute: 25 },
      settings: DEFAULT_QUANTITY_SETTINGS,
    });
    expect([fillMinutes(swim), heatUpMinutes(swim)]).toEqual([360, 2910]);
    // Without the unit's litres there is nothing to time.
    const dry = jobQuantities({
      installationType: 'slab',
      unit: { ...AURORA_6, waterLitres: null },
      survey: null,
      settings: DEFAULT_QUANTITY_SETTINGS,
    });
    expect([fillMinutes(dry), heatUpMinutes(dry)]).toEqual([null, null]);
  });

  it('counts a ground type it does not know as unknown', () => {
    const q = jobQuantities({
      installationType: 'slab',
      unit: AURORA_6,
      survey: { groundType: 'marsh' },
      settings: DEFAULT_QUANTITY_SETTINGS,
    });
    expect(q.excavationTime?.inputs).toMatchObject({ groundType: 'unknown', groundRateFactor: 1 });
  });

  it('does not change its inputs', () => {
    const unit = structuredClone(TARN_SWIM_45);
    const survey = { accessWidthMm: 900, evChargerAmps: 32 };
    jobQuantities({ installationType: 'in_ground', unit, survey, settings: DEFAULT_QUANTITY_SETTINGS });
    expect(unit).toEqual(TARN_SWIM_45);
    expect(survey).toEqual({ accessWidthMm: 900, evChargerAmps: 32 });
  });
});
