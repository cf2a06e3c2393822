import type {
  Board,
  Booking,
  Dependency,
  HirePeriod,
  Interval,
  Job,
  LeadTimeRule,
  Resource,
  Stage,
  WorkingCalendar,
} from './scheduler/index.ts';
import type { BookingWindow } from './booking-window.ts';

/** A resource row on the board, with what the timeline shows beside the engine's fields. */
export interface BoardResource extends Resource {
  name: string;
  firmName: string;
  firmKind: string;
  /** own: the installer's own; hired: hired in by the installer; partner: a partner firm's. */
  ownership: 'owned' | 'hired' | 'partner';
}

export interface BoardJob extends Job {
  reference: string;
  customerName: string;
  siteTown: string;
  /** The site's postcode: the board's search finds a job by it. */
  sitePostcode?: string;
  status: string;
  installationType: string;
}

export interface BoardStage extends Stage {
  sequence: number;
}

export interface BoardBooking extends Booking {
  /**
   * True for a "busy elsewhere" placeholder: another installer's sent, confirmed, on-site or done
   * bookings of a shared partner resource, merged into one block per busy span. Its id is
   * `elsewhere-<n>` (an index in this response, never the other installer's booking id), its
   * state always 'confirmed', its stage and job the placeholders below.
   */
  elsewhere?: boolean;
  /** A request to a partner firm went unanswered past the reminder time. */
  overdue?: boolean;
  /** The partner proposed another time, waiting for the scheduler to accept or refuse it. */
  proposal?: { start: number; end: number } | null;
  /**
   * A declined booking: when the partner said no, whether from the e-mailed link or their pages, and
   * why in their own words (null when they gave no reason; only the installer whose booking it is reads it).
   */
  declined?: { at: number; via: 'link' | 'app'; reason?: string | null } | null;
}

/** A closure or absence on the board: why, only for the reader's own firm's (read-policy.ts). */
export interface BoardClosure extends Interval {
  reason?: string;
}

/** A working calendar as the board sends it: the engine's, its closures with their reasons where told. */
export interface BoardCalendar extends WorkingCalendar {
  closures?: BoardClosure[];
}

/**
 * What GET /api/board returns: the engine's board (instants as epoch ms) plus names for display.
 * The client builds its engine index from it, so the board and the server check the same data.
 */
export interface BoardData {
  from: number;
  to: number;
  now: number;
  firmId: string;
  resources: BoardResource[];
  calendars: BoardCalendar[];
  jobs: BoardJob[];
  stages: BoardStage[];
  dependencies: Dependency[];
  bookings: BoardBooking[];
  hirePeriods: HirePeriod[];
  leadTimeRules: LeadTimeRule[];
  /** How far from `now` a booking may lie (the server's setting); absent from boards built elsewhere. */
  bookingWindow?: BookingWindow;
}

/** The engine's view of board data (the display fields ride along unread). */
export function toEngineBoard(data: BoardData): Board {
  return {
    stages: data.stages,
    dependencies: data.dependencies,
    bookings: data.bookings,
    resources: data.resources,
    calendars: data.calendars,
    hirePeriods: data.hirePeriods,
    jobs: data.jobs,
    leadTimeRules: data.leadTimeRules,
  };
}

/** The placeholder job and stage that stand for another installer's booking on a shared resource. */
export const ELSEWHERE_JOB_ID = 'elsewhere';
/** The n-th busy-elsewhere block of one board response (an opaque index, not anyone's id). */
export const elsewhereStageId = (n: number) => `elsewhere:${n}`;
export const elsewhereBookingId = (n: number) => `elsewhere-${n}`;

/**
 * The engine's violations that concern the reader's own work. A violation that involves only
 * busy-elsewhere placeholders (two of them overlapping, one outside the partner's hours, …) is
 * another installer's business and is dropped; one that names an own booking or stage stays
 * (its cross-firm side names only the own booking).
 *
 * @example
 * ownViolations(data, analyseBoard(toEngineBoard(data), { now }).violations)
 */
export function ownViolations<V extends { bookingIds: readonly string[]; stageIds: readonly string[] }>(
  data: Pick<BoardData, 'bookings' | 'stages'>,
  violations: readonly V[],
): V[] {
  const elsewhereBookings = new Set(data.bookings.filter((b) => b.elsewhere).map((b) => b.id));
  if (elsewhereBookings.size === 0) return [...violations];
  const elsewhereStages = new Set(data.stages.filter((s) => s.jobId === ELSEWHERE_JOB_ID).map((s) => s.id));
  return violations.filter((v) => {
    const ids = [
      ...v.bookingIds.map((id) => elsewhereBookings.has(id)),
      ...v.stageIds.map((id) => elsewhereStages.has(id)),
    ];
    return ids.length === 0 || ids.some((isElsewhere) => !isElsewhere);
  });
}
