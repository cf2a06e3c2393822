import { round, requireNumber, type Computation } from './types.ts';

/** Standard gravity, m/s² (3rd CGPM, 1901; BIPM). */
export const STANDARD_GRAVITY = 9.80665;

export interface BaseLoadingInputs {
  filledWeightKg: number;
  unitLengthMm: number;
  unitWidthMm: number;
}
export interface BaseLoading {
  forceKN: number;
  footprintM2: number;
  pressureKNPerM2: number;
}

/**
 * The filled unit's weight spread over its footprint on the base: m × g ÷ (L × W).
 * @example
 * baseLoading({ filledWeightKg: 2300, unitLengthMm: 2200, unitWidthMm: 2200 }).result
 * // { forceKN: 22.555, footprintM2: 4.84, pressureKNPerM2: 4.66 }
 */
export function baseLoading(inputs: BaseLoadingInputs): Computation<BaseLoadingInputs, BaseLoading> {
  const { filledWeightKg: m, unitLengthMm: l, unitWidthMm: w } = inputs;
  requireNumber('filledWeightKg', m);
  requireNumber('unitLengthMm', l, 0, true);
  requireNumber('unitWidthMm', w, 0, true);
  const force = (m * STANDARD_GRAVITY) / 1000;
  const area = (l / 1000) * (w / 1000);
  const pressureKNPerM2 = round(force / area, 2);
  return {
    name: 'Load on the base',
    inputs: { ...inputs },
    formula: `${m} kg × ${STANDARD_GRAVITY} m/s² = ${round(force)} kN; ÷ (${l / 1000} × ${w / 1000}) m² = ${pressureKNPerM2} kN/m²`,
    result: { forceKN: round(force), footprintM2: round(area, 4), pressureKNPerM2 },
    unit: 'kN/m²',
    notes: [
      "g = 9.80665 m/s², standard gravity (CGPM 1901). Filled weight as the maker states it; bathers add to it. A deck or roof needs a structural engineer's check.",
    ],
  };
}
