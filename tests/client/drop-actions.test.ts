import { describe, expect, it } from 'vitest';
import { ApiError } from '@/api/client';
import { callFor, fromView, refusalOf, undoOf } from '@/components/board/drop-actions';

const view = { id: '7', stageId: 's1', jobId: 'j1', resourceId: 'r1', startsAt: '2026-09-15T07:00:00.000Z', endsAt: '2026-09-15T12:00:00.000Z', state: 'pencilled' as const, version: 2, stageName: 'Pour', stageKind: 'base_pour', jobReference: 'TW-1', siteTown: 'Otley' };

describe('a drop becomes one API call', () => {
  it('books a tray stage at the drop time (the server works out the end)', () => {
    expect(callFor({ kind: 'book', stageId: '5', resourceId: '9', start: Date.UTC(2026, 8, 14, 7) })).toEqual({
      method: 'POST', path: '/api/bookings', body: { stageId: '5', resourceId: '9', startsAt: '2026-09-14T07:00:00.000Z' },
    });
  });

  it('moves a whole stage with the versions it was based on, and a changed row only for the dragged booking', () => {
    expect(callFor({ kind: 'move', stageId: '5', start: Date.UTC(2026, 8, 15, 7), resourceId: '11', bookingId: '7', versions: { 7: 2 }, moveDependents: true })).toEqual({
      method: 'POST', path: '/api/stages/5/move',
      body: { startsAt: '2026-09-15T07:00:00.000Z', resourceId: '11', bookingId: '7', versions: { 7: 2 }, moveDependents: true },
    });
  });

  it('takes a booking off with its version', () => {
    expect(callFor({ kind: 'remove', bookingId: '7', version: 4 })).toEqual({ method: 'DELETE', path: '/api/bookings/7?version=4' });
  });
});

describe('a refused write', () => {
  it('snaps back with the rule the server named (422)', () => {
    const error = new ApiError({ status: 422, title: 'The change breaks a scheduling rule', detail: "The lift can't start before the base has cured", problem: { violations: [{ kind: 'cure' }] } });
    expect(refusalOf(error)).toMatchObject({ kind: 'refused', message: "The lift can't start before the base has cured", violations: [{ kind: 'cure' }] });
  });

  it('reloads the stage when someone else changed it first (409 stale version)', () => {
    const error = new ApiError({ status: 409, title: 'Conflict', detail: 'Someone else changed this stage', problem: { code: 'stale-version' } });
    expect(refusalOf(error).kind).toBe('stale');
  });

  it('explains a double confirmed booking refused by the database (409)', () => {
    const error = new ApiError({ status: 409, title: 'Conflict', detail: 'That resource already has a confirmed booking at that time.', problem: { code: 'double-booked' } });
    expect(refusalOf(error)).toMatchObject({ kind: 'refused', message: 'That resource already has a confirmed booking at that time.' });
  });
});

describe('undo', () => {
  it('of a tray booking takes the new booking off again', () => {
    expect(undoOf({ kind: 'book', stageId: 's1', resourceId: 'r1', start: 0 }, [], [view])).toEqual({ kind: 'remove', bookingId: '7', version: 2 });
  });

  it('of a move puts the stage back where it started, on the versions the move produced', () => {
    const before = [fromView({ ...view, startsAt: '2026-09-14T07:00:00.000Z', endsAt: '2026-09-14T12:00:00.000Z', version: 1 }, 'f1')];
    expect(undoOf({ kind: 'move', stageId: 's1', start: Date.UTC(2026, 8, 15, 7), versions: { 7: 1 }, moveDependents: false }, before, [view])).toEqual({
      kind: 'move', stageId: 's1', start: Date.UTC(2026, 8, 14, 7), versions: { 7: 2 }, moveDependents: false,
    });
  });
});
