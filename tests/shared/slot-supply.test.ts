import { describe, expect, it } from 'vitest';
import { NOT_SURVEYED_LINE, slotSupply, supplyLines } from '../../shared/slot-supply.ts';

// Figures worked by hand: 32 A × 230 V = 7,360 W ≈ 7.4 kW (230 V: IEC 60038 nominal, from memory).
describe("an electrician's supply facts", () => {
  it('say once that the site has not been surveyed, not four times', () => {
    expect(supplyLines(slotSupply([{ amps: 32 }], null))).toEqual([
      'Unit load: 32 A (one dedicated supply), about 7.4 kW at 230 V',
      NOT_SURVEYED_LINE,
    ]);
  });

  it('name each fact the survey left out', () => {
    const lines = supplyLines(
      slotSupply([], { mainFuseAmps: 100, earthingArrangement: null, consumerUnitDistanceM: '9.0' }),
    );
    expect(lines).toEqual([
      "Unit load: not in the unit's data; ask the installer",
      'Main fuse: 100 A',
      'Earthing: not recorded at the survey',
      'Consumer unit: not recorded at the survey',
      'Cable run from the consumer unit to the spa: 9 m',
    ]);
  });
});
