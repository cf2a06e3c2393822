import { round, requireNumber, roundUpToStep, type Computation } from './types.ts';

export interface BaseConcreteInputs {
  areaM2: number;
  thicknessMm: number;
  wasteFraction: number;
  orderStepM3: number;
}
export interface BaseConcrete {
  netVolumeM3: number;
  /** The net volume plus the waste allowance: what is needed, before rounding to the supplier's step. */
  withWasteM3: number;
  /** What is ordered: the volume with waste rounded up to a whole number of order steps. */
  orderVolumeM3: number;
}

/**
 * Concrete for the base or slab: area × thickness, plus the waste allowance, rounded up to the firm's
 * order step (ready-mixed concrete is sold in steps, e.g. 0.25 m³).
 * @example
 * baseConcrete({ areaM2: 6.25, thicknessMm: 150, wasteFraction: 0.05, orderStepM3: 0.25 }).result
 * // { netVolumeM3: 0.938, withWasteM3: 0.984, orderVolumeM3: 1 }  (6.25 × 0.15 = 0.9375; × 1.05 = 0.984375 → 1.00)
 */
export function baseConcrete(inputs: BaseConcreteInputs): Computation<BaseConcreteInputs, BaseConcrete> {
  const { areaM2: a, thicknessMm: t, wasteFraction: w, orderStepM3: step } = inputs;
  requireNumber('areaM2', a);
  requireNumber('thicknessMm', t, 0, true);
  requireNumber('wasteFraction', w);
  requireNumber('orderStepM3', step, 0, true);
  const net = a * (t / 1000);
  const withWaste = net * (1 + w);
  const netVolumeM3 = round(net);
  const withWasteM3 = round(withWaste);
  const orderVolumeM3 = roundUpToStep(withWaste, step);
  return {
    name: 'Base concrete',
    inputs: { ...inputs },
    formula: `${a} m² × ${t / 1000} m = ${netVolumeM3} m³; × (1 + ${w}) = ${withWasteM3} m³; rounded up to ${step} m³ steps = ${orderVolumeM3} m³ to order`,
    result: { netVolumeM3, withWasteM3, orderVolumeM3 },
    unit: 'm³',
    notes: [
      'Base thickness default 150 mm and waste 5 %: common practice, no source. The base design for a large unit is for a competent person to confirm.',
      "The order step is the supplier's (often 0.25 or 0.5 m³); many have a minimum load too: ask them.",
    ],
  };
}
