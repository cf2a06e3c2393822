/**
 * Moving a stage that other booked stages follow: what each choice would move ("only this",
 * "those within the next N days", "all"), which partner firms' sent or confirmed bookings it would
 * ask again, and whether the plan would still hold — so the dialog can default to the least
 * disruptive choice that keeps the plan. Pure, so it is tested without a browser.
 */
import {
  checkStageBookings,
  createBoardIndex,
  movedBookings,
  type BoardIndex,
  type Booking,
  type StageMove,
} from '@shared/scheduler/index';
import { bookingsOfStage, isBlocking, shiftDependents } from '@shared/board-actions';
import { toEngineBoard, type BoardData } from '@shared/board-data';
import type { DependentChoice, PartnerBookingNote } from '@shared/schemas/bookings';

const DAY = 86_400_000;

/** How many days ahead "those within the next N days" starts at (common practice, no source). */
export const DEFAULT_WITHIN_DAYS = 7;

export interface DependentsOption {
  choice: DependentChoice;
  /** Booked stages after it that move with it under this choice. */
  stageIds: string[];
  /** Partner firms' sent or confirmed bookings this choice moves (each is asked again), the stage's own included. */
  partner: PartnerBookingNote[];
  /** Why the plan would break (the engine's refusals), empty when it holds. */
  breaks: string[];
}

export interface DependentsChoiceModel {
  options: DependentsOption[];
  /** The least disruptive choice that keeps the plan: only this, unless that breaks it. */
  recommended: DependentChoice;
  /** Booked stages after it that a move by this much would shift. */
  dependents: number;
  withinDays: number;
}

/** A partner firm's sent or confirmed booking, as the dialog and the server's refusal name it. */
export function partnerNoteOf(data: BoardData, b: Booking): PartnerBookingNote | null {
  const original = data.bookings.find((x) => x.id === b.id);
  const resource = data.resources.find((r) => r.id === (original ?? b).resourceId);
  if (
    !original ||
    !resource ||
    resource.ownership !== 'partner' ||
    (original.state !== 'sent' && original.state !== 'confirmed')
  )
    return null;
  const stage = data.stages.find((s) => s.id === original.stageId);
  return {
    bookingId: original.id,
    stageName: stage?.name ?? 'a stage',
    jobReference: data.jobs.find((j) => j.id === stage?.jobId)?.reference ?? '',
    resourceName: resource.name,
    firmName: resource.firmName,
    state: original.state,
    startsAt: new Date(original.start).toISOString(),
  };
}

/** The blocking violations of every moved stage on the board as it would be. */
function breaksOf(data: BoardData, moved: Map<string, Booking>, stageIds: string[]): string[] {
  const after: BoardData = {
    ...data,
    bookings: data.bookings.map((b) => (moved.has(b.id) ? { ...b, ...moved.get(b.id)! } : b)),
  };
  for (const b of moved.values()) if (!data.bookings.some((x) => x.id === b.id)) after.bookings.push(b);
  let index: BoardIndex;
  try {
    index = createBoardIndex(toEngineBoard(after), { now: data.now });
  } catch (error) {
    return [error instanceof Error ? error.message : String(error)];
  }
  const messages = new Set<string>();
  for (const id of stageIds)
    for (const v of checkStageBookings(index, id, bookingsOfStage(index, id)).filter(isBlocking))
      messages.add(v.message);
  return [...messages];
}

/**
 * The three choices for moving `move.stageId` (its new span start, as the drag check gives it)
 * and the booked stages after it.
 *
 * @example
 * dependentsChoice(data, index, { stageId: 'lift-1', start: tue0800 }).recommended // 'none' when the rest still fit
 */
export function dependentsChoice(
  data: BoardData,
  index: BoardIndex,
  move: StageMove,
  withinDays = DEFAULT_WITHIN_DAYS,
): DependentsChoiceModel {
  const own = movedBookings(index, move);
  const current = bookingsOfStage(index, move.stageId);
  const spanStart = current.length ? Math.min(...current.map((b) => b.start)) : move.start;
  const shifts = move.end === undefined ? shiftDependents(index, move.stageId, move.start) : [];
  const changes = (b: Booking) => {
    const o = data.bookings.find((x) => x.id === b.id);
    return !o || o.start !== b.start || o.end !== b.end || o.resourceId !== b.resourceId;
  };
  const limit = spanStart + withinDays * DAY;
  const picks: Record<DependentChoice, typeof shifts> = {
    none: [],
    within: shifts.filter((s) => Math.min(...bookingsOfStage(index, s.stageId).map((b) => b.start)) < limit),
    all: shifts,
  };
  const options = (['none', 'within', 'all'] as const).map((choice): DependentsOption => {
    const moved = new Map<string, Booking>();
    for (const b of [...own, ...picks[choice].flatMap((s) => s.bookings)]) if (changes(b)) moved.set(b.id, b);
    const partner = [...moved.values()]
      .map((b) => partnerNoteOf(data, b))
      .filter((n): n is PartnerBookingNote => n !== null);
    return {
      choice,
      stageIds: picks[choice].map((s) => s.stageId),
      partner,
      breaks: breaksOf(data, moved, [move.stageId, ...picks[choice].map((s) => s.stageId)]),
    };
  });
  const recommended = options.find((o) => o.breaks.length === 0)?.choice ?? 'none';
  return { options, recommended, dependents: shifts.length, withinDays };
}
