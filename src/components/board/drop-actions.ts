/**
 * What a drop, a resize or a key press on the board asks the server to do, and what the board
 * does with the answer. Kept apart from the calendar so it is tested without a browser.
 */
import { ApiError } from '@/api/client';
import type { BoardBooking } from '@shared/board-data';
import type { BookingView } from '@shared/schemas/bookings';
import type { Violation } from '@shared/scheduler/index';

/** A stage already on the board moves (all its bookings together). */
export interface MoveIntent {
  kind: 'move';
  stageId: string;
  start: number;
  end?: number;
  resourceId?: string;
  bookingId?: string;
  versions: Record<string, number>;
  moveDependents: boolean;
}

/** A stage from the tray is booked on a resource. */
export interface BookIntent { kind: 'book'; stageId: string; resourceId: string; start: number }

/** A booking is taken off the board (back to the tray). */
export interface RemoveIntent { kind: 'remove'; bookingId: string; version: number }

export type Intent = MoveIntent | BookIntent | RemoveIntent;

export interface ApiCall { method: 'POST' | 'DELETE'; path: string; body?: unknown }

/** The request for an intent. */
export function callFor(intent: Intent): ApiCall {
  switch (intent.kind) {
    case 'book':
      return { method: 'POST', path: '/api/bookings', body: { stageId: intent.stageId, resourceId: intent.resourceId, startsAt: new Date(intent.start).toISOString() } };
    case 'move':
      return {
        method: 'POST',
        path: `/api/stages/${intent.stageId}/move`,
        body: {
          startsAt: new Date(intent.start).toISOString(),
          ...(intent.end !== undefined ? { endsAt: new Date(intent.end).toISOString() } : {}),
          ...(intent.resourceId ? { resourceId: intent.resourceId, bookingId: intent.bookingId } : {}),
          versions: intent.versions,
          moveDependents: intent.moveDependents,
        },
      };
    case 'remove':
      return { method: 'DELETE', path: `/api/bookings/${intent.bookingId}?version=${intent.version}` };
  }
}

/** The server's answer to a write. */
export interface WriteResult { bookings: BookingView[]; warnings: Violation[] }

/** A saved booking as the board keeps it. */
export function fromView(v: BookingView, installerFirmId: string): BoardBooking {
  return { id: v.id, stageId: v.stageId, resourceId: v.resourceId, start: Date.parse(v.startsAt), end: Date.parse(v.endsAt), state: v.state, version: v.version, installerFirmId };
}

/** What the board does when a write fails. */
export interface Refusal {
  /** refused: a rule says no (snap back, show why); stale: someone else changed it (reload it); failed: anything else. */
  kind: 'refused' | 'stale' | 'failed';
  message: string;
  violations: Violation[];
}

export function refusalOf(error: unknown): Refusal {
  if (!(error instanceof ApiError)) return { kind: 'failed', message: 'The change could not be saved.', violations: [] };
  const violations = Array.isArray(error.problem.violations) ? (error.problem.violations as Violation[]) : [];
  if (error.status === 422) return { kind: 'refused', message: error.detail ?? error.title, violations };
  if (error.status === 409 && error.problem.code === 'stale-version') {
    return { kind: 'stale', message: 'Someone else changed this stage meanwhile; the board now shows their change.', violations };
  }
  if (error.status === 409) return { kind: 'refused', message: error.detail ?? 'That resource is already confirmed for that time.', violations };
  return { kind: 'failed', message: error.detail ? `${error.title}. ${error.detail}` : error.title, violations };
}

/** The intent that puts a stage back where it was before a change (for undo). */
export function undoOf(done: Intent, before: BoardBooking[], after: BookingView[]): Intent | null {
  if (done.kind === 'book') {
    const created = after[0];
    return created ? { kind: 'remove', bookingId: created.id, version: created.version } : null;
  }
  if (done.kind === 'move') {
    const own = before.filter((b) => b.stageId === done.stageId);
    const first = own.reduce<BoardBooking | undefined>((a, b) => (!a || b.start < a.start ? b : a), undefined);
    if (!first) return null;
    const versions = Object.fromEntries(after.map((b) => [b.id, b.version]));
    const movedResource = done.resourceId && done.bookingId ? own.find((b) => b.id === done.bookingId)?.resourceId : undefined;
    const sameLength = own.every((b) => after.find((a) => a.id === b.id && Date.parse(a.endsAt) - Date.parse(a.startsAt) === b.end - b.start));
    return {
      kind: 'move', stageId: done.stageId, start: first.start, ...(sameLength ? {} : { end: first.end }),
      ...(movedResource ? { resourceId: movedResource, bookingId: done.bookingId } : {}),
      versions, moveDependents: done.moveDependents,
    };
  }
  return null;
}
