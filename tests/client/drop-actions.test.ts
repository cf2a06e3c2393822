import { describe, expect, it } from 'vitest';
import { ApiError } from '@/api/client';
import { callFor, refusalOf, resultOf } from '@/components/board/drop-actions';

const view = {
  id: '7',
  stageId: 's1',
  jobId: 'j1',
  resourceId: 'r1',
  startsAt: '2026-09-15T07:00:00.000Z',
  endsAt: '2026-09-15T12:00:00.000Z',
  state: 'pencilled' as const,
  version: 2,
  stageName: 'Pour',
  stageKind: 'base_pour',
  jobReference: 'TW-1',
  siteTown: 'Otley',
};

describe('a drop becomes one API call', () => {
  it('books a tray stage at the drop time (the server works out the end)', () => {
    expect(callFor({ kind: 'book', stageId: '5', resourceId: '9', start: Date.UTC(2026, 8, 14, 7) })).toEqual({
      method: 'POST',
      path: '/api/bookings',
      body: { stageId: '5', resourceId: '9', startsAt: '2026-09-14T07:00:00.000Z' },
    });
  });

  it('moves a whole stage with the versions it was based on, and a changed row only for the dragged booking', () => {
    expect(
      callFor({
        kind: 'move',
        stageId: '5',
        start: Date.UTC(2026, 8, 15, 7),
        resourceId: '11',
        bookingId: '7',
        versions: { 7: 2 },
        dependents: 'all',
        askAgain: ['9'],
      }),
    ).toEqual({
      method: 'POST',
      path: '/api/stages/5/move',
      body: {
        startsAt: '2026-09-15T07:00:00.000Z',
        resourceId: '11',
        bookingId: '7',
        versions: { 7: 2 },
        dependents: 'all',
        askAgain: ['9'],
      },
    });
  });

  it("sends the number of days only with 'within'", () => {
    expect(
      callFor({
        kind: 'move',
        stageId: '5',
        start: Date.UTC(2026, 8, 15, 7),
        versions: {},
        dependents: 'within',
        withinDays: 7,
      }).body,
    ).toEqual({ startsAt: '2026-09-15T07:00:00.000Z', versions: {}, dependents: 'within', withinDays: 7 });
    expect(
      callFor({
        kind: 'move',
        stageId: '5',
        start: Date.UTC(2026, 8, 15, 7),
        versions: {},
        dependents: 'none',
        withinDays: 7,
      }).body,
    ).toEqual({ startsAt: '2026-09-15T07:00:00.000Z', versions: {}, dependents: 'none' });
  });

  it('books the rest of a stage in one batch, and rebooks one booking alone with PATCH', () => {
    expect(
      callFor({ kind: 'batch', bookings: [{ stageId: '5', resourceId: '9', start: Date.UTC(2026, 8, 14, 7) }] }),
    ).toEqual({
      method: 'POST',
      path: '/api/bookings/batch',
      body: { bookings: [{ stageId: '5', resourceId: '9', startsAt: '2026-09-14T07:00:00.000Z' }] },
    });
    expect(
      callFor({
        kind: 'patch',
        bookingId: '7',
        version: 3,
        start: Date.UTC(2026, 8, 14, 7),
        end: Date.UTC(2026, 8, 14, 11),
      }),
    ).toEqual({
      method: 'PATCH',
      path: '/api/bookings/7',
      body: { version: 3, startsAt: '2026-09-14T07:00:00.000Z', endsAt: '2026-09-14T11:00:00.000Z' },
    });
  });

  it('sends a declined request again, and takes a proposed time, each with the version seen', () => {
    expect(callFor({ kind: 'publish', bookingId: '7', version: 3 })).toEqual({
      method: 'POST',
      path: '/api/bookings/7/publish',
      body: { version: 3 },
    });
    expect(callFor({ kind: 'accept-proposal', bookingId: '7', version: 4 })).toEqual({
      method: 'POST',
      path: '/api/bookings/7/proposal/accept',
      body: { version: 4 },
    });
  });

  it('takes a booking off with its version', () => {
    expect(callFor({ kind: 'remove', bookingId: '7', version: 4 })).toEqual({
      method: 'DELETE',
      path: '/api/bookings/7?version=4',
    });
  });
});

describe('a refused write', () => {
  it('snaps back with the rule the server named (422)', () => {
    const error = new ApiError({
      status: 422,
      title: 'The change breaks a scheduling rule',
      detail: "The lift can't start before the base has cured",
      problem: { violations: [{ kind: 'cure' }] },
    });
    expect(refusalOf(error)).toMatchObject({
      kind: 'refused',
      message: "The lift can't start before the base has cured",
      violations: [{ kind: 'cure' }],
    });
  });

  it('reloads the stage when someone else changed it first (409 stale version)', () => {
    const error = new ApiError({
      status: 409,
      title: 'Conflict',
      detail: 'Someone else changed this stage',
      problem: { code: 'stale-version' },
    });
    expect(refusalOf(error).kind).toBe('stale');
  });

  it('explains a double confirmed booking refused by the database (409)', () => {
    const error = new ApiError({
      status: 409,
      title: 'Conflict',
      detail: 'That resource already has a confirmed booking at that time.',
      problem: { code: 'double-booked' },
    });
    expect(refusalOf(error)).toMatchObject({
      kind: 'refused',
      message: 'That resource already has a confirmed booking at that time.',
    });
  });
});

describe("the server's answer", () => {
  it('is read the same whether it lists bookings, is one booking, or is empty', () => {
    expect(resultOf({ bookings: [view], warnings: [], reasked: [] })).toEqual({
      bookings: [view],
      warnings: [],
      reasked: [],
    });
    expect(resultOf({ ...view, answer: null, overdue: false })).toEqual({
      bookings: [{ ...view, answer: null, overdue: false }],
      warnings: [],
    });
    expect(resultOf(undefined)).toEqual({ bookings: [], warnings: [] });
  });

  it('carries the partner bookings a move would ask again (409), for the dialog to list', () => {
    const partner = [
      {
        bookingId: '9',
        stageName: 'Connect and certify',
        jobReference: 'TW-1',
        resourceName: 'Priya',
        firmName: 'Brightspark',
        state: 'sent',
        startsAt: '2026-09-20T08:00:00.000Z',
      },
    ];
    const error = new ApiError({
      status: 409,
      title: 'Conflict',
      detail: 'Moving the stages after it would ask 1 partner booking again',
      problem: { code: 'asks-partners-again', bookings: partner },
    });
    expect(refusalOf(error)).toMatchObject({ kind: 'refused', partner });
  });
});
