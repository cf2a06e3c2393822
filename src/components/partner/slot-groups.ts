import type { PartnerSlot } from '@shared/schemas/answers';

/** One heading of the partner's slots page and the slots under it, in the order the server sent them (by start). */
export interface SlotGroup {
  key: 'answer' | 'booked';
  title: string;
  slots: PartnerSlot[];
}

/**
 * The partner's slots in two groups, those still waiting for an answer first (what they came to
 * do), then those confirmed or under way. Empty groups are left out.
 *
 * @example
 * slotGroups([confirmedMon, sentTue]) // [{ key: 'answer', slots: [sentTue] }, { key: 'booked', slots: [confirmedMon] }]
 */
export function slotGroups(slots: readonly PartnerSlot[]): SlotGroup[] {
  const answer = slots.filter((s) => s.state === 'sent');
  const booked = slots.filter((s) => s.state !== 'sent');
  const groups: SlotGroup[] = [];
  if (answer.length > 0) groups.push({ key: 'answer', title: 'Waiting for your answer', slots: answer });
  if (booked.length > 0) groups.push({ key: 'booked', title: 'Confirmed and under way', slots: booked });
  return groups;
}
