import { WEEKDAYS, type WeekHours } from '@shared/working-week';

/**
 * A week as the page's time boxes hold it. A browser's time box cannot show 24:00, so a day worked
 * up to midnight finishes at 00:00 in the boxes (a finish of 00:00 can mean nothing else) and is
 * sent as 24:00 again, as the API and the store have it.
 *
 * @example
 * inTimeBoxes(week).fri // [{ from: '16:00', to: '00:00' }] for a Friday of 16:00–24:00
 */
export function inTimeBoxes(hours: WeekHours): WeekHours {
  return mapFinishes(hours, '24:00', '00:00');
}

/**
 * The week from the time boxes, as the API takes it (see {@link inTimeBoxes}).
 *
 * @example
 * fromTimeBoxes(draft).fri // [{ from: '16:00', to: '24:00' }]
 */
export function fromTimeBoxes(hours: WeekHours): WeekHours {
  return mapFinishes(hours, '00:00', '24:00');
}

function mapFinishes(hours: WeekHours, from: string, to: string): WeekHours {
  return Object.fromEntries(
    WEEKDAYS.map((d) => [d, hours[d].map((s) => ({ from: s.from, to: s.to === from ? to : s.to }))]),
  ) as WeekHours;
}
