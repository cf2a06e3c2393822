import { describe, expect, it } from 'vitest';
import { addBooking, bookingLists, orderedByResource } from '../../../shared/scheduler/booking-lists.js';
import type { Booking } from '../../../shared/scheduler/types.js';

const HOUR = 3_600_000;
const MON = Date.UTC(2026, 4, 11, 7); // Mon 11 May 2026 08:00 BST

function booking(id: string, resourceId: string, startHours: number, hours = 2): Booking {
  return {
    id,
    stageId: `stage-${id}`,
    resourceId,
    start: MON + startHours * HOUR,
    end: MON + (startHours + hours) * HOUR,
    state: 'confirmed',
    installerFirmId: 'firm-1',
  };
}

/** The lists as `resource: ids`, resources in the order the map gives them. */
function gathered(bookings: Booking[]): string[] {
  const lists = bookingLists(10);
  for (const b of bookings) addBooking(lists, lists.numbers.get(b.resourceId), b);
  return [...orderedByResource(lists)].map(([rid, { list }]) => `${rid}: ${list.map((b) => b.id).join(' ')}`);
}

describe('bookings gathered per resource (booking-lists, the board index’s bookingsByResource)', () => {
  it('gives each resource its bookings by start, resources in the order of their first booking', () => {
    expect(
      gathered([
        booking('c1', 'crane-1', 0),
        booking('e1', 'crew-1', 1),
        booking('c2', 'crane-1', 5),
        booking('c0', 'crane-1', 3),
        booking('e0', 'crew-1', -4),
      ]),
    ).toEqual(['crane-1: c1 c0 c2', 'crew-1: e0 e1']);
  });

  it('orders bookings with the same start by id, also when the later id comes first', () => {
    expect(
      gathered([booking('b-2', 'crane-1', 0), booking('b-1', 'crane-1', 0), booking('b-3', 'crane-1', 0)]),
    ).toEqual(['crane-1: b-1 b-2 b-3']);
  });

  it('leaves a list that came in order as it came', () => {
    expect(gathered([booking('a', 'crane-1', 0), booking('b', 'crane-1', 0), booking('c', 'crane-1', 2)])).toEqual([
      'crane-1: a b c',
    ]);
  });

  it('sorts a long list that came out of order', () => {
    // Hours 0, 7, 14, 21, 28, 35, 2, 9, …: each of 0 to 39 once, out of order.
    const shuffled = Array.from({ length: 40 }, (_, n) => (n * 7) % 40).map((h) =>
      booking(`b${String(h).padStart(2, '0')}`, 'crane-1', h),
    );
    const [line] = gathered(shuffled);
    expect(line?.split(' ').slice(1, 5)).toEqual(['b00', 'b01', 'b02', 'b03']);
    expect(line?.split(' ').slice(-2)).toEqual(['b38', 'b39']);
  });

  it('tells the longest booking of each resource, and numbers resources once they have one', () => {
    const lists = bookingLists(2);
    expect(lists.numbers.get('crane-1')).toBeUndefined();
    addBooking(lists, undefined, booking('a', 'crane-1', 0, 2));
    addBooking(lists, lists.numbers.get('crane-1'), booking('b', 'crane-1', 4, 9));
    addBooking(lists, lists.numbers.get('crane-1'), booking('c', 'crane-1', 20, 1));
    addBooking(lists, lists.numbers.get('lorry-1'), booking('d', 'lorry-1', 1, 3));
    expect(lists.numbers.get('crane-1')).toBe(0);
    expect(lists.numbers.get('lorry-1')).toBe(1);
    const byResource = orderedByResource(lists);
    expect(byResource.get('crane-1')?.maxLength).toBe(9 * HOUR);
    expect(byResource.get('lorry-1')?.maxLength).toBe(3 * HOUR);
  });
});
