import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { account, idOf, signIn, startTestApp, type Agent, type TestContext } from '../helpers/server.ts';
import { makeJob } from '../helpers/flows.ts';

/**
 * Moving a stage with the stages after it: only this one, those within the next N days, or all.
 * A partner firm's sent or confirmed booking among them is never moved without the scheduler
 * saying so: the move is refused listing it, and once agreed the result reports it (asked again).
 */

let ctx: TestContext;
let scheduler: Agent;
const stage: Record<string, string> = {};
const booking: Record<string, string> = {};

const send = (path: string, body: object) => scheduler.post(path).set('X-CSRF-Token', scheduler.csrf).send(body);
const startOf = async (name: string) =>
  (await ctx.knex('bookings').where('id', booking[name]).first()).startsAt.toISOString();
const versionsOf = async (...names: string[]) =>
  Object.fromEntries(
    await Promise.all(
      names.map(async (n) => [booking[n], (await ctx.knex('bookings').where('id', booking[n]).first()).version]),
    ),
  );

beforeAll(async () => {
  ctx = await startTestApp();
  await ctx.knex.raw('TRUNCATE outbox RESTART IDENTITY');
  scheduler = await signIn(ctx, account('scheduler').email);
  // A job of the test's own: the unit goes in, then fill and connect, commission, handover.
  const job = await makeJob(ctx.knex, {
    reference: 'FX-2420',
    stages: [
      { kind: 'placement', name: 'Move into place', minutes: 180, needs: { install_crew: 1 } },
      { kind: 'fill', name: 'Fill', minutes: 180, needs: { install_crew: 1 } },
      { kind: 'electrical_connect', name: 'Connect and certify', minutes: 240, needs: { electrician: 1 } },
      { kind: 'commission', name: 'Commission', minutes: 180, needs: { install_crew: 1 } },
      { kind: 'handover', name: 'Handover', minutes: 60, needs: { install_crew: 1 } },
    ],
    links: [
      ['placement', 'fill'],
      ['placement', 'electrical_connect'],
      ['fill', 'commission'],
      ['electrical_connect', 'commission'],
      ['commission', 'handover'],
    ],
  });
  stage.in = job.stage.placement!;
  for (const kind of ['fill', 'electrical_connect', 'commission', 'handover']) stage[kind] = job.stage[kind]!;
  const otter = await idOf(ctx.knex, 'resources', { name: 'Crew Otter' });
  const priya = await idOf(ctx.knex, 'resources', { name: 'Priya Nair' });
  const book = async (name: string, resourceId: string, startsAt: string) => {
    const res = await send('/api/bookings', { stageId: stage[name], resourceId, startsAt }).expect(201);
    booking[name] = res.body.bookings[0].id;
  };
  // Monday 12 October 2026 (BST) the unit goes in, Tuesday it is filled; a fortnight later
  // (after the clock change, GMT) Brightspark connects it, then commission and handover.
  await book('in', otter, '2026-10-12T07:00:00Z');
  await book('fill', otter, '2026-10-13T07:00:00Z');
  await book('electrical_connect', priya, '2026-10-26T09:00:00Z');
  await book('commission', otter, '2026-10-27T09:00:00Z');
  await book('handover', otter, '2026-10-28T09:00:00Z');
  await send(`/api/bookings/${booking.electrical_connect}/publish`, { version: 1 }).expect(200);
});
afterAll(async () => {
  await ctx.close();
});

describe('moving the unit in a working day later', () => {
  it('alone: refused (422), as the fill would then come before it', async () => {
    const res = await send(`/api/stages/${stage.in}/move`, {
      startsAt: '2026-10-13T07:00:00Z',
      versions: await versionsOf('in'),
      dependents: 'none',
    }).expect(422);
    expect(res.body.violations.length).toBeGreaterThan(0);
    expect(await startOf('in')).toBe('2026-10-12T07:00:00.000Z');
  });

  it('with those within the next 7 days: the fill moves too; the connection a fortnight on (sent to a partner) stays', async () => {
    const res = await send(`/api/stages/${stage.in}/move`, {
      startsAt: '2026-10-13T07:00:00Z',
      versions: await versionsOf('in', 'fill'),
      dependents: 'within',
      withinDays: 7,
    });
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    expect(res.body.reasked).toEqual([]);
    expect(await startOf('in')).toBe('2026-10-13T07:00:00.000Z');
    expect(await startOf('fill')).toBe('2026-10-14T07:00:00.000Z');
    expect(await startOf('electrical_connect')).toBe('2026-10-26T09:00:00.000Z');
    expect(await startOf('handover')).toBe('2026-10-28T09:00:00.000Z');
  });

  it('with all after it: refused (409) listing the sent partner booking; nothing moves', async () => {
    const res = await send(`/api/stages/${stage.in}/move`, {
      startsAt: '2026-10-14T07:00:00Z',
      versions: await versionsOf('in'),
      dependents: 'all',
    }).expect(409);
    expect(res.body).toMatchObject({ code: 'asks-partners-again' });
    expect(res.body.bookings).toEqual([
      {
        bookingId: booking.electrical_connect,
        stageName: 'Connect and certify',
        jobReference: 'FX-2420',
        resourceName: 'Priya Nair',
        firmName: 'Brightspark Electrical',
        state: 'sent',
        startsAt: '2026-10-26T09:00:00.000Z',
      },
    ]);
    expect(res.body.detail).toBe(
      "Moving the stages after it would ask 1 partner booking again: 'Connect and certify' on FX-2420 (Priya Nair, Brightspark Electrical, sent). Choose to ask again, or move fewer stages.",
    );
    expect(await startOf('in')).toBe('2026-10-13T07:00:00.000Z');
    expect(await startOf('fill')).toBe('2026-10-14T07:00:00.000Z');
  });

  it('with all, once the scheduler agreed to ask again: moves them and reports the partner booking, whose partner is asked again', async () => {
    const res = await send(`/api/stages/${stage.in}/move`, {
      startsAt: '2026-10-14T07:00:00Z',
      versions: await versionsOf('in'),
      dependents: 'all',
      askAgain: [booking.electrical_connect],
    });
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    expect(res.body.reasked).toEqual([
      expect.objectContaining({
        bookingId: booking.electrical_connect,
        firmName: 'Brightspark Electrical',
        state: 'sent',
      }),
    ]);
    expect(await startOf('fill')).toBe('2026-10-15T07:00:00.000Z');
    // One working day later on the electrician's calendar; commission and handover keep their gaps.
    expect(await startOf('electrical_connect')).toBe('2026-10-27T09:00:00.000Z');
    expect(await startOf('handover')).toBe('2026-10-29T09:00:00.000Z');
    const version = (await ctx.knex('bookings').where('id', booking.electrical_connect).first()).version;
    expect(
      await ctx
        .knex('outbox')
        .where({ kind: 'booking_update' })
        .whereRaw("payload->>'bookingId' = ?", [booking.electrical_connect!])
        .pluck('payload'),
    ).toEqual([expect.objectContaining({ version })]);
  });

  it("names the missing day count when 'within' has none (400)", async () => {
    const res = await send(`/api/stages/${stage.in}/move`, {
      startsAt: '2026-10-15T07:00:00Z',
      versions: await versionsOf('in'),
      dependents: 'within',
    }).expect(400);
    expect(res.body.errors).toEqual([{ field: 'withinDays', message: "is required when dependents is 'within'" }]);
  });
});
