import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { TEST_TODAY, account, signIn, startTestApp, type Agent, type TestContext } from '../helpers/server.ts';

/**
 * How far from today a booking may lie is the server's setting; the board is sent it, so a drag or
 * the move dialog refuses in the server's own words what the server would refuse.
 */
let ctx: TestContext;
let scheduler: Agent;
const DAY = 86_400_000;

beforeAll(async () => {
  ctx = await startTestApp({ BOOKING_WINDOW_FUTURE_DAYS: '100' });
  scheduler = await signIn(ctx, account('scheduler').email);
});
afterAll(async () => {
  await ctx.close();
});

describe('the booking window', () => {
  it('comes with the board, and a move beyond it is refused in the same words', async () => {
    const board = await scheduler.get('/api/board?from=2026-06-01T00:00:00Z&to=2026-06-15T00:00:00Z').expect(200);
    expect(board.body.bookingWindow).toEqual({ pastDays: 730, futureDays: 100 });

    const booking = (
      board.body.bookings as { id: string; stageId: string; version: number; state: string; start: number }[]
    ).find((b) => b.state === 'pencilled' && b.start > TEST_TODAY.getTime())!;
    const versions = Object.fromEntries(
      (board.body.bookings as { id: string; stageId: string; version: number }[])
        .filter((b) => b.stageId === booking.stageId)
        .map((b) => [b.id, b.version]),
    );
    const move = (days: number) =>
      scheduler
        .post(`/api/stages/${booking.stageId}/move`)
        .set('X-CSRF-Token', scheduler.csrf)
        .send({ startsAt: new Date(TEST_TODAY.getTime() + days * DAY).toISOString(), versions });
    const refused = await move(101).expect(400);
    expect(refused.body.detail).toBe('Bookings must lie between 2 years ago and 100 days ahead.');
    expect(refused.body.errors).toEqual([
      { field: 'startsAt', message: 'must be within 730 days before and 100 days after today' },
    ]);
  });
});
