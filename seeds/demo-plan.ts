import type { Knex } from 'knex';
import { loadBoard } from '../server/services/board.ts';
import type { Actor } from '../server/services/actor.ts';
import { toEngineBoard } from '../shared/board-data.ts';
import { analyseBoard, autoPlace, type Board, type Booking, type BookingState } from '../shared/scheduler/index.ts';

/**
 * The demo's plan is made the way an office makes one: the engine places each job's stages
 * (autoPlace, in promised-date order) on the board the office sees, so crews, machines and partners
 * are never double-booked and notice, cure and working hours hold. What follows works out which
 * state each booking has reached by "today".
 */

const DAY = 86_400_000;

/** The office's board as the engine reads it (loadBoard scoped to the office, inside the seed's transaction). */
export async function officeBoard(
  trx: Knex.Transaction,
  actor: Actor,
  range: { from: number; to: number; now: number },
  jobIds: string[],
): Promise<Board> {
  return toEngineBoard(await loadBoard(trx, actor, { ...range, jobIds }));
}

/** A board with the given bookings added (the engine never mutates its input). */
export function withBookings(board: Board, bookings: readonly Booking[]): Board {
  return { ...board, bookings: [...board.bookings, ...bookings] };
}

/**
 * Places the unbooked stages of one job, keeping only `stageIds` when given (the others are left
 * off the board for this pass). Returns the new bookings; a stage the engine could not place
 * stays in the tray, named in `unplaced`.
 */
export function placeJob(
  board: Board,
  jobId: string,
  now: number,
  stageIds?: ReadonlySet<string>,
): { bookings: Booking[]; unplaced: string[] } {
  const keep = (id: string) =>
    stageIds === undefined || stageIds.has(id) || board.stages.find((s) => s.id === id)?.jobId !== jobId;
  const view: Board =
    stageIds === undefined
      ? board
      : {
          ...board,
          stages: board.stages.filter((s) => keep(s.id)),
          dependencies: board.dependencies.filter((d) => keep(d.fromStageId) && keep(d.toStageId)),
        };
  const result = autoPlace(view, { now, jobIds: [jobId], budgetMs: 0 });
  return { bookings: result.bookings, unplaced: result.unplaced.map((u) => `${u.stageId}: ${u.reason}`) };
}

/** Whose resource a booking holds, seen from the installer. */
export type Side = 'own' | 'partner';

/**
 * The state a booking has reached by `today`: done when it ended, on site while it runs, and ahead
 * of it confirmed for the next two weeks. Further out the office's own crews and machines stay
 * pencilled, and partners have been asked (sent) for the two weeks after that; later ones are
 * still pencilled.
 */
export function stateBy(today: number, b: Pick<Booking, 'start' | 'end'>, side: Side): BookingState {
  if (b.end <= today) return 'done';
  if (b.start < today) return 'on_site';
  if (b.start < today + 14 * DAY) return 'confirmed';
  if (side === 'own') return 'pencilled';
  return b.start < today + 28 * DAY ? 'sent' : 'pencilled';
}

/**
 * Pencilled bookings inside their notice period on `today` (the crane firm wants ten working days, the
 * unit's delivery its maker's lead time from the order): a partner who needs that notice has already been asked,
 * so these are sent rather than pencilled.
 */
export function pencilledInsideNotice(board: Board, today: number): Set<string> {
  const { violations } = analyseBoard(board, { now: today, skipCriticalPath: true });
  return new Set(violations.filter((v) => v.kind === 'lead_time').flatMap((v) => v.bookingIds));
}

/** How many times a booking changed to reach its state (the version the write path would have given it). */
export function versionOf(state: BookingState, side: Side): number {
  const steps: Record<Side, Partial<Record<BookingState, number>>> = {
    // Own: booked confirmed (1), on site (2), done (3); or pencilled (1).
    own: { pencilled: 1, confirmed: 1, on_site: 2, done: 3 },
    // A partner's: pencilled (1), sent (2), confirmed by their answer (3), on site (4), done (5).
    partner: { pencilled: 1, sent: 2, confirmed: 3, on_site: 4, done: 5 },
  };
  return steps[side][state] ?? 1;
}
