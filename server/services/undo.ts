import type { Knex } from 'knex';
import type { BookingState, UndoEntryView } from '../../shared/schemas/bookings.ts';
import { nextState } from '../../shared/booking-states.ts';
import { plural } from '../../shared/plural.ts';
import { ConflictError, HttpError, NotFoundError } from '../errors.ts';
import type { Actor } from './actor.ts';
import {
  BookingWriter,
  StaleVersionError,
  partyOf,
  type BookingLimits,
  type BookingWork,
  type LockScope,
  type WriteOutcome,
  type WrittenBooking,
} from './booking-writes.ts';

/** How many changes a session can take back, newest first (common practice, no source). */
export const UNDO_DEPTH = 20;

/**
 * One step that takes a change back, applied through the guarded write path like any change:
 * - `unbook`: a booking the change made is taken off again;
 * - `book`: a booking the change took off is booked again (as pencilled: a partner already told
 *   of the cancellation is asked again only when the scheduler sends the request);
 * - `restore`: a booking the change moved goes back to its time, resource and (where the state
 *   machine lets the office do it) its state.
 * Instants are epoch milliseconds; versions are the ones the change left, so a booking someone
 * changed since is not taken back over their change (409).
 */
export type UndoStep =
  | { op: 'unbook'; bookingId: string; version: number }
  | { op: 'book'; stageId: string; resourceId: string; startsAt: number; endsAt: number }
  | {
      op: 'restore';
      bookingId: string;
      version: number;
      resourceId: string;
      startsAt: number;
      endsAt: number;
      state: BookingState;
    };

/** What the board was doing, for the undo button's label ("Undo: move 'Excavate pit' on TW-2422"). */
export type UndoVerb = 'book' | 'move' | 'change' | 'take off';

/** The signed-in session a change was made in: its undo stack gets the change. */
export interface UndoContext {
  sessionId: string;
  verb: UndoVerb;
}

/**
 * The steps that take back what one unit of work wrote, latest change first. A booking changed
 * twice in one unit (moved, then confirmed) goes back to how it was before the first change.
 *
 * @example
 * inverseSteps([{ action: 'book', before: null, after: created }]) // [{ op: 'unbook', bookingId: created.id, version: 1 }]
 */
export function inverseSteps(written: readonly WrittenBooking[]): UndoStep[] {
  const byId = new Map<string, { before: WrittenBooking['before']; after: WrittenBooking['after'] }>();
  for (const w of written) {
    const id = String((w.after ?? w.before)!.id);
    const seen = byId.get(id);
    if (seen) seen.after = w.after;
    else byId.set(id, { before: w.before, after: w.after });
  }
  const steps: UndoStep[] = [];
  for (const { before, after } of [...byId.values()].reverse()) {
    if (!before && after) steps.push({ op: 'unbook', bookingId: String(after.id), version: after.version });
    else if (before && !after) {
      steps.push({
        op: 'book',
        stageId: String(before.stageId),
        resourceId: String(before.resourceId),
        startsAt: before.startsAt.getTime(),
        endsAt: before.endsAt.getTime(),
      });
    } else if (before && after) {
      const same =
        before.startsAt.getTime() === after.startsAt.getTime() &&
        before.endsAt.getTime() === after.endsAt.getTime() &&
        String(before.resourceId) === String(after.resourceId) &&
        before.state === after.state;
      if (!same) {
        steps.push({
          op: 'restore',
          bookingId: String(after.id),
          version: after.version,
          resourceId: String(before.resourceId),
          startsAt: before.startsAt.getTime(),
          endsAt: before.endsAt.getTime(),
          state: before.state,
        });
      }
    }
  }
  return steps;
}

/** "move 'Excavate pit' on TW-2422 and 2 other stages": what the change was, in the scheduler's words. */
async function labelOf(trx: Knex.Transaction, verb: UndoVerb, written: readonly WrittenBooking[]): Promise<string> {
  const stageIds = [...new Set(written.map((w) => String((w.after ?? w.before)!.stageId)))];
  const first = await trx('stages as s')
    .join('jobs as j', 'j.id', 's.job_id')
    .where('s.id', stageIds[0])
    .first('s.name', 'j.reference');
  const what = first ? `'${first.name}' on ${first.reference}` : 'a stage';
  return stageIds.length > 1 ? `${verb} ${what} and ${plural(stageIds.length - 1, 'other stage')}` : `${verb} ${what}`;
}

/**
 * Puts a change on its session's undo stack, inside the change's own transaction (so the entry
 * exists exactly when the change does). Only the newest {@link UNDO_DEPTH} are kept. A session
 * that no longer exists (signed out meanwhile) gets nothing, and the change still stands.
 */
export async function recordUndo(
  trx: Knex.Transaction,
  actor: Actor,
  undo: UndoContext,
  written: readonly WrittenBooking[],
): Promise<void> {
  const steps = inverseSteps(written);
  if (steps.length === 0) return;
  const label = await labelOf(trx, undo.verb, written);
  await trx.raw(
    `INSERT INTO booking_undo (session_id, user_id, firm_id, label, steps)
    SELECT sid, ?, ?, ?, ?::jsonb FROM session WHERE sid = ?`,
    [actor.userId, actor.firmId, label, JSON.stringify(steps), undo.sessionId],
  );
  await trx('booking_undo')
    .where('session_id', undo.sessionId)
    .whereNotIn(
      'id',
      trx('booking_undo').select('id').where('session_id', undo.sessionId).orderBy('id', 'desc').limit(UNDO_DEPTH),
    )
    .del();
}

