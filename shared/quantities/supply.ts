import { round, requireNumber, type Computation } from './types.ts';

export interface SupplyInputs { circuitAmps: number[]; mainFuseAmps: number | null; checkFraction: number }
export type SupplyVerdict = 'ok' | 'check' | 'exceeds' | 'unknown';
export interface SupplyCheck { totalAmps: number; shareOfFuse: number | null; verdict: SupplyVerdict; message: string }

/**
 * Flags a house supply that may be too small: the unit's new circuits added up against the main fuse.
 * Over `checkFraction` of the fuse → an electrician (and perhaps the network operator) checks the
 * supply; at or over the whole fuse → it exceeds it.
 * @example
 * supplyCheck({ circuitAmps: [32, 32], mainFuseAmps: 60, checkFraction: 0.5 }).result
 * // { totalAmps: 64, shareOfFuse: 1.067, verdict: 'exceeds', message: … }
 */
export function supplyCheck(inputs: SupplyInputs): Computation<SupplyInputs, SupplyCheck> {
  const { circuitAmps, mainFuseAmps: fuse, checkFraction: f } = inputs;
  circuitAmps.forEach((a, n) => requireNumber(`circuitAmps[${n}]`, a));
  requireNumber('checkFraction', f);
  const totalAmps = circuitAmps.reduce((s, a) => s + a, 0);
  const sum = circuitAmps.length ? circuitAmps.join(' + ') : '0';
  if (fuse === null || fuse <= 0) {
    return {
      name: 'Supply check', inputs: { ...inputs, circuitAmps: [...circuitAmps] },
      formula: `${sum} = ${totalAmps} A; main fuse not recorded`,
      result: { totalAmps, shareOfFuse: null, verdict: 'unknown', message: 'Record the main fuse rating at the survey.' },
      unit: 'A', notes: [],
    };
  }
  const share = totalAmps / fuse;
  const verdict: SupplyVerdict = totalAmps >= fuse ? 'exceeds' : share > f ? 'check' : 'ok';
  const message = verdict === 'ok'
    ? 'New circuits are a modest share of the main fuse; the electrician still confirms the supply.'
    : verdict === 'check'
      ? `New circuits are over ${Math.round(f * 100)} % of the main fuse: the electrician checks the supply before ordering.`
      : 'New circuits reach or exceed the main fuse: the electrician and the network operator must check the supply.';
  return {
    name: 'Supply check',
    inputs: { ...inputs, circuitAmps: [...circuitAmps] },
    formula: `${sum} = ${totalAmps} A; ${totalAmps} ÷ ${fuse} A = ${round(share * 100, 1)} % of the main fuse (check above ${Math.round(f * 100)} %)`,
    result: { totalAmps, shareOfFuse: round(share), verdict, message },
    unit: 'A',
    notes: ['The 50 % threshold is common practice, no source. Only a registered/licensed electrician decides; follow local codes and licensed practice.'],
  };
}
