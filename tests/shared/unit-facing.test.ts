import { describe, expect, it } from 'vitest';
import { unitFacingLine } from '../../shared/unit-facing.ts';

// Which way the unit faces is settled before it goes in: it can't be turned in a pit (trade practice,
// common practice, no source).
describe('which way the unit faces, on the visits that set it down', () => {
  it('says it on the delivery, the lift and the placement', () => {
    for (const kind of ['delivery', 'lift', 'placement'])
      expect(unitFacingLine(kind, 'in_ground', '  Controls towards the house ')).toBe(
        'Unit faces: Controls towards the house',
      );
  });

  it('reminds the crew to settle it where the unit goes into a pit or a recess and nobody has', () => {
    const reminder =
      "Which way the unit faces is not settled: agree it with the householder before it goes in (it can't be turned in the pit)";
    expect(unitFacingLine('lift', 'in_ground', null)).toBe(reminder);
    expect(unitFacingLine('placement', 'semi_recessed', '  ')).toBe(reminder);
  });

  it('says nothing where the unit can still be turned, or to stages that do not set it down', () => {
    expect(unitFacingLine('lift', 'slab', null)).toBeNull();
    expect(unitFacingLine('placement', 'deck', null)).toBeNull();
    expect(unitFacingLine('fill', 'in_ground', 'Controls towards the house')).toBeNull();
    expect(unitFacingLine('excavation', 'in_ground', null)).toBeNull();
  });
});
