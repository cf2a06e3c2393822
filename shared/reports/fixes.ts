import {
  addWorkingMinutes,
  findSlots,
  formatInstant,
  formatPence,
  resourceCalendarOf,
  spanOf,
  checkStageBookings,
  type Booking,
  type Slot,
} from '../scheduler/index.ts';
import { leadTimeEarliest } from '../scheduler/checks/lead-time.ts';
import { bookingsOfStage, isBlocking } from '../board-actions.ts';
import { MOVABLE_STATES } from '../booking-states.ts';
import type { MoveStage } from '../schemas/bookings.ts';
import { boardLink, dateIn, resourceName, type ReportContext } from './context.ts';
import type { FixMove, SuggestedFix } from './types.ts';

/** Working minutes a booking may run past its stage: the writer's default slack (BOOKING_EXTRA_WORKING_MINUTES). */
export const DEFAULT_EXTRA_WORKING_MINUTES = 480;

/** States a move refuses: work under way or done stays where it happened (the state machine's rule). */

/** Options for {@link suggestedFixes}. */
export interface FixOptions {
  /** How many fixes after the first (default 2: three fixes). */
  alternatives?: number;
  /** The writer's slack past a stage's working time, so no fix is one it would refuse as too long. */
  extraWorkingMinutes?: number;
}

/**
 * The stage's bookings as the guarded write path would leave them after
 * `POST /api/stages/:id/move { startsAt: start, bookingId, resourceId }`: every booking shifted by
 * the same time as the stage's start (lengths kept), the one booking on its new resource.
 *
 * @example
 * movesFor(ctx, 'lift-1', '31', 'crane-2', tue0800) // [{ bookingId: '31', resourceId: 'crane-2', start: tue0800, … }, …]
 */
export function movesFor(
  ctx: ReportContext,
  stageId: string,
  bookingId: string,
  resourceId: string,
  start: number,
): FixMove[] {
  const current = bookingsOfStage(ctx.index, stageId);
  const span = spanOf(current);
  if (span === null) return [];
  const delta = start - span.start;
  return current.map((b) => {
    const to = b.id === bookingId ? resourceId : b.resourceId;
    const partner =
      ctx.resources.get(b.resourceId)?.ownership === 'partner' || ctx.resources.get(to)?.ownership === 'partner';
    return {
      bookingId: b.id,
      fromResourceId: b.resourceId,
      fromResourceName: resourceName(ctx, b.resourceId),
      fromStart: b.start,
      fromEnd: b.end,
      resourceId: to,
      resourceName: resourceName(ctx, to),
      start: b.start + delta,
      end: b.end + delta,
      asksPartnerAgain:
        partner && (b.state === 'sent' || b.state === 'confirmed') && (delta !== 0 || to !== b.resourceId),
    };
  });
}

/**
 * Why the write path (or the notice periods) would refuse these moves, or null when it would not:
 * the engine's blocking checks on the moved stage (as `verifyStages` runs them, so a machine moved
 * outside its hire is refused, not priced), a moved booking inside its notice period (whatever its
 * state: a new time needs notice again), a booking longer than its stage plus the slack, or the new
 * resource already on the stage.
 */
export function refusalOf(
  ctx: ReportContext,
  stageId: string,
  moves: readonly FixMove[],
  extraWorkingMinutes = DEFAULT_EXTRA_WORKING_MINUTES,
): string | null {
  const current = new Map(bookingsOfStage(ctx.index, stageId).map((b) => [b.id, b]));
  const stage = ctx.index.stages.get(stageId)?.stage;
  if (!stage) return 'The stage is not on the board.';
  if ([...current.values()].some((b) => !MOVABLE_STATES.has(b.state)))
    return 'Work on this stage is under way or done.';
  const after: Booking[] = moves.map((m) => ({
    ...(current.get(m.bookingId) as Booking),
    resourceId: m.resourceId,
    start: m.start,
    end: m.end,
  }));
  const resources = after.map((b) => b.resourceId);
  if (new Set(resources).size !== resources.length) return 'The new resource is already on this stage.';
  for (const b of after) {
    const before = current.get(b.id) as Booking;
    const moved = b.start !== before.start || b.resourceId !== before.resourceId;
    if (moved && b.start < leadTimeEarliest(ctx.index, b)) {
      return `${resourceName(ctx, b.resourceId)} needs more notice: the earliest start is ${formatInstant(leadTimeEarliest(ctx.index, b), resourceCalendarOf(ctx.index, b.resourceId).timeZone)}.`;
    }
    const longest = addWorkingMinutes(
      resourceCalendarOf(ctx.index, b.resourceId),
      b.start,
      stage.durationMinutes + extraWorkingMinutes,
    );
    if (b.end > longest) return `${resourceName(ctx, b.resourceId)} would be booked longer than the stage needs.`;
  }
  const blocking = checkStageBookings(ctx.index, stageId, after).filter(isBlocking);
  return blocking[0]?.message ?? null;
}

