import { z } from 'zod';
import { WorkDate } from './common.ts';

/** The day a sheet is for: a real date within WORK_YEARS (a date far off is a typing slip, not a plan). */
export const DaySheetQuery = z.object({ date: WorkDate });
export type DaySheetQuery = z.infer<typeof DaySheetQuery>;

export interface DaySheetVisit {
  bookingId: string;
  startsAt: string;
  endsAt: string;
  state: string;
  stage: { id: string; kind: string; name: string };
  /** `unitFacing`: which way the unit faces, from the survey (null until settled). */
  job: { id: string; reference: string; unitName: string | null; installationType: string; unitFacing: string | null };
  site: { address: string; town: string; postcode: string; accessNotes: string | null };
  contacts: { name: string; phone: string | null; role: string }[];
  /** Other resources booked on the same stage (crane, plant, partner firms). */
  alongside: { name: string; kind: string; firmName: string }[];
  /**
   * On a stage the delivery comes before (the lift, the placement): when the unit arrives and on
   * whose lorry, so the crew is ready to take it off; null when the delivery isn't booked (or, to a
   * partner, not yet asked of the haulier).
   */
  unitArrives: { startsAt: string; endsAt: string; firmName: string } | null;
  cautions: string[];
}

export interface DaySheet {
  resource: { id: string; name: string; kind: string; category: string; firmName: string };
  date: string;
  visits: DaySheetVisit[];
}

export interface DaySheetList {
  date: string;
  timeZone: string;
  sheets: DaySheet[];
}
