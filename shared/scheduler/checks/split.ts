import { resourceCalendarOf, type BoardIndex } from '../board-index.js';
import { bookableStart, mustFitInOneDay, roundDownToStep } from '../booking-step.js';
import { addWorkingMinutes, workingMinutesBetween, type CompiledCalendar } from '../calendar.js';
import { SchedulerError } from '../errors.js';
import { formatInstant, workWords } from '../format.js';
import { MINUTE_MS } from '../time-zone.js';
import type { Booking, Stage, Violation } from '../types.js';
import { stageLabel, violationOf } from './violation.js';

/**
 * What a booking's times come to on a calendar for a stage of `need` minutes: the message after the
 * stage's name and its details (words null: not split). They depend on nothing else (the booking
 * step is the index's), so they are worked out once per index: the bookings of a stage, and
 * stages of different jobs booked alike, share them. Entries with the same start are chained.
 */
interface SplitWords {
  end: number;
  need: number;
  words: string | null;
  details: Record<string, unknown> | null;
  next: SplitWords | undefined;
}

/** Per index: calendar → booking start → words. Dropped with the index. */
const splitMemo = new WeakMap<BoardIndex, Map<CompiledCalendar, Map<number, SplitWords>>>();

/** How many local days with working time [start, end) touches, up to three; the first in `firstDay`. */
function workingDaysTouched(cal: CompiledCalendar, start: number, end: number, firstDay: { day: number }): number {
  // workingDaysWithin without its array: this runs for every booking that crosses midnight.
  let n = 0;
  const first = cal.dayOf(start),
    last = Math.min(cal.dayOf(end - 1), first + 3660);
  for (let d = first; d <= last && n < 3; d++) {
    const ivs = cal.dayIntervals(d);
    for (let i = 0; i < ivs.length; i += 2) {
      if ((ivs[i + 1] as number) > start && (ivs[i] as number) < end) {
        if (n === 0) firstDay.day = d;
        n++;
        break;
      }
    }
  }
  return n;
}

// Where workingDaysTouched leaves the first day (one object for the module, not one per booking).
const FIRST = { day: 0 };

/**
 * A stage no longer than a working day (and not allowed to continue next day) must be done within
 * one working day: a booking of it whose working time falls on two or more local days is an error
 * (a pour, a crane lift or an electrician's visit is not stopped overnight). Stages longer than the
 * calendar's longest working day, or whose template lets them continue, are split as needed.
 * Working time that runs on without a break across midnight counts as one day; bookings on site or
 * done are not checked (the work is under way). The message says
 * the latest start that still fits that day (when there is one) and the next start where it fits.
 *
 * @example
 * checkSplit(index, electricianFri1300ToSat0830, connectStage)
 * // "'Connect and certify' would be split over two working days (Fri 2 Oct 13:00 to Sat 3 Oct 08:30): …"
 */
export function checkSplit(
  index: BoardIndex,
  booking: Booking,
  stage: Stage | undefined = index.stages.get(booking.stageId)?.stage,
  out: Violation[] = [],
  cal: CompiledCalendar = resourceCalendarOf(index, booking.resourceId),
): Violation[] {
  // Work on site or done happened as it did: a planning rule has nothing to say to it (and must
  // not refuse marking its progress).
  if (stage === undefined || booking.state === 'on_site' || booking.state === 'done' || !mustFitInOneDay(stage, cal))
    return out;
  // Most bookings start and end on one local day: two offset look-ups settle them.
  if (cal.dayOf(booking.start) === cal.dayOf(booking.end - 1)) return out;
  const need = stage.durationMinutes;
  let byCal = splitMemo.get(index);
  if (byCal === undefined) {
    byCal = new Map();
    splitMemo.set(index, byCal);
  }
  let byStart = byCal.get(cal);
  if (byStart === undefined) {
    byStart = new Map();
    byCal.set(cal, byStart);
  }
  const chain = byStart.get(booking.start);
  let known = chain;
  while (known !== undefined && (known.end !== booking.end || known.need !== need)) known = known.next;
  if (known === undefined) {
    known = splitWords(index, cal, booking.start, booking.end, need);
    known.next = chain;
    byStart.set(booking.start, known);
  }
  if (known.words !== null) {
    out.push(
      violationOf(
        'split',
        'error',
        [booking.stageId],
        [booking.resourceId],
        [booking.id],
        stageLabel(index, booking.stageId) + known.words,
        { ...known.details },
      ),
    );
  }
  return out;
}

/** The words and details of a booking on `cal` from `start` to `end` of a stage of `need` minutes. */
function splitWords(index: BoardIndex, cal: CompiledCalendar, start: number, end: number, need: number): SplitWords {
  const none: SplitWords = { end, need, words: null, details: null, next: undefined };
  const days = workingDaysTouched(cal, start, end, FIRST);
  if (days < 2) return none;
  if (workingMinutesBetween(cal, start, end) * MINUTE_MS === end - start) return none;
  const tz = cal.timeZone;
  const step = index.stepMinutes;
  let next: number | null = null;
  try {
    next = bookableStart(cal, start, { stepMinutes: step, fitMinutes: need });
  } catch (e) {
    if (!(e instanceof SchedulerError)) throw e;
  }
  const first = FIRST.day;
  const ivs = cal.dayIntervals(first);
  const dayStart = ivs[0] as number,
    dayEnd = ivs[ivs.length - 1] as number;
  let advice: string;
  const details: Record<string, unknown> = { neededMinutes: need, days };
  if (next === start) {
    // It would fit from where it starts: it is booked for longer than the day has left.
    advice = `end it by ${formatInstant(dayEnd, tz).slice(-5)}`;
    details.latestEnd = dayEnd;
  } else {
    // The latest start on the first working day that still leaves the whole stage that day.
    const latest = roundDownToStep(addWorkingMinutes(cal, dayEnd, -need), tz, step);
    const fits =
      latest >= dayStart && cal.dayOf(latest) === first && workingMinutesBetween(cal, latest, dayEnd) >= need;
    const from = next === null ? null : formatInstant(next, tz);
    advice = fits
      ? `start by ${formatInstant(latest, tz).slice(-5)}${from === null ? '' : ` or from ${from}`}`
      : from === null
        ? 'no later day has room for it'
        : `start from ${from}`;
    if (next !== null) details.earliestStart = next;
    if (fits) details.latestStartThatDay = latest;
  }
  const words = ` would be split over ${days === 2 ? 'two' : 'several'} working days (${formatInstant(start, tz)} to ${formatInstant(end, tz)}): its ${workWords(need)} must be done within one working day — ${advice}`;
  return { end, need, words, details, next: undefined };
}
