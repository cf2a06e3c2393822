import { describe, expect, it } from 'vitest';
import type { ResourceRow } from '@/api/types';
import { groupResources } from '@/utils/resources';

// Invented firms: an installer with its own crew and dumper, a plant hire firm and a crane firm.
const row = (
  id: number,
  name: string,
  kind: string,
  firmId: number,
  firmName: string,
  ownership: ResourceRow['ownership'],
): ResourceRow => ({
  id,
  name,
  kind,
  firmId,
  firmName,
  ownership,
  category: kind === 'crew' ? 'crew' : 'machine',
  firmKind: firmId === 1 ? 'installer' : 'plant_hire',
});
const items: ResourceRow[] = [
  row(5, 'Crane 40 t', 'crane', 3, 'Beacon Lifting', 'partner'),
  row(2, 'Tracked dumper', 'dumper', 1, 'Tidewell Spas', 'owned'),
  row(4, 'Mini excavator 1.5 t', 'excavator', 2, 'Anvil Plant Hire', 'hired'),
  row(1, 'Crew B', 'crew', 1, 'Tidewell Spas', 'owned'),
  row(3, 'Crew A', 'crew', 1, 'Tidewell Spas', 'owned'),
];

describe('groupResources', () => {
  it('puts the own firm first, then the others by name', () => {
    const groups = groupResources(items, { ownFirmId: 1 });
    expect(groups.map((g) => g.firmName)).toEqual(['Tidewell Spas', 'Anvil Plant Hire', 'Beacon Lifting']);
    expect(groups.map((g) => g.count)).toEqual([3, 1, 1]);
  });

  it('groups by kind within a firm, kinds and names in order', () => {
    const [own] = groupResources(items, { ownFirmId: 1 });
    expect(own?.kinds.map((k) => [k.kind, k.items.map((i) => i.name)])).toEqual([
      ['crew', ['Crew A', 'Crew B']],
      ['dumper', ['Tracked dumper']],
    ]);
  });

  it('does not change its input', () => {
    const before = items.map((i) => i.id);
    groupResources(items, { ownFirmId: 1 });
    expect(items.map((i) => i.id)).toEqual(before);
  });

  it('gives no groups for no resources', () => {
    expect(groupResources([])).toEqual([]);
  });
});
