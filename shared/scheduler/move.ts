import { addWorkingMinutes } from './calendar.js';
import { bookingsOfStage, resourceCalendarOf, spanOf, type BoardIndex } from './board-index.js';
import { SchedulerError } from './errors.js';
import type { Board, Booking, Instant } from './types.js';

/**
 * A drag on the board: a stage's bookings moved to a new start (keeping their lengths), or all set
 * to [start, end] when `end` is given; `resourceId` moves one booking (`bookingId`, default the
 * stage's first by id) to another resource. A stage with no bookings gets a new pencilled one on
 * `resourceId`, lasting its working duration on that resource's calendar.
 */
export interface StageMove {
  stageId: string;
  start: Instant;
  end?: Instant;
  resourceId?: string;
  bookingId?: string;
}

/**
 * Id given to the booking a move creates for a stage with none.
 *
 * @example
 * newBookingId('lift-1') // 'new:lift-1'
 */
export function newBookingId(stageId: string): string {
  return `new:${stageId}`;
}

/**
 * The stage's active bookings after the move (new objects; nothing is changed).
 *
 * @example
 * movedBookings(index, { stageId: 'lift-1', start: tue0800 }) // [{ …, start: tue0800, end: … }]
 */
export function movedBookings(index: BoardIndex, move: StageMove): Booking[] {
  const stage = index.stages.get(move.stageId)?.stage;
  if (stage === undefined) throw new SchedulerError('unknown_stage', `Stage ${move.stageId} is not on the board`);
  if (!Number.isFinite(move.start)) throw new RangeError('A move needs a start instant');
  if (move.end !== undefined && !(move.end > move.start)) throw new RangeError('A move must end after it starts');
  if (move.resourceId !== undefined && !index.resources.has(move.resourceId)) {
    throw new SchedulerError('unknown_resource', `Resource ${move.resourceId} is not on the board`);
  }
  const current = bookingsOfStage(index, move.stageId);
  if (current.length === 0) {
    if (move.resourceId === undefined)
      throw new SchedulerError('unknown_resource', `Stage ${stage.name} has no booking yet: say which resource`);
    const job = index.jobs.get(stage.jobId);
    const end =
      move.end ?? addWorkingMinutes(resourceCalendarOf(index, move.resourceId), move.start, stage.durationMinutes);
    return [
      {
        id: newBookingId(stage.id),
        stageId: stage.id,
        resourceId: move.resourceId,
        start: move.start,
        end: end > move.start ? end : move.start + 60_000,
        state: 'pencilled',
        installerFirmId: job?.firmId ?? '',
      },
    ];
  }
  const span = spanOf(current) as { start: number; end: number };
  const delta = move.start - span.start;
  const target = move.bookingId ?? (current[0] as Booking).id;
  if (move.bookingId !== undefined && !current.some((b) => b.id === move.bookingId)) {
    throw new SchedulerError(
      'unknown_booking',
      `Booking ${move.bookingId} is not an active booking of stage ${stage.name}`,
    );
  }
  return current.map((b) => ({
    ...b,
    start: move.end !== undefined ? move.start : b.start + delta,
    end: move.end !== undefined ? move.end : b.end + delta,
    resourceId: b.id === target && move.resourceId !== undefined ? move.resourceId : b.resourceId,
  }));
}

/**
 * A new board with the move applied (what the server would save). The input board is untouched.
 *
 * @example
 * const after = applyMove(board, index, { stageId: 'lift-1', start: tue0800 })
 */
export function applyMove(board: Board, index: BoardIndex, move: StageMove): Board {
  const moved = movedBookings(index, move);
  const byId = new Map(moved.map((b) => [b.id, b]));
  const bookings = board.bookings.map((b) => byId.get(b.id) ?? b);
  const known = new Set(board.bookings.map((b) => b.id));
  for (const b of moved) if (!known.has(b.id)) bookings.push(b);
  return { ...board, bookings };
}
