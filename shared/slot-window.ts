/**
 * A slot's dates and hours in words, in the installer firm's time zone: what the e-mails, the
 * answer pages and a partner's own slots page all say of it. A slot that runs over more than one
 * day (a dig of a day and a half) says both days.
 */
export interface SlotWindow {
  /** "Tuesday 6 October 2026", or "Monday 5 October 2026 to Tuesday 6 October 2026". */
  date: string;
  /** "08:00–12:00", or "08:00 on the first day to 13:00 on the last". */
  window: string;
  /** The zone and its name at the start: "Europe/London, BST". */
  zone: string;
}

/**
 * @example
 * describeWindow(new Date('2026-10-06T07:00:00Z'), new Date('2026-10-06T11:00:00Z'), 'Europe/London')
 * // { date: 'Tuesday 6 October 2026', window: '08:00–12:00', zone: 'Europe/London, BST' }
 */
export function describeWindow(startsAt: Date, endsAt: Date, timeZone: string): SlotWindow {
  const day = new Intl.DateTimeFormat('en-GB', {
    timeZone,
    weekday: 'long',
    day: 'numeric',
    month: 'long',
    year: 'numeric',
  });
  const time = new Intl.DateTimeFormat('en-GB', { timeZone, hour: '2-digit', minute: '2-digit', hourCycle: 'h23' });
  const zoneName =
    new Intl.DateTimeFormat('en-GB', { timeZone, timeZoneName: 'short' })
      .formatToParts(startsAt)
      .find((p) => p.type === 'timeZoneName')?.value ?? timeZone;
  const dayOf = (d: Date) => day.format(d).replace(',', '');
  const sameDay = dayOf(startsAt) === dayOf(endsAt);
  return {
    date: sameDay ? dayOf(startsAt) : `${dayOf(startsAt)} to ${dayOf(endsAt)}`,
    window: sameDay
      ? `${time.format(startsAt)}–${time.format(endsAt)}`
      : `${time.format(startsAt)} on the first day to ${time.format(endsAt)} on the last`,
    zone: `${timeZone}, ${zoneName}`,
  };
}
