import { resourceCalendarOf, type BoardIndex } from '../board-index.js';
import { bookableStart, mustFitInOneDay, roundDownToStep, workingDaysWithin } from '../booking-step.js';
import { addWorkingMinutes, workingMinutesBetween, type CompiledCalendar } from '../calendar.js';
import { SchedulerError } from '../errors.js';
import { formatInstant } from '../format.js';
import { MINUTE_MS } from '../time-zone.js';
import type { Booking, Stage, Violation } from '../types.js';
import { makeViolation, stageLabel } from './violation.js';

function hours(minutes: number): string {
  return minutes < 60 ? `${minutes} min` : `${Math.round((minutes / 60) * 100) / 100} h`;
}

/** The last booking checked on an index: its calendar, stage, times and the words it got (null: none). */
interface LastSplit {
  cal: CompiledCalendar;
  stage: Stage;
  stageId: string;
  start: number;
  end: number;
  message: string | null;
  details: Record<string, unknown>;
}

const lastSplit = new WeakMap<BoardIndex, LastSplit>();

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
  // A stage's bookings usually share their times (a lift's crane and pallet trucks): the words
  // worked out for one serve the next.
  const last = lastSplit.get(index);
  if (
    last !== undefined &&
    last.cal === cal &&
    last.stage === stage &&
    last.stageId === booking.stageId &&
    last.start === booking.start &&
    last.end === booking.end
  ) {
    if (last.message !== null) {
      out.push(
        makeViolation('split', 'error', [booking.stageId], [booking.resourceId], [booking.id], last.message, {
          ...last.details,
        }),
      );
    }
    return out;
  }
  const days = workingDaysWithin(cal, booking.start, booking.end, 3);
  const seen: LastSplit = {
    cal,
    stage,
    stageId: booking.stageId,
    start: booking.start,
    end: booking.end,
    message: null,
    details: {},
  };
  lastSplit.set(index, seen);
  if (days.length < 2) return out;
  if (workingMinutesBetween(cal, booking.start, booking.end) * MINUTE_MS === booking.end - booking.start) return out;
  const tz = cal.timeZone;
  const need = stage.durationMinutes;
  const step = index.stepMinutes;
  let next: number | null = null;
  try {
    next = bookableStart(cal, booking.start, { stepMinutes: step, fitMinutes: need });
  } catch (e) {
    if (!(e instanceof SchedulerError)) throw e;
  }
  const first = days[0] as number;
  const ivs = cal.dayIntervals(first);
  const dayStart = ivs[0] as number,
    dayEnd = ivs[ivs.length - 1] as number;
  let advice: string;
  const details: Record<string, unknown> = { neededMinutes: need, days: days.length };
  if (next === booking.start) {
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
  const message = `${stageLabel(index, booking.stageId)} would be split over ${days.length === 2 ? 'two' : 'several'} working days (${formatInstant(booking.start, tz)} to ${formatInstant(booking.end, tz)}): its ${hours(need)} must be done within one working day — ${advice}`;
  seen.message = message;
  seen.details = details;
  out.push(
    makeViolation('split', 'error', [booking.stageId], [booking.resourceId], [booking.id], message, { ...details }),
  );
  return out;
}
