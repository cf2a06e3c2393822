import type { Computation } from './types.ts';
import type { AccessWay } from './access.ts';

export interface CraneInputs {
  accessWay: AccessWay | null;
  surveyorSaysCrane: boolean | null;
  overheadObstructions: boolean;
}
export interface CraneDecision {
  needed: boolean;
  reason: string;
}

/**
 * Whether the install needs a crane lift: the surveyor's call when they made one, otherwise the
 * access check's answer. With no survey yet there is no decision to make: the default is a crane,
 * the safe side, until the route is measured.
 * @example
 * craneDecision({ accessWay: 'on_side', surveyorSaysCrane: null, overheadObstructions: false }).result
 * // { needed: false, reason: 'The unit goes along the route on its side on a dolly.' }
 */
export function craneDecision(inputs: CraneInputs): Computation<CraneInputs, CraneDecision> {
  const { accessWay, surveyorSaysCrane, overheadObstructions } = inputs;
  let result: CraneDecision;
  if (surveyorSaysCrane !== null) {
    result = {
      needed: surveyorSaysCrane,
      reason: surveyorSaysCrane ? 'The surveyor asked for a crane lift.' : 'The surveyor ruled out a crane.',
    };
  } else if (accessWay === null) {
    result = { needed: true, reason: 'No survey yet: planned with a crane until the access route is measured.' };
  } else if (accessWay === 'crane') {
    result = { needed: true, reason: 'The unit does not pass the access route upright or on its side.' };
  } else {
    result = {
      needed: false,
      reason:
        accessWay === 'upright'
          ? 'The unit goes along the route upright.'
          : 'The unit goes along the route on its side on a dolly.',
    };
  }
  const notes =
    result.needed && overheadObstructions
      ? ['Overhead obstructions were recorded: the lift plan must keep clear of them (power lines above all).']
      : [];
  return {
    name: 'Crane decision',
    inputs: { ...inputs },
    formula:
      surveyorSaysCrane !== null
        ? `surveyor's call: ${surveyorSaysCrane ? 'crane' : 'no crane'}`
        : `access check: ${accessWay ?? 'not measured'}`,
    result,
    unit: '',
    notes,
  };
}
