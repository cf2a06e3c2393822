/**
 * Which way the unit faces, said to the people who put it in: the delivery, the lift and the
 * placement. A spa lowered into a pit or a recess can't be turned there, so the way it faces is
 * settled before (DOMAIN: "the orientation of the unit must be settled before it goes in").
 */

/** The stages that set the unit down where it stays. */
const GOING_IN = new Set(['delivery', 'lift', 'placement']);

/** Whether a stage sets the unit down where it stays (the delivery, the lift, the placement). */
export function setsUnitDown(stageKind: string): boolean {
  return GOING_IN.has(stageKind);
}
/** Installations where a unit set down in the wrong way can't be turned. */
const CANT_TURN = new Set(['in_ground', 'semi_recessed']);

/**
 * The line for a visit, or null where it says nothing to this stage.
 *
 * @example
 * unitFacingLine('lift', 'in_ground', 'Controls towards the house') // 'Unit faces: Controls towards the house'
 * unitFacingLine('lift', 'in_ground', null) // "Which way the unit faces is not settled: …"
 * unitFacingLine('fill', 'in_ground', 'Controls towards the house') // null
 */
export function unitFacingLine(stageKind: string, installationType: string, unitFacing: string | null): string | null {
  if (!GOING_IN.has(stageKind)) return null;
  const facing = unitFacing?.trim();
  if (facing) return `Unit faces: ${facing}`;
  return CANT_TURN.has(installationType)
    ? "Which way the unit faces is not settled: agree it with the householder before it goes in (it can't be turned in the pit)"
    : null;
}
