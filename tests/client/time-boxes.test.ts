import { describe, expect, it } from 'vitest';
import { fromTimeBoxes, inTimeBoxes } from '@/components/working-week/time-boxes';
import { PutCalendarHours } from '@shared/schemas/working-week';

const week = (fri: { from: string; to: string }[]) => ({ mon: [], tue: [], wed: [], thu: [], fri, sat: [], sun: [] });

describe("a working week's time boxes", () => {
  it('show a day worked up to midnight as finishing at 00:00, and send it as 24:00 again', () => {
    const evening = week([{ from: '16:00', to: '24:00' }]);
    expect(inTimeBoxes(evening).fri).toEqual([{ from: '16:00', to: '00:00' }]);
    expect(fromTimeBoxes(inTimeBoxes(evening))).toEqual(evening);
    // What the boxes send passes the API's own check; the boxes' 00:00 finish alone would not.
    expect(PutCalendarHours.safeParse({ version: 1, hours: fromTimeBoxes(inTimeBoxes(evening)) }).success).toBe(true);
    expect(PutCalendarHours.safeParse({ version: 1, hours: inTimeBoxes(evening) }).success).toBe(false);
  });

  it('leave every other time as it is, a start at midnight too', () => {
    const early = week([
      { from: '00:00', to: '06:00' },
      { from: '08:00', to: '17:00' },
    ]);
    expect(inTimeBoxes(early)).toEqual(early);
    expect(fromTimeBoxes(early)).toEqual(early);
  });
});
