import type { DaySheet, DaySheetVisit } from './day-sheets.ts';

/**
 * One of a crew member's own bookings on My work (GET /api/my-work?from&to): the day sheet's visit
 * (site, times, contacts, who else is on the stage, cautions) plus what marking progress needs.
 */
export interface MyWorkItem extends DaySheetVisit {
  version: number;
  /** The crew or person row the booking is on. */
  resource: DaySheet['resource'];
}

export interface MyWorkList { items: MyWorkItem[] }
