import type { Board, Booking, Dependency, HirePeriod, Job, LeadTimeRule, Resource, Stage, WorkingCalendar } from './scheduler/index.ts';

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
  status: string;
  installationType: string;
}

export interface BoardStage extends Stage {
  sequence: number;
}

export interface BoardBooking extends Booking {
  /** True for another installer's booking of a shared partner resource: shown only as busy. */
  elsewhere?: boolean;
  /** A request to a partner firm went unanswered past the reminder time. */
  overdue?: boolean;
  /** The partner proposed another time, waiting for the scheduler to accept or refuse it. */
  proposal?: { start: number; end: number } | null;
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
  calendars: WorkingCalendar[];
  jobs: BoardJob[];
  stages: BoardStage[];
  dependencies: Dependency[];
  bookings: BoardBooking[];
  hirePeriods: HirePeriod[];
  leadTimeRules: LeadTimeRule[];
}

/** The engine's view of board data (the display fields ride along unread). */
export function toEngineBoard(data: BoardData): Board {
  return {
    stages: data.stages, dependencies: data.dependencies, bookings: data.bookings, resources: data.resources,
    calendars: data.calendars, hirePeriods: data.hirePeriods, jobs: data.jobs, leadTimeRules: data.leadTimeRules,
  };
}

/** The placeholder job and stage that stand for another installer's booking on a shared resource. */
export const ELSEWHERE_JOB_ID = 'elsewhere';
export const elsewhereStageId = (bookingId: string) => `elsewhere:${bookingId}`;
