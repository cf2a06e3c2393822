import { describe, expect, it } from 'vitest';
import {
  settingProblems,
  SETTING_FIELDS,
  changedCount,
  formValues,
  settingsPatch,
  wallThicknessText,
} from '@/components/quantity-settings-fields';
import { DEFAULT_QUANTITY_SETTINGS, EXCAVATOR_SIZES, GROUND_TYPES, settingsWith } from '@shared/quantities/index';
import { QuantitySettingsPatch } from '@shared/schemas/firm-settings';

const D = DEFAULT_QUANTITY_SETTINGS;

describe("the firm's quantity settings form", () => {
  it('has one control for every setting behind the quantities, and one for each excavator and ground', () => {
    const keys = new Set(SETTING_FIELDS.map((f) => f.key));
    expect([...keys].sort()).toEqual(Object.keys(D).sort());
    expect(SETTING_FIELDS.filter((f) => f.key === 'excavatorRatesM3PerHour')).toHaveLength(EXCAVATOR_SIZES.length);
    expect(SETTING_FIELDS.filter((f) => f.key === 'groundRateFactors')).toHaveLength(GROUND_TYPES.length);
    expect(new Set(SETTING_FIELDS.map((f) => f.path)).size).toBe(SETTING_FIELDS.length);
  });

  it('saves only what differs from the defaults, and a schema-valid patch', () => {
    const values = {
      ...formValues(D),
      concreteOrderStepM3: 0.5,
      hoseFlowLitresPerMinute: 12,
      heaterKw: 2,
      skipPayloadT: 4.5,
      serviceSideGapMm: 700,
      workingRoomMm: 400,
      spoilDensityTPerM3: 1.6,
      blockLaying: 'on_edge',
      'groundRateFactors.clay': 0.6,
      'excavatorRatesM3PerHour.3t': 1.8,
    };
    const patch = settingsPatch(values, {}, D);
    expect(patch).toEqual({
      serviceSideGapMm: 700,
      workingRoomMm: 400,
      concreteOrderStepM3: 0.5,
      blockLaying: 'on_edge',
      skipPayloadT: 4.5,
      spoilDensityTPerM3: 1.6,
      hoseFlowLitresPerMinute: 12,
      heaterKw: 2,
      excavatorRatesM3PerHour: { '3t': 1.8 },
      groundRateFactors: { clay: 0.6 },
    });
    expect(QuantitySettingsPatch.safeParse(patch).success).toBe(true);
    expect(changedCount(values, D)).toBe(10);
  });

  it('drops an override set back to the default, and an empty box counts as the default', () => {
    const saved = { concreteOrderStepM3: 0.5, groundRateFactors: { clay: 0.6, rock: 0.3 } };
    const values = { ...formValues(settingsWith(saved)), concreteOrderStepM3: 0.25, 'groundRateFactors.clay': null };
    expect(settingsPatch(values, saved, D)).toEqual({ groundRateFactors: { rock: 0.3 } });
  });

  it('says how thick the walls come out for the blocks and the laying', () => {
    // 440 × 215 × 100 mm blocks: flat = 215 mm, on edge = 100 mm (common practice, no source).
    expect(wallThicknessText(formValues(D))).toBe('Walls 215 mm thick (blocks laid flat), on both sides of the pit.');
    expect(wallThicknessText({ ...formValues(D), blockLaying: 'on_edge' })).toBe(
      'Walls 100 mm thick (blocks laid on edge), on both sides of the pit.',
    );
  });
});

describe("a setting the firm can't save", () => {
  it('is named by its label with what is wrong, and a patch within bounds has none', () => {
    expect(settingProblems({ perimeterGapMm: 5000, serviceSideGapMm: -10 })).toEqual({
      perimeterGapMm: 'Service gap round the unit (mm each side) must be at most 1,000',
      serviceSideGapMm: 'Gap at the equipment end (mm) must be at least 0',
    });
    expect(settingProblems({ perimeterGapMm: 150 })).toEqual({});
  });
});
