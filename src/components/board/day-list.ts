/**
 * The board on a phone: one day, resource by resource, each with that day's bookings in time order.
 * Built from the same rows and events the timeline draws (board-events.ts), so filters, states and
 * markers agree; pure, so it is tested without a browser.
 */
import { dayNumber, localToInstant } from '@shared/scheduler/index';
import {
  BOARD_BLOCKS,
  BOOKING_MARKERS,
  STATE_LABELS,
  groupHeading,
  type EventInput,
  type RowInput,
} from './board-events';
import { bookingLine, stageShortName } from './booking-chip';
import { hoursOnDay } from '@/utils/dates';
import { POINTER_CLASSES } from './board-pointer';

export interface DayListBooking {
  bookingId: string;
  /** "08:00–12:00"; a booking running into or out of the day names the other day: "Mon 14 08:00 – 12:00". */
  time: string;
  reference: string;
  stage: string;
  stageShort: string;
  town: string;
  /** "✔ Confirmed", or "Busy elsewhere" for another installer's block. */
  state: string;
  stateClass: string;
  markers: { key: string; symbol: string; label: string; className: string }[];
  problems: string[];
  elsewhere: boolean;
  editable: boolean;
  /** Outlined by a report's link (`highlight=`), as on the timeline. */
  outlined: boolean;
  /** Everything in one line, for the accessible name. */
  summary: string;
}

export interface DayListResource {
  id: string;
  title: string;
  kind: string;
  bookings: DayListBooking[];
}
export interface DayListGroup {
  heading: string;
  resources: DayListResource[];
}

/** The first and last instant of a calendar day in a time zone. @example dayBounds('2026-09-14', 'Europe/London') // 13 Sep 23:00Z … 14 Sep 23:00Z */
export function dayBounds(date: string, timeZone: string): { start: number; end: number } {
  const [y, m, d] = date.split('-').map(Number) as [number, number, number];
  const day = dayNumber(y, m, d);
  return { start: localToInstant(timeZone, day, 0), end: localToInstant(timeZone, day + 1, 0) };
}

/**
 * The day's list: groups in the board's order, each resource with the bookings that touch the day
 * (busy resources only), and the resources with nothing booked that day.
 */
export function dayListOf(
  rows: readonly RowInput[],
  events: readonly EventInput[],
  date: string,
  timeZone: string,
): { groups: DayListGroup[]; free: RowInput[] } {
  const day = dayBounds(date, timeZone);
  const byResource = new Map<string, EventInput[]>();
  for (const e of events) {
    if (e.end <= day.start || e.start >= day.end) continue;
    byResource.set(e.resourceId, [...(byResource.get(e.resourceId) ?? []), e]);
  }
  const groups: DayListGroup[] = [];
  const free: RowInput[] = [];
  for (const row of rows) {
    const booked = byResource.get(row.id);
    if (!booked?.length) {
      free.push(row);
      continue;
    }
    const heading = groupHeading(row.group);
    let group = groups[groups.length - 1];
    if (group?.heading !== heading) groups.push((group = { heading, resources: [] }));
    group.resources.push({
      id: row.id,
      title: row.title,
      kind: row.kind,
      bookings: [...booked].sort((a, b) => a.start - b.start || a.end - b.end).map((e) => entryOf(e, date, timeZone)),
    });
  }
  return { groups, free };
}

function entryOf(e: EventInput, date: string, timeZone: string): DayListBooking {
  const p = e.extendedProps;
  const time = hoursOnDay(e.start, e.end, date, timeZone);
  const state = STATE_LABELS[p.state];
  const markers = p.markers.map((key) => ({ key, ...BOOKING_MARKERS[key] }));
  const stateText = p.elsewhere ? BOARD_BLOCKS.elsewhere.label : `${state.symbol} ${state.label}`;
  return {
    bookingId: e.id,
    time,
    reference: p.reference,
    stage: p.stageName,
    stageShort: stageShortName(p.stageKind, p.stageName),
    town: p.town,
    state: stateText,
    stateClass: p.elsewhere ? BOARD_BLOCKS.elsewhere.className : `wl-state-${p.state}`,
    markers,
    problems: p.problems,
    elsewhere: p.elsewhere,
    editable: e.editable,
    outlined: e.classNames.includes(POINTER_CLASSES.highlight),
    summary: [
      time,
      bookingLine(p),
      p.elsewhere ? '' : state.label,
      ...markers.map((m) => m.label),
      ...p.problems,
      e.classNames.includes(POINTER_CLASSES.highlight) ? 'Outlined by the link' : '',
    ]
      .filter(Boolean)
      .join('. '),
  };
}
