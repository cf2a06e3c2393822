import { round, requireNumber, roundUpToStep, type Computation } from './types.ts';

export interface SubBaseInputs {
  areaM2: number;
  thicknessMm: number;
  densityTPerM3: number;
  orderStepT: number;
}
export interface SubBase {
  volumeM3: number;
  tonnes: number;
  orderTonnes: number;
}

/**
 * Crushed-stone sub-base under the base, by weight as it is sold: area × compacted thickness × compacted
 * density, rounded up to the firm's order step.
 * @example
 * subBase({ areaM2: 9.9034, thicknessMm: 100, densityTPerM3: 2.1, orderStepT: 0.5 }).result
 * // { volumeM3: 0.99, tonnes: 2.08, orderTonnes: 2.5 }  (9.9034 × 0.1 = 0.99034 m³; × 2.1 = 2.0797 t → 2.5 t)
 */
export function subBase(inputs: SubBaseInputs): Computation<SubBaseInputs, SubBase> {
  const { areaM2: a, thicknessMm: t, densityTPerM3: d, orderStepT: step } = inputs;
  requireNumber('areaM2', a);
  requireNumber('thicknessMm', t);
  requireNumber('densityTPerM3', d, 0, true);
  requireNumber('orderStepT', step, 0, true);
  const volume = a * (t / 1000);
  const tonnes = volume * d;
  const orderTonnes = roundUpToStep(tonnes, step);
  return {
    name: 'Sub-base',
    inputs: { ...inputs },
    formula: `${a} m² × ${t / 1000} m = ${round(volume)} m³ compacted; × ${d} t/m³ = ${round(tonnes)} t → ${orderTonnes} t to order (in ${step} t steps)`,
    result: { volumeM3: round(volume), tonnes: round(tonnes), orderTonnes },
    unit: 't',
    notes: [
      `Compacted density ${d} t/m³ for a Type 1-like crushed stone: from memory, suppliers quote about 2.0–2.2 t/m³; common practice, no source.`,
      "Laid under the base (to the outside faces of the walls) and compacted in layers; the supplier's figure for its own stone wins.",
    ],
  };
}
