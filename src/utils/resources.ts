import type { ResourceRow } from '@/api/types';

export interface KindGroup {
  kind: string;
  items: ResourceRow[];
}
export interface FirmGroup {
  firmId: ResourceRow['firmId'];
  firmName: string;
  firmKind: string;
  kinds: KindGroup[];
  count: number;
}

const byName = (a: string, b: string) => a.localeCompare(b, 'en-GB', { sensitivity: 'base' });

/**
 * Groups resources by firm, then by kind. The person's own firm comes first, then the others by
 * name; kinds and resources are in name order. The input is not changed.
 * @example groupResources(items, { ownFirmId: 1 })[0].firmId // 1
 */
export function groupResources(
  items: readonly ResourceRow[],
  options: { ownFirmId?: ResourceRow['firmId'] } = {},
): FirmGroup[] {
  const firms = new Map<string, FirmGroup>();
  for (const item of items) {
    const key = String(item.firmId);
    let firm = firms.get(key);
    if (!firm) {
      firm = { firmId: item.firmId, firmName: item.firmName, firmKind: item.firmKind, kinds: [], count: 0 };
      firms.set(key, firm);
    }
    let kind = firm.kinds.find((group) => group.kind === item.kind);
    if (!kind) {
      kind = { kind: item.kind, items: [] };
      firm.kinds.push(kind);
    }
    kind.items.push(item);
    firm.count += 1;
  }
  const own = options.ownFirmId === undefined ? null : String(options.ownFirmId);
  const groups = [...firms.values()];
  for (const firm of groups) {
    firm.kinds.sort((a, b) => byName(a.kind, b.kind));
    for (const kind of firm.kinds) kind.items.sort((a, b) => byName(a.name, b.name));
  }
  return groups.sort((a, b) => {
    if (own !== null && String(a.firmId) === own) return -1;
    if (own !== null && String(b.firmId) === own) return 1;
    return byName(a.firmName, b.firmName);
  });
}
