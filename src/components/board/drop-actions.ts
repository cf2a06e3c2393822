/**
 * What a drop, a resize or a key press on the board asks the server to do, and what the board
 * does with the answer. Kept apart from the calendar so it is tested without a browser.
 */
import { ApiError } from '@/api/client';
import type { BoardBooking } from '@shared/board-data';
import type { BookingView, DependentChoice, PartnerBookingNote } from '@shared/schemas/bookings';
import type { Violation } from '@shared/scheduler/index';

/** A stage already on the board moves (all its bookings together), with as many of the stages after it as chosen. */
export interface MoveIntent {
  kind: 'move';
  stageId: string;
  start: number;
  end?: number;
  resourceId?: string;
  bookingId?: string;
  versions: Record<string, number>;
  /** Which stages after it move too: none (only this), those within `withinDays`, or all. */
  dependents: DependentChoice;
  withinDays?: number;
  /** Partner firms' sent or confirmed bookings among the stages after it that may move (each is asked again). */
  askAgain?: string[];
}

/** A stage from the tray is booked on a resource. */
export interface BookIntent {
  kind: 'book';
  stageId: string;
  resourceId: string;
  start: number;
}

/** Several bookings at once: the rest of a stage's resources, or an auto-place preview. */
export interface BatchIntent {
  kind: 'batch';
  bookings: { stageId: string; resourceId: string; start: number; end?: number }[];
}

/** One booking alone changes time or row (the rest of its stage stays); a declined one is rebooked this way. */
export interface PatchIntent {
  kind: 'patch';
  bookingId: string;
  version: number;
  start: number;
  end: number;
  resourceId?: string;
}

/** A booking is taken off the board (back to the tray). */
export interface RemoveIntent {
  kind: 'remove';
  bookingId: string;
  version: number;
}

/** A partner's request is sent (again, after a decline), or the partner's proposed time is taken. */
export interface RequestIntent {
  kind: 'publish' | 'accept-proposal';
  bookingId: string;
  version: number;
}

export type Intent = MoveIntent | BookIntent | BatchIntent | PatchIntent | RemoveIntent | RequestIntent;

export interface ApiCall {
  method: 'POST' | 'PATCH' | 'DELETE';
  path: string;
  body?: unknown;
}

const iso = (t: number) => new Date(t).toISOString();

/** The request for an intent. */
export function callFor(intent: Intent): ApiCall {
  switch (intent.kind) {
    case 'book':
      return {
        method: 'POST',
        path: '/api/bookings',
        body: { stageId: intent.stageId, resourceId: intent.resourceId, startsAt: iso(intent.start) },
      };
    case 'batch':
      return {
        method: 'POST',
        path: '/api/bookings/batch',
        body: {
          bookings: intent.bookings.map((b) => ({
            stageId: b.stageId,
            resourceId: b.resourceId,
            startsAt: iso(b.start),
            ...(b.end !== undefined ? { endsAt: iso(b.end) } : {}),
          })),
        },
      };
    case 'move':
      return {
        method: 'POST',
        path: `/api/stages/${intent.stageId}/move`,
        body: {
          startsAt: iso(intent.start),
          ...(intent.end !== undefined ? { endsAt: iso(intent.end) } : {}),
          ...(intent.resourceId ? { resourceId: intent.resourceId, bookingId: intent.bookingId } : {}),
          versions: intent.versions,
          dependents: intent.dependents,
          ...(intent.dependents === 'within' ? { withinDays: intent.withinDays } : {}),
          ...(intent.askAgain?.length ? { askAgain: intent.askAgain } : {}),
        },
      };
    case 'patch':
      return {
        method: 'PATCH',
        path: `/api/bookings/${intent.bookingId}`,
        body: {
          version: intent.version,
          startsAt: iso(intent.start),
          endsAt: iso(intent.end),
          ...(intent.resourceId ? { resourceId: intent.resourceId } : {}),
        },
      };
    case 'remove':
      return { method: 'DELETE', path: `/api/bookings/${intent.bookingId}?version=${intent.version}` };
    case 'publish':
      return { method: 'POST', path: `/api/bookings/${intent.bookingId}/publish`, body: { version: intent.version } };
    case 'accept-proposal':
      return {
        method: 'POST',
        path: `/api/bookings/${intent.bookingId}/proposal/accept`,
        body: { version: intent.version },
      };
  }
}

/** The server's answer to a write. */
export interface WriteResult {
  bookings: BookingView[];
  warnings: Violation[];
  reasked?: PartnerBookingNote[];
}

/** Every write answers with its saved bookings: a list (book, move, batch), one booking (requests), or nothing (take off). */
export function resultOf(body: unknown): WriteResult {
  if (body && typeof body === 'object' && Array.isArray((body as WriteResult).bookings)) {
    const r = body as WriteResult;
    return { bookings: r.bookings, warnings: r.warnings ?? [], ...(r.reasked ? { reasked: r.reasked } : {}) };
  }
  if (body && typeof body === 'object' && 'id' in body && 'stageId' in body)
    return { bookings: [body as BookingView], warnings: [] };
  return { bookings: [], warnings: [] };
}

/** A saved booking as the board keeps it. */
export function fromView(v: BookingView, installerFirmId: string): BoardBooking {
  return {
    id: v.id,
    stageId: v.stageId,
    resourceId: v.resourceId,
    start: Date.parse(v.startsAt),
    end: Date.parse(v.endsAt),
    state: v.state,
    version: v.version,
    installerFirmId,
  };
}

/** What the board does when a write fails. */
export interface Refusal {
  /** refused: a rule says no (snap back, show why); stale: someone else changed it (reload it); failed: anything else. */
  kind: 'refused' | 'stale' | 'failed';
  message: string;
  violations: Violation[];
  /** Partner bookings a stage move would ask again, when the server wants the scheduler to say so first. */
  partner?: PartnerBookingNote[];
}

export function refusalOf(error: unknown): Refusal {
  if (!(error instanceof ApiError))
    return { kind: 'failed', message: 'The change could not be saved.', violations: [] };
  const violations = Array.isArray(error.problem.violations) ? (error.problem.violations as Violation[]) : [];
  if (error.status === 422) return { kind: 'refused', message: error.detail ?? error.title, violations };
  if (error.status === 409 && (error.problem.code === 'stale-version' || error.problem.code === 'undo-stale')) {
    return {
      kind: 'stale',
      message:
        error.problem.code === 'undo-stale'
          ? (error.detail ?? error.title)
          : 'Someone else changed this stage meanwhile; the board now shows their change.',
      violations,
    };
  }
  if (error.status === 409 && error.problem.code === 'asks-partners-again') {
    return {
      kind: 'refused',
      message: error.detail ?? error.title,
      violations,
      partner: error.problem.bookings as PartnerBookingNote[],
    };
  }
  if (error.status === 409)
    return {
      kind: 'refused',
      message: error.detail ?? 'That resource is already confirmed for that time.',
      violations,
    };
  return { kind: 'failed', message: error.detail ? `${error.title}. ${error.detail}` : error.title, violations };
}
