import type { Booking } from './types.js';

/**
 * Orders bookings by start, then id: the order every sweep and scan relies on.
 *
 * @example
 * bookings.slice().sort(compareBookings)
 */
export function compareBookings(a: Booking, b: Booking): number {
  // -1, 0 or 1 rather than the difference of two instants, which would be boxed on every call.
  if (a.start < b.start) return -1;
  if (a.start > b.start) return 1;
  return a.id < b.id ? -1 : a.id > b.id ? 1 : 0;
}

/** One resource's bookings in {@link compareBookings} order, and the longest of them (ms). */
export interface OrderedBookings {
  list: Booking[];
  maxLength: number;
}

/**
 * Bookings gathered per resource in the order they come (see {@link addBooking}), each resource
 * numbered in the order of its first booking.
 */
export interface BookingLists {
  numbers: Map<string, number>;
  lists: Booking[][];
  /** By resource number: the latest start so far, the longest booking, 1 once one came out of order. */
  lastStart: Float64Array;
  longest: Float64Array;
  outOfOrder: Uint8Array;
}

/**
 * Empty lists for bookings on at most `resources` different resources.
 *
 * @example
 * const lists = bookingLists(board.resources.length)
 * for (const b of active) addBooking(lists, lists.numbers.get(b.resourceId), b)
 * orderedByResource(lists).get('crane-1')?.list // the crane's bookings by start, then id
 */
export function bookingLists(resources: number): BookingLists {
  return {
    numbers: new Map(),
    lists: [],
    lastStart: new Float64Array(resources),
    longest: new Float64Array(resources),
    outOfOrder: new Uint8Array(resources),
  };
}

/**
 * Adds a booking to its resource's list; `no` is the resource's number (`lists.numbers`), undefined
 * for its first booking. Bookings mostly come in compareBookings order already: each list notes, as
 * they are added, whether they did (against the latest start so far, kept in a typed array), so
 * only the lists that did not are sorted, and no booking is read again out of board order (on a
 * large board each such read was a cache miss, and checking every list's order was the slowest
 * step of building the index).
 */
export function addBooking(lists: BookingLists, no: number | undefined, b: Booking): void {
  if (no === undefined) {
    const first = lists.lists.length;
    lists.numbers.set(b.resourceId, first);
    lists.lastStart[first] = b.start;
    lists.longest[first] = b.end - b.start;
    lists.lists.push([b]);
    return;
  }
  const list = lists.lists[no] as Booking[];
  const last = lists.lastStart[no] as number;
  if (b.start < last || (b.start === last && compareBookings(list[list.length - 1] as Booking, b) > 0))
    lists.outOfOrder[no] = 1;
  list.push(b);
  lists.lastStart[no] = b.start;
  lists.longest[no] = Math.max(lists.longest[no] as number, b.end - b.start);
}

/** Each resource's bookings in order, by resource id, resources in the order of their first booking. */
export function orderedByResource(lists: BookingLists): Map<string, OrderedBookings> {
  const out = new Map<string, OrderedBookings>();
  lists.numbers.forEach((no, resourceId) => {
    const list = lists.lists[no] as Booking[];
    if (lists.outOfOrder[no] === 1) sortInPlace(list, compareBookings);
    out.set(resourceId, { list, maxLength: lists.longest[no] as number });
  });
  return out;
}

/**
 * Sorts a list in place (stably, as Array#sort does), doing nothing when it is in order already:
 * bookings and hire periods mostly come in order, and Array#sort allocates work space on every
 * call, thousands of times per index. Short lists are insertion-sorted.
 */
export function sortInPlace<T>(list: T[], compare: (a: T, b: T) => number): void {
  let i = 1;
  while (i < list.length && compare(list[i - 1] as T, list[i] as T) <= 0) i++;
  if (i >= list.length) return;
  if (list.length > 16) {
    list.sort(compare);
    return;
  }
  for (; i < list.length; i++) {
    const x = list[i] as T;
    let j = i - 1;
    while (j >= 0 && compare(list[j] as T, x) > 0) {
      list[j + 1] = list[j] as T;
      j--;
    }
    list[j + 1] = x;
  }
}
