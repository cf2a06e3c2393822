import { round, requireNumber, type Computation } from './types.ts';

export interface BaseConcreteInputs { areaM2: number; thicknessMm: number; wasteFraction: number }
export interface BaseConcrete { netVolumeM3: number; orderVolumeM3: number }

/**
 * Concrete for the base or slab: area × thickness, plus the waste allowance.
 * @example
 * baseConcrete({ areaM2: 6.25, thicknessMm: 150, wasteFraction: 0.05 }).result
 * // { netVolumeM3: 0.938, orderVolumeM3: 0.984 }  (6.25 × 0.15 = 0.9375; × 1.05 = 0.984375)
 */
export function baseConcrete(inputs: BaseConcreteInputs): Computation<BaseConcreteInputs, BaseConcrete> {
  const { areaM2: a, thicknessMm: t, wasteFraction: w } = inputs;
  requireNumber('areaM2', a);
  requireNumber('thicknessMm', t, 0, true);
  requireNumber('wasteFraction', w);
  const net = a * (t / 1000);
  const netVolumeM3 = round(net);
  const orderVolumeM3 = round(net * (1 + w));
  return {
    name: 'Base concrete',
    inputs: { ...inputs },
    formula: `${a} m² × ${t / 1000} m = ${netVolumeM3} m³; × (1 + ${w}) = ${orderVolumeM3} m³ to order`,
    result: { netVolumeM3, orderVolumeM3 },
    unit: 'm³',
    notes: ['Base thickness default 150 mm and waste 5 %: common practice, no source. The base design for a large unit is for a competent person to confirm.'],
  };
}
