import { describe, expect, it } from 'vitest';
import { slotGroups } from '@/components/partner/slot-groups';
import type { PartnerSlot } from '@shared/schemas/answers';

function slot(id: string, state: string, startsAt: string): PartnerSlot {
  return {
    id,
    version: 1,
    state,
    startsAt,
    endsAt: new Date(Date.parse(startsAt) + 4 * 3_600_000).toISOString(),
    timeZone: 'Europe/London',
    stage: { name: 'Supply cable first fix', kind: 'electrics_first_fix' },
    resource: { id: '40', name: 'Pat Sparks', kind: 'electrician' },
    site: { address: '4 Mill Row', town: 'Otley', postcode: 'LS21 1AA', accessNotes: null },
    installer: { name: 'Tideway Hot Tubs', phone: null },
    job: { reference: 'TW-7002' },
    unit: null,
    supply: null,
    facing: null,
    contacts: [],
    cautions: [],
    answer: null,
  };
}

describe("the partner's slots page", () => {
  it('puts the slots still to answer first, each group in the order of its starts', () => {
    const groups = slotGroups([
      slot('1', 'confirmed', '2026-12-07T08:00:00Z'),
      slot('2', 'sent', '2026-12-08T08:00:00Z'),
      slot('3', 'on_site', '2026-12-09T08:00:00Z'),
      slot('4', 'sent', '2026-12-10T08:00:00Z'),
    ]);
    expect(groups.map((g) => [g.title, g.slots.map((s) => s.id)])).toEqual([
      ['Waiting for your answer', ['2', '4']],
      ['Confirmed and under way', ['1', '3']],
    ]);
  });

  it('leaves out a group with nothing in it', () => {
    expect(slotGroups([slot('1', 'confirmed', '2026-12-07T08:00:00Z')]).map((g) => g.key)).toEqual(['booked']);
    expect(slotGroups([slot('2', 'sent', '2026-12-08T08:00:00Z')]).map((g) => g.key)).toEqual(['answer']);
    expect(slotGroups([])).toEqual([]);
  });
});