function fixLabel(
  name: string,
  start: number,
  tz: string,
  cost: { extraHireDays: number; extraHirePence: number; delaysJob: boolean },
): string {
  const money =
    cost.extraHireDays > 0
      ? `${formatPence(cost.extraHirePence)} extra hire (${cost.extraHireDays} day${cost.extraHireDays === 1 ? '' : 's'})`
      : 'no extra cost';
  return `Move to ${name} on ${formatInstant(start, tz)} — ${money}${cost.delaysJob ? '; the job finishes later' : ''}`;
}

/**
 * Places to move a stage's booking to, from the slot finder, each worked out as the write path
 * would save it and kept only when it would be accepted (see {@link refusalOf}); none for a stage
 * whose work is under way or done.
 *
 * @example
 * suggestedFixes(ctx, 'lift-1', '31', 'crane')[0].label // 'Move to 60 t mobile crane on Wed 10 Jun 08:00 — no extra cost'
 */
export function suggestedFixes(
  ctx: ReportContext,
  stageId: string,
  bookingId: string,
  kind: string,
  options: FixOptions = {},
): SuggestedFix[] {
  const wanted = 1 + (options.alternatives ?? 2);
  const current = bookingsOfStage(ctx.index, stageId);
  if (current.length === 0 || current.some((b) => !MOVABLE_STATES.has(b.state))) return [];
  // The slot finder minds the notice of the booking it places; the stage's other bookings move by
  // the same time and need theirs too: from this start on, every one of them has had its notice.
  const span = spanOf(current) as { start: number; end: number };
  const noticed = Math.max(
    ctx.range.now,
    ...current.map((b) => leadTimeEarliest(ctx.index, b) - (b.start - span.start)),
  );
  let slots: Slot[];
  try {
    // From now (a swap at the same time needs no new notice) and from when all have had notice;
    // more than wanted: some are dropped below as ones the write path would refuse.
    const search = (earliest: number) =>
      findSlots(ctx.index, { stageId, resourceKind: kind, earliest }, { alternatives: wanted + 2 });
    const found = [...search(ctx.range.now), ...(noticed > ctx.range.now ? search(noticed) : [])];
    slots = [...new Map(found.map((s) => [`${s.resourceId}@${s.start}`, s])).values()].sort(
      (a, b) => a.start - b.start || (a.resourceId < b.resourceId ? -1 : 1),
    );
  } catch {
    return []; // unknown stage or kind: nothing to suggest
  }
  const versions = Object.fromEntries(current.map((b) => [b.id, ctx.bookings.get(b.id)?.version ?? 1]));
  const out: SuggestedFix[] = [];
  for (const s of slots) {
    if (out.length >= wanted) break;
    const moves = movesFor(ctx, stageId, bookingId, s.resourceId, s.start);
    if (refusalOf(ctx, stageId, moves, options.extraWorkingMinutes) !== null) continue;
    const target = moves.find((m) => m.bookingId === bookingId) as FixMove;
    const name = resourceName(ctx, s.resourceId);
    const tz = resourceCalendarOf(ctx.index, s.resourceId).timeZone;
    const date = dateIn(ctx, target.start);
    out.push({
      stageId,
      bookingId,
      versions,
      moves,
      resourceId: s.resourceId,
      resourceName: name,
      start: target.start,
      end: target.end,
      date,
      extraHireDays: s.cost.extraHireDays,
      extraHirePence: s.cost.extraHirePence,
      floatUsedMinutes: s.cost.floatUsedMinutes,
      delaysJob: s.cost.delaysJob,
      label: fixLabel(name, target.start, tz, s.cost),
      link: boardLink(date, { resourceName: name, highlight: [bookingId] }),
    });
  }
  return out;
}

/**
 * The one call that applies a fix: the board's own stage move, with the versions the fix was
 * worked out from (the guarded write path re-checks everything and refuses a stale fix with 409).
 *
 * @example
 * fixRequest(fix) // { path: '/api/stages/41/move', body: { startsAt: '2026-06-05T09:00:00.000Z', bookingId: '31', resourceId: '12', versions: { 31: 2 }, moveDependents: false } }
 */
export function fixRequest(fix: Pick<SuggestedFix, 'stageId' | 'bookingId' | 'resourceId' | 'moves' | 'versions'>): {
  path: string;
  body: Pick<MoveStage, 'startsAt' | 'bookingId' | 'resourceId' | 'versions' | 'moveDependents'>;
} {
  // The stage's new start is its earliest moved booking's: the server shifts every booking by the same time.
  const start = Math.min(...fix.moves.map((m) => m.start));
  return {
    path: `/api/stages/${fix.stageId}/move`,
    body: {
      startsAt: new Date(start).toISOString(),
      bookingId: fix.bookingId,
      resourceId: fix.resourceId,
      versions: fix.versions,
      moveDependents: false,
    },
  };
}
