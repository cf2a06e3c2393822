/**
 * What a link from the reports page points the board at: bookings to outline (`highlight=`, both
 * sides of a clash) and a hire period to draw on its machine's row (`hire=`), as
 * shared/reports/context.ts `boardLink` writes them. Pure, so it is tested without a browser.
 */
import type { BoardData } from '@shared/board-data';
import { formatInstant } from '@shared/scheduler/index';
import type { BackgroundInput } from './board-events';
import { localParts } from './booking-chip';

/** The bookings and hire period a link asks the board to pick out. */
export interface BoardPointer {
  /** Booking ids to outline, in the link's order, without repeats. */
  highlight: string[];
  hireId: string | null;
}

/** The class of an outlined booking and of a drawn hire period (board.css draws them, the notice shows their swatches). */
export const POINTER_CLASSES = { highlight: 'wl-pointed', hire: 'wl-hire-band' } as const;

const ID = /^[1-9]\d{0,17}$/;
const first = (v: unknown): string =>
  typeof v === 'string' ? v : Array.isArray(v) && typeof v[0] === 'string' ? v[0] : '';

/**
 * The pointer in a board URL's query; anything that is not a booking or hire id is ignored.
 *
 * @example
 * pointerOf({ highlight: '31,32', hire: '7' }) // { highlight: ['31', '32'], hireId: '7' }
 * pointerOf({ highlight: 'x,,31' })           // { highlight: ['31'], hireId: null }
 */
export function pointerOf(query: Record<string, unknown>): BoardPointer {
  const highlight = [
    ...new Set(
      first(query.highlight)
        .split(',')
        .map((s) => s.trim())
        .filter((s) => ID.test(s)),
    ),
  ];
  const hire = first(query.hire).trim();
  return { highlight, hireId: ID.test(hire) ? hire : null };
}

/** True when the link points at anything. */
export const pointsAtAnything = (p: BoardPointer): boolean => p.highlight.length > 0 || p.hireId !== null;

/**
 * The hire period as a background band on its machine's row, or null when the board has no such
 * hire (another firm's, or one since removed).
 *
 * @example
 * hireBand(data, '7') // { id: 'hire-7', resourceIds: ['12'], start: onHire, end: offHire, display: 'background', classNames: ['wl-hire-band'], title: 'On hire' }
 */
export function hireBand(data: BoardData, hireId: string | null): BackgroundInput | null {
  const hire = hireId === null ? undefined : data.hirePeriods.find((h) => h.id === hireId);
  if (!hire) return null;
  return {
    id: `hire-${hire.id}`,
    resourceIds: [hire.resourceId],
    start: hire.onHire,
    end: hire.offHire,
    display: 'background',
    classNames: [POINTER_CLASSES.hire],
    title: 'On hire',
  };
}

/** Where the board should scroll to: the earliest outlined booking, else the hire's start. */
export function pointerFocus(
  data: BoardData,
  p: BoardPointer,
): { resourceId: string; start: number; bookingId: string | null } | null {
  const wanted = new Set(p.highlight);
  const found = data.bookings.filter((b) => wanted.has(b.id)).sort((a, b) => a.start - b.start)[0];
  if (found) return { resourceId: found.resourceId, start: found.start, bookingId: found.id };
  const band = hireBand(data, p.hireId);
  return band ? { resourceId: band.resourceIds[0]!, start: band.start, bookingId: null } : null;
}

/** What the notice above the board says about a link's bookings and hire. */
export interface PointerNotice {
  /** "TW-2417 · Excavate pit on Crew Finch, Tue 9 Jun 08:00", one per outlined booking found. */
  bookings: string[];
  /** "3 t excavator (hired), on hire Tue 1 Dec – Fri 4 Dec" (the off-hire day is the last one paid for, so the day before it when it ends at midnight) */
  hire: string | null;
  /** How many of the link's bookings (or its hire) the board does not have at these dates. */
  missingBookings: number;
  missingHire: boolean;
}

/**
 * The words for what a link picked out, and what of it the board could not find (moved, taken
 * off, or outside the dates shown).
 *
 * @example
 * pointerNotice(data, { highlight: ['31', '99'], hireId: null }, 'Europe/London')
 * // { bookings: ['TW-2417 · Excavate pit on Crew Finch, Tue 9 Jun 08:00'], hire: null, missingBookings: 1, missingHire: false }
 */
export function pointerNotice(data: BoardData, p: BoardPointer, timeZone: string): PointerNotice {
  const byId = new Map(data.bookings.map((b) => [b.id, b]));
  const bookings: string[] = [];
  for (const id of p.highlight) {
    const b = byId.get(id);
    if (!b) continue;
    const stage = data.stages.find((s) => s.id === b.stageId);
    const job = data.jobs.find((j) => j.id === stage?.jobId);
    const resource = data.resources.find((r) => r.id === b.resourceId);
    const what = b.elsewhere ? 'Busy elsewhere' : `${job?.reference ?? 'A job'} · ${stage?.name ?? 'a stage'}`;
    bookings.push(`${what} on ${resource?.name ?? 'a resource'}, ${formatInstant(b.start, timeZone)}`);
  }
  const hire = p.hireId === null ? undefined : data.hirePeriods.find((h) => h.id === p.hireId);
  const machine = hire ? (data.resources.find((r) => r.id === hire.resourceId)?.name ?? 'the machine') : '';
  return {
    bookings,
    hire: hire
      ? `${machine}, on hire ${localParts(hire.onHire, timeZone).day} – ${localParts(hire.offHire - 1, timeZone).day}`
      : null,
    missingBookings: p.highlight.length - bookings.length,
    missingHire: p.hireId !== null && !hire,
  };
}
