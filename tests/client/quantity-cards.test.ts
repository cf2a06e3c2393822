import { describe, expect, it } from 'vitest';
import { INPUT_LABELS, cardInputs, duration, quantityGroups } from '@/components/job-detail/quantity-cards';
import { DEFAULT_QUANTITY_SETTINGS, jobQuantities } from '@shared/quantities/index';
import QuantityPanel from '@/components/job-detail/QuantityPanel.vue';
import { renderHtml } from './render';

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
/** A clay garden up three steps through a 1200 mm side path; an 80 A fuse with an EV charger; TN-S; a measured 12 L/min tap. */
const SURVEY = {
  accessWidthMm: 1200,
  accessHeightMm: null,
  steps: 3,
  groundType: 'clay',
  mainFuseAmps: 80,
  evChargerAmps: 32,
  earthingArrangement: 'TN-S' as const,
  hoseFlowLitresPerMinute: 12,
};
const inGround = () =>
  jobQuantities({ installationType: 'in_ground', unit: AURORA_6, survey: SURVEY, settings: DEFAULT_QUANTITY_SETTINGS });
const cardOf = (key: string) =>
  quantityGroups(inGround())
    .flatMap((g) => g.cards)
    .find((c) => c.key === key)!;

describe('the job page quantity cards', () => {
  it('shows every figure of an in-ground job, grouped as the groundworker orders and the crew plans', () => {
    expect(quantityGroups(inGround()).map((g) => [g.title, g.cards.map((c) => c.key)])).toEqual([
      ['The dig', ['pit', 'excavation', 'excavationTime', 'spoil']],
      ['To order', ['subBase', 'concrete', 'blocks']],
      ['Getting the unit in', ['access', 'move', 'crane', 'loading']],
      ['Filling and heating', ['fill', 'heatUp']],
      ['Electrics', ['supply']],
    ]);
  });

  it('names every input with its unit, none left as a bare code', () => {
    const labels = new Set(Object.values(INPUT_LABELS).map(([label]) => label));
    for (const card of quantityGroups(inGround()).flatMap((g) => g.cards)) {
      for (const input of card.inputs) expect(labels, `${card.key}: ${input.label}`).toContain(input.label);
    }
  });

  it('shows the dig from the unit, the gaps, the walls and the working room', () => {
    // 2200 + 150 + 600 at the equipment end = 2950, + 2 × 215 walls (flat) = 3380, + 2 × 300 = 3980 mm;
    // 2200 + 2 × 150 = 2500, + 430 = 2930, + 600 = 3530 mm (gaps and working room: common practice, no source).
    const dig = cardOf('pit');
    expect(dig.headline).toBe('Dig 3980 × 3530 mm (14.0494 m²)');
    expect(dig.inputs).toEqual([
      { label: 'Unit length', value: '2200 mm' },
      { label: 'Unit width', value: '2200 mm' },
      { label: 'Service gap each side', value: '150 mm' },
      { label: 'Gap at the equipment end', value: '600 mm' },
      { label: 'Wall thickness each side', value: '215 mm' },
      { label: 'Working room each side', value: '300 mm' },
    ]);
    expect(dig.formula).toContain(
      '2200 + 150 + 600 at the equipment end = 2950 + 2 × 215 walls = 3380 + 2 × 300 working room = 3980',
    );
    expect(dig.source).toMatch(/common practice, no source/);
  });

  it('says what to order, with the step and the weight that decide it', () => {
    expect(cardOf('concrete').headline).toBe('Order 1.75 m³ of concrete (1.56 m³ with waste)');
    expect(cardOf('subBase').headline).toBe('Order 2.5 t of sub-base (2.08 t needed)');
    // 20.196 m³ loose × 1.8 t/m³ = 36.353 t; a 6 t skip limit fills before its 4.587 m³: 7 skips, or 3 grab-lorry loads.
    expect(cardOf('spoil').headline).toBe('20.196 m³ loose, 36.353 t: 7 skips (weight decides) or 3 grab-lorry loads');
    expect(cardOf('spoil').inputs).toContainEqual({ label: 'Skip weight limit', value: '6 t' });
    // Flat: (2 × (2950 + 2500) + 4 × 215) mm × 0.9 m = 10.584 m² × 21/m² → 223. On edge: 11.3 m × 0.9 = 10.17 m²;
    // 1 ÷ (0.45 × 0.225) = 9.88 → 10/m² → ⌈101.7⌉ = 102 (block size and joints: common practice, no source).
    expect(cardOf('blocks').headline).toBe('223 blocks laid flat (on edge: 102)');
  });

  it('uses the survey: ground in the dig time, steps in the move, loads and earthing in the supply', () => {
    expect(cardOf('excavationTime').inputs).toContainEqual({ label: 'Ground (from the survey)', value: 'clay' });
    expect(cardOf('move').headline).toBe('4 people, 45 min, boards over the steps');
    expect(cardOf('supply').inputs).toContainEqual({
      label: 'Large loads already in the house',
      value: 'EV charger 32 A',
    });
    expect(cardOf('supply').inputs).toContainEqual({ label: 'Earthing (survey)', value: 'TN-S' });
    // 32 A new + 32 A EV charger = 64 A on 80 A = 80 % > 50 %: the electrician checks.
    expect(cardOf('supply').headline).toBe('64 A (80 % of the main fuse): electrician to check the supply');
  });

  it('asks the electrician to look at an unrecorded earth even when the load is modest', () => {
    // 32 A on 80 A = 40 % ≤ 50 % (threshold: common practice, no source), but no earthing arrangement recorded.
    const q = jobQuantities({
      installationType: 'slab',
      unit: AURORA_6,
      survey: { ...SURVEY, evChargerAmps: null, earthingArrangement: null },
      settings: DEFAULT_QUANTITY_SETTINGS,
    });
    const supply = quantityGroups(q)
      .flatMap((g) => g.cards)
      .find((c) => c.key === 'supply');
    expect(supply?.headline).toBe(
      '32 A (40 % of the main fuse): supply looks adequate; the electrician to look at the earthing',
    );
  });

  it('times the fill from the measured flow and the heat-up from physics', () => {
    // 1500 L ÷ 12 L/min = 125 min → 135 min (quarter hours).
    expect(cardOf('fill').headline).toBe('2 h 15 min to fill');
    expect(cardOf('fill').source).toBe('Hose flow measured at the survey');
    // Source: specific heat of water 4.186 kJ/(kg·K) (physics). 1500 × 4.186 × 28 = 175 812 kJ = 48.837 kWh; ÷ 3 kW = 16.28 h.
    const heat = cardOf('heatUp');
    expect(heat.headline).toBe('At least 16.28 h to heat (48.837 kWh)');
    expect(heat.inputs).toContainEqual({ label: 'Heater power', value: '3 kW' });
    expect(heat.inputs).toContainEqual({ label: 'Heater power from', value: "the firm's default" });
    expect(heat.source).toMatch(/^Physics: specific heat of water 4\.186 kJ\/\(kg·K\)/);
  });

  it('writes inputs that are not plain numbers in words', () => {
    expect(
      cardInputs({
        routeHeightMm: null,
        wasteFraction: 0.05,
        circuitAmps: [32, 16],
        existingLoads: [],
        laying: 'on_edge',
        byCrane: false,
      }),
    ).toEqual([
      { label: 'Route height (survey)', value: 'open above' },
      { label: 'Waste allowance', value: '5 %' },
      { label: 'New circuits', value: '32 A + 16 A' },
      { label: 'Large loads already in the house', value: 'none recorded' },
      { label: 'Laid', value: 'on edge' },
      { label: 'Lifted by crane', value: 'no' },
    ]);
    expect([duration(45), duration(105), duration(990)]).toEqual(['45 min', '1 h 45 min', '16 h 30 min']);
  });

  it('renders each card with its inputs, formula and source', async () => {
    const html = await renderHtml(QuantityPanel, { quantities: inGround(), surveyed: true });
    expect(html.match(/class="quantity"/g)).toHaveLength(14);
    expect(html).toContain('Heat-up time');
    expect(html).toContain('<dt>Heater power</dt><dd>3 kW</dd>');
    expect(html).toContain('1500 L × 1 kg/L × 4.186 kJ/(kg·K) × (38 − 10) K = 175812 kJ');
    expect(html).toContain('Physics: specific heat of water 4.186 kJ/(kg·K)');
  });
});
