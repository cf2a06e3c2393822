import { requireNumber, type Computation } from './types.ts';

export interface AccessInputs {
  unitWidthMm: number;
  unitHeightMm: number;
  unitDryWeightKg: number;
  /** Narrowest width and height along the route from the road to the position. */
  routeWidthMm: number;
  /** null when nothing limits the height (open sky). */
  routeHeightMm: number | null;
  widthAllowanceMm: number;
  dollyHeightMm: number;
  uprightRaiseMm: number;
  maxDollyDryWeightKg: number;
}
export type AccessWay = 'upright' | 'on_side' | 'crane';
export interface AccessCheck {
  way: AccessWay;
  upright: { widthNeededMm: number; heightNeededMm: number; fits: boolean };
  onSide: { widthNeededMm: number; heightNeededMm: number; fits: boolean; tooHeavy: boolean };
  reason: string;
}

/**
 * Whether a unit can go along the access route upright (on pallet trucks or skates), or on its side
 * on a dolly; otherwise it needs a crane.
 * Upright it needs width W + allowance and height H + raise; on its side its height H becomes the
 * width (H + allowance) and its width W the height (W + dolly).
 * @example
 * accessCheck({ unitWidthMm: 2200, unitHeightMm: 900, unitDryWeightKg: 380, routeWidthMm: 1100, routeHeightMm: 2400,
 *   widthAllowanceMm: 100, dollyHeightMm: 150, uprightRaiseMm: 100, maxDollyDryWeightKg: 600 }).result.way
 * // 'on_side'  (900 + 100 = 1000 ≤ 1100 wide; 2200 + 150 = 2350 ≤ 2400 high)
 */
export function accessCheck(inputs: AccessInputs): Computation<AccessInputs, AccessCheck> {
  const i = inputs;
  requireNumber('unitWidthMm', i.unitWidthMm, 0, true);
  requireNumber('unitHeightMm', i.unitHeightMm, 0, true);
  requireNumber('routeWidthMm', i.routeWidthMm);
  if (i.routeHeightMm !== null) requireNumber('routeHeightMm', i.routeHeightMm);
  const heightOk = (needed: number) => i.routeHeightMm === null || needed <= i.routeHeightMm;
  const uw = i.unitWidthMm + i.widthAllowanceMm;
  const uh = i.unitHeightMm + i.uprightRaiseMm;
  const upright = { widthNeededMm: uw, heightNeededMm: uh, fits: uw <= i.routeWidthMm && heightOk(uh) };
  const sw = i.unitHeightMm + i.widthAllowanceMm;
  const sh = i.unitWidthMm + i.dollyHeightMm;
  const tooHeavy = i.unitDryWeightKg > i.maxDollyDryWeightKg;
  const onSide = {
    widthNeededMm: sw,
    heightNeededMm: sh,
    fits: sw <= i.routeWidthMm && heightOk(sh) && !tooHeavy,
    tooHeavy,
  };
  const way: AccessWay = upright.fits ? 'upright' : onSide.fits ? 'on_side' : 'crane';
  const h = i.routeHeightMm === null ? 'no height limit' : `${i.routeHeightMm} mm high`;
  const reason =
    way === 'upright'
      ? `Upright it needs ${uw} × ${uh} mm; the route is ${i.routeWidthMm} mm wide, ${h}.`
      : way === 'on_side'
        ? `Upright needs ${uw} mm of width; on its side on a dolly it needs ${sw} mm wide × ${sh} mm high, and the route is ${i.routeWidthMm} mm wide, ${h}.`
        : tooHeavy && sw <= i.routeWidthMm && heightOk(sh)
          ? `At ${i.unitDryWeightKg} kg dry it is over the ${i.maxDollyDryWeightKg} kg limit for a dolly; upright it needs ${uw} mm of width.`
          : `Upright needs ${uw} × ${uh} mm and on its side ${sw} × ${sh} mm; the route is ${i.routeWidthMm} mm wide, ${h}.`;
  return {
    name: 'Access check',
    inputs: { ...inputs },
    formula:
      `upright: ${i.unitWidthMm} + ${i.widthAllowanceMm} = ${uw} mm wide, ${i.unitHeightMm} + ${i.uprightRaiseMm} = ${uh} mm high; ` +
      `on its side: ${i.unitHeightMm} + ${i.widthAllowanceMm} = ${sw} mm wide, ${i.unitWidthMm} + ${i.dollyHeightMm} = ${sh} mm high; route ${i.routeWidthMm} mm wide, ${h}`,
    result: { way, upright, onSide, reason },
    unit: '',
    notes: [
      'Width allowance, dolly height, raise and the dolly weight limit: common practice, no source. Steps and slopes need a team lift plan.',
    ],
  };
}

export interface MoveInInputs {
  /** Lifted in by crane (over the route) rather than moved along it by hand. */
  byCrane: boolean;
  /** Steps along the route, from the survey. */
  steps: number;
  crew: number;
  extraCrewOnSteps: number;
  minutes: number;
  minutesPerStep: number;
}
export interface MoveIn {
  people: number;
  minutes: number;
  boards: boolean;
}

/**
 * Moving the unit from the road to its position along the surveyed route. Steps slow it (minutes per step)
 * and need boards laid over them and more hands; a crane lift carries the unit over them.
 * @example
 * moveIn({ byCrane: false, steps: 4, crew: 2, extraCrewOnSteps: 2, minutes: 30, minutesPerStep: 5 }).result
 * // { people: 4, minutes: 50, boards: true }  (30 + 4 × 5 = 50 min; 2 + 2 people)
 */
export function moveIn(inputs: MoveInInputs): Computation<MoveInInputs, MoveIn> {
  const { byCrane, steps, crew, extraCrewOnSteps: extra, minutes: base, minutesPerStep: perStep } = inputs;
  requireNumber('steps', steps);
  requireNumber('crew', crew, 0, true);
  requireNumber('extraCrewOnSteps', extra);
  requireNumber('minutes', base);
  requireNumber('minutesPerStep', perStep);
  if (byCrane) {
    return {
      name: 'Moving the unit in',
      inputs: { ...inputs },
      formula: `crane lift: ${crew} people to guide and land it; the route's ${steps} step${steps === 1 ? '' : 's'} not used`,
      result: { people: crew, minutes: base, boards: false },
      unit: 'min',
      notes: ['The lift itself is planned with the crane firm; steps on the route do not slow it.'],
    };
  }
  const onSteps = steps > 0;
  const people = crew + (onSteps ? extra : 0);
  const minutes = base + steps * perStep;
  return {
    name: 'Moving the unit in',
    inputs: { ...inputs },
    formula: onSteps
      ? `${base} min + ${steps} step${steps === 1 ? '' : 's'} × ${perStep} min = ${minutes} min; ${crew} + ${extra} people on steps = ${people}; boards over the steps`
      : `${base} min on a level route; ${crew} people`,
    result: { people, minutes, boards: onSteps },
    unit: 'min',
    notes: [
      'People, minutes and the extra hands on steps: common practice, no source.',
      ...(onSteps
        ? [
            'Steps need boards or a ramp laid over them and a plan for each lift of the unit: a team lift, never one person.',
          ]
        : []),
    ],
  };
}
