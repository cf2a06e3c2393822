import { round, requireNumber, type Computation } from './types.ts';

/**
 * How the house's electrical installation is earthed, by the system names of IEC 60364 and the wiring rules
 * built on it (from memory); "unknown" when the surveyor could not tell.
 */
export const EARTHING_ARRANGEMENTS = ['TN-C-S', 'TN-S', 'TT', 'unknown'] as const;
export type EarthingArrangement = (typeof EARTHING_ARRANGEMENTS)[number];

/** A large load already on the house's supply (an EV charger, an electric shower, a heat pump…). */
export interface ExistingLoad {
  name: string;
  amps: number;
}

export interface SupplyInputs {
  /** The unit's new circuits. */
  circuitAmps: number[];
  existingLoads: ExistingLoad[];
  mainFuseAmps: number | null;
  checkFraction: number;
  /** As recorded at the survey; null when not recorded. */
  earthing: EarthingArrangement | null;
}
export type SupplyVerdict = 'ok' | 'check' | 'exceeds' | 'unknown';
export interface SupplyCheck {
  newAmps: number;
  existingAmps: number;
  /** New circuits plus the existing large loads, at their rated currents. */
  totalAmps: number;
  shareOfFuse: number | null;
  verdict: SupplyVerdict;
  message: string;
  earthing: EarthingArrangement | null;
  earthingNote: string;
  /** Whether the supply needs the electrician's look before the unit is ordered, and why. */
  electricianToLook: boolean;
  reasons: string[];
}

const EARTHING_NOTES: Record<EarthingArrangement | 'none', string> = {
  none: 'Earthing arrangement not recorded: note it at the survey (it is usually marked at the meter or the consumer unit).',
  unknown: 'The surveyor could not tell the earthing arrangement: the electrician establishes it.',
  'TN-C-S':
    "TN-C-S (PME): the wiring rules put conditions on outdoor equipment fed from a PME earth (from memory); the electrician decides how the unit's circuit is earthed.",
  'TN-S': "TN-S: an earth provided by the supplier's cable; the electrician confirms it.",
  TT: 'TT: the house relies on its own earth electrode and RCDs; the electrician tests the electrode.',
};

/**
 * Flags a house supply that may be too small, and records how it is earthed, for the electrician. The unit's
 * new circuits and the large loads already in the house are added up (rated currents, no diversity) against
 * the main fuse: over `checkFraction` of it → the electrician checks the supply; at or over the whole fuse →
 * it exceeds it. An earthing arrangement other than TN-S, or none recorded, also asks for the electrician's
 * look. This is not an electrical design: the registered electrician decides, under the wiring rules.
 * @example
 * supplyCheck({ circuitAmps: [32], existingLoads: [{ name: 'EV charger', amps: 32 }], mainFuseAmps: 100, checkFraction: 0.5, earthing: 'TN-S' }).result
 * // { newAmps: 32, existingAmps: 32, totalAmps: 64, shareOfFuse: 0.64, verdict: 'check', electricianToLook: true, … }
 */
export function supplyCheck(inputs: SupplyInputs): Computation<SupplyInputs, SupplyCheck> {
  const { circuitAmps, existingLoads, mainFuseAmps: fuse, checkFraction: f, earthing } = inputs;
  circuitAmps.forEach((a, n) => requireNumber(`circuitAmps[${n}]`, a));
  existingLoads.forEach((l, n) => requireNumber(`existingLoads[${n}].amps`, l.amps));
  requireNumber('checkFraction', f);
  const newAmps = circuitAmps.reduce((s, a) => s + a, 0);
  const existingAmps = existingLoads.reduce((s, l) => s + l.amps, 0);
  const totalAmps = newAmps + existingAmps;
  const newSum = `new circuits ${circuitAmps.length ? circuitAmps.join(' + ') : '0'} = ${newAmps} A`;
  const existingSum = existingLoads.length
    ? `; existing large loads ${existingLoads.map((l) => `${l.name} ${l.amps} A`).join(' + ')} = ${existingAmps} A; ${newAmps} + ${existingAmps} = ${totalAmps} A`
    : '; no existing large loads recorded';
  const earthingNote = EARTHING_NOTES[earthing ?? 'none'];
  const earthingText = `; earthing ${earthing ?? 'not recorded'}`;

  let share: number | null = null;
  let verdict: SupplyVerdict;
  let message: string;
  let loadFormula: string;
  if (fuse === null || fuse <= 0) {
    verdict = 'unknown';
    message = 'Record the main fuse rating at the survey.';
    loadFormula = '; main fuse not recorded';
  } else {
    share = totalAmps / fuse;
    verdict = totalAmps >= fuse ? 'exceeds' : share > f ? 'check' : 'ok';
    message =
      verdict === 'ok'
        ? 'The new circuits and the large loads already in the house are a modest share of the main fuse.'
        : verdict === 'check'
          ? `The new circuits and the large loads already in the house come to over ${Math.round(f * 100)} % of the main fuse: the electrician checks the supply before the unit is ordered.`
          : 'The new circuits and the large loads already in the house reach or exceed the main fuse, before any allowance for diversity: the electrician and the network operator must check the supply.';
    loadFormula = `; ${totalAmps} ÷ ${fuse} A = ${round(share * 100, 1)} % of the main fuse (check above ${Math.round(f * 100)} %)`;
  }
  const reasons = [...(verdict === 'ok' ? [] : [message]), ...(earthing === 'TN-S' ? [] : [earthingNote])];
  const electricianToLook = reasons.length > 0;
  return {
    name: 'Supply check',
    inputs: { ...inputs, circuitAmps: [...circuitAmps], existingLoads: existingLoads.map((l) => ({ ...l })) },
    formula: `${newSum}${existingSum}${loadFormula}${earthingText}${electricianToLook ? ' → the electrician to look before ordering' : ''}`,
    result: {
      newAmps,
      existingAmps,
      totalAmps,
      shareOfFuse: share === null ? null : round(share),
      verdict,
      message,
      earthing,
      earthingNote,
      electricianToLook,
      reasons,
    },
    unit: 'A',
    notes: [
      'Not an electrical design: a plain sum of rated currents with no allowance for diversity. The registered electrician assesses the maximum demand, the earthing and the circuit under the wiring rules in force, and alone decides.',
      `The ${Math.round(f * 100)} % threshold is the firm's (default 50 %: common practice, no source). Only the large loads the surveyor recorded are counted.`,
      earthingNote,
      'Follow local codes and licensed practice.',
    ],
  };
}