/** The rows whose locks an undo takes, known before it starts. */
function lockScopeOf(steps: readonly UndoStep[]): LockScope {
  return {
    bookingIds: steps.flatMap((s) => (s.op === 'book' ? [] : [s.bookingId])),
    stageIds: steps.flatMap((s) => (s.op === 'book' ? [s.stageId] : [])),
    resourceIds: steps.flatMap((s) => (s.op === 'unbook' ? [] : [s.resourceId])),
  };
}

/** Applies one step through the write path: the state machine, bounds, outbox and audit as for any change. */
async function applyStep(w: BookingWork, step: UndoStep): Promise<void> {
  switch (step.op) {
    case 'unbook':
      await w.apply({ action: 'unbook', bookingId: step.bookingId, version: step.version });
      return;
    case 'book':
      await w.apply({
        action: 'book',
        stageId: step.stageId,
        resourceId: step.resourceId,
        startsAt: step.startsAt,
        endsAt: step.endsAt,
      });
      return;
    case 'restore': {
      let current = await w.booking(step.bookingId, step.version);
      const moved =
        current.startsAt.getTime() !== step.startsAt ||
        current.endsAt.getTime() !== step.endsAt ||
        String(current.resourceId) !== step.resourceId;
      if (moved) {
        current = (await w.apply({
          action: 'move',
          bookingId: step.bookingId,
          startsAt: step.startsAt,
          endsAt: step.endsAt,
          ...(String(current.resourceId) !== step.resourceId ? { resourceId: step.resourceId } : {}),
        }))!;
      }
      // Back to pencilled or confirmed where the office may set it; a partner's answer is never faked.
      if (current.state !== step.state) {
        const side = await w.sideOfBooking(current);
        const action =
          step.state === 'confirmed' ? 'confirm' : step.state === 'pencilled' && side === 'own' ? 'unconfirm' : null;
        if (action && nextState(action, current.state, { party: 'office', side }).ok)
          await w.apply({ action, bookingId: step.bookingId });
      }
    }
  }
}

interface UndoRow {
  id: string;
  label: string;
  steps: UndoStep[];
  createdAt: Date;
}

/**
 * The board's undo stack for a signed-in session, kept in the database so it survives a reload.
 * Taking a change back re-applies its steps through the guarded write path (locks, state machine,
 * engine check, outbox, audit): nothing here writes a booking row itself.
 */
export class UndoService {
  private readonly writer: BookingWriter;

  constructor(
    private readonly knex: Knex,
    now: () => number = Date.now,
    limits?: BookingLimits,
  ) {
    this.writer = new BookingWriter(knex, now, limits);
  }

  private stack(actor: Actor, sessionId: string) {
    return this.knex('booking_undo').where({ session_id: sessionId, user_id: actor.userId, firm_id: actor.firmId });
  }

  /** The session's changes that can be taken back, newest first. */
  async list(actor: Actor, sessionId: string): Promise<UndoEntryView[]> {
    const rows = (await this.stack(actor, sessionId)
      .orderBy('id', 'desc')
      .limit(UNDO_DEPTH)
      .select('id', 'label', 'created_at')) as UndoRow[];
    return rows.map((r) => ({ id: String(r.id), label: r.label, at: r.createdAt.toISOString() }));
  }

  /**
   * Takes back the session's newest change. Bookings someone changed since (or took off) are not
   * overwritten: the step is dropped from the stack with a 409 saying so. A plan the engine now
   * refuses (422) keeps the step, so it can be tried again once the way is clear.
   */
  async undo(actor: Actor, sessionId: string): Promise<{ undone: UndoEntryView; outcome: WriteOutcome<unknown> }> {
    const entry = (await this.stack(actor, sessionId)
      .orderBy('id', 'desc')
      .first('id', 'label', 'steps', 'created_at')) as UndoRow | undefined;
    if (!entry)
      throw new HttpError(404, 'not-found', 'Not found', 'There is nothing to undo.', { code: 'nothing-to-undo' });
    const undone = { id: String(entry.id), label: entry.label, at: entry.createdAt.toISOString() };
    try {
      const outcome = await this.writer.run({ actor, party: partyOf(actor) }, lockScopeOf(entry.steps), async (w) => {
        // Taking the row inside the transaction: two clicks (or two tabs) undo it once.
        const taken = await w.trx('booking_undo').where('id', entry.id).del();
        if (taken === 0) throw new ConflictError(`'${entry.label}' was already undone.`, { code: 'undone-already' });
        for (const step of entry.steps) await applyStep(w, step);
      });
      return { undone, outcome };
    } catch (error) {
      if (error instanceof StaleVersionError || error instanceof NotFoundError) {
        await this.knex('booking_undo').where('id', entry.id).del();
        throw new ConflictError(
          `"${capitalised(entry.label)}" can't be undone any more: those bookings were changed or taken off since.`,
          { code: 'undo-stale' },
        );
      }
      throw error;
    }
  }
}

const capitalised = (s: string) => s.charAt(0).toUpperCase() + s.slice(1);
