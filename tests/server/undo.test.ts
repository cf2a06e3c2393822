import { afterAll, afterEach, beforeAll, describe, expect, it, vi } from 'vitest';
import { account, idOf, signIn, startTestApp, type Agent, type TestContext } from '../helpers/server.ts';
import { makeJob } from '../helpers/flows.ts';
import { BookingWriter } from '../../server/services/booking-writes.ts';

/**
 * The board's undo stack lives on the server, per signed-in session: a reload (or a new tab of the
 * same session) still offers it, another session does not, and taking a change back goes through
 * the guarded write path like any change.
 */

let ctx: TestContext;
let scheduler: Agent;
let otter: string;
const stageOf = async (reference: string, kind: string) =>
  idOf(ctx.knex, 'stages', { job_id: await idOf(ctx.knex, 'jobs', { reference }), kind });

beforeAll(async () => {
  ctx = await startTestApp();
  scheduler = await signIn(ctx, account('scheduler').email);
  otter = await idOf(ctx.knex, 'resources', { name: 'Crew Otter' });
  // Jobs of the test's own: fill, commission and handover on an install crew, one after the other.
  for (const reference of ['FX-2418', 'FX-2421', 'FX-2423', 'FX-2424']) {
    await makeJob(ctx.knex, {
      reference,
      links: [
        ['fill', 'commission'],
        ['commission', 'handover'],
      ],
      stages: [
        { kind: 'fill', name: 'Fill', minutes: 180, needs: { install_crew: 1 } },
        { kind: 'commission', name: 'Commission', minutes: 180, needs: { install_crew: 1 } },
        { kind: 'handover', name: 'Handover', minutes: 60, needs: { install_crew: 1 } },
      ],
    });
  }
});
afterAll(async () => {
  await ctx.close();
});

const send = (agent: Agent, method: 'post' | 'delete', path: string, body?: object) =>
  agent[method](path).set('X-CSRF-Token', agent.csrf).send(body);
/** What a reloaded board asks first: who am I, then what can be undone. */
async function reload(agent: Agent): Promise<{ id: string; label: string }[]> {
  const session = await agent.get('/api/session').expect(200);
  agent.csrf = session.body.csrfToken;
  return (await agent.get('/api/undo').expect(200)).body.items;
}
const bookingOn = async (stageId: string) => ctx.knex('bookings').where({ stage_id: stageId }).first();

describe('undo after a reload', () => {
  let handover: string;
  let bookingId: string;

  it('offers the booking and the move made before the reload, newest first', async () => {
    handover = await stageOf('FX-2418', 'handover');
    // Monday 2 November 2026, 08:00 in London (GMT).
    const booked = await send(scheduler, 'post', '/api/bookings', {
      stageId: handover,
      resourceId: otter,
      startsAt: '2026-11-02T08:00:00Z',
    }).expect(201);
    bookingId = booked.body.bookings[0].id;
    await send(scheduler, 'post', `/api/stages/${handover}/move`, {
      startsAt: '2026-11-03T08:00:00Z',
      versions: { [bookingId]: 1 },
    }).expect(200);

    const items = await reload(scheduler);
    expect(items.map((i) => i.label)).toEqual(["move 'Handover' on FX-2418", "book 'Handover' on FX-2418"]);
  });

  it('puts the stage back where it was, then takes the booking off, then has nothing left', async () => {
    const first = await send(scheduler, 'post', '/api/undo').expect(200);
    expect(first.body.undone.label).toBe("move 'Handover' on FX-2418");
    expect(first.body.bookings).toEqual([
      expect.objectContaining({
        id: bookingId,
        startsAt: '2026-11-02T08:00:00.000Z',
        endsAt: '2026-11-02T09:00:00.000Z',
        version: 3,
      }),
    ]);
    expect(first.body.remaining.map((i: { label: string }) => i.label)).toEqual(["book 'Handover' on FX-2418"]);
    expect((await bookingOn(handover)).startsAt.toISOString()).toBe('2026-11-02T08:00:00.000Z');

    expect(await reload(scheduler)).toHaveLength(1);
    await send(scheduler, 'post', '/api/undo').expect(200);
    expect(await bookingOn(handover)).toBeUndefined();

    const none = await send(scheduler, 'post', '/api/undo').expect(404);
    expect(none.body).toMatchObject({ code: 'nothing-to-undo', detail: 'There is nothing to undo.' });
    // Each step was written like any change: audited, so the board stream heard of it.
    const audit = await ctx
      .knex('audit_log')
      .where({ entity: 'booking', entity_id: bookingId })
      .orderBy('id')
      .pluck('action');
    expect(audit).toEqual(['create', 'update', 'update', 'delete']);
  });
});

describe('undo of a booking taken off', () => {
  it('books it again at the same time on the same crew (pencilled)', async () => {
    const commission = await stageOf('FX-2418', 'commission');
    const booked = await send(scheduler, 'post', '/api/bookings', {
      stageId: commission,
      resourceId: otter,
      startsAt: '2026-11-04T08:00:00Z',
      state: 'confirmed',
    }).expect(201);
    const id = booked.body.bookings[0].id;
    await send(scheduler, 'delete', `/api/bookings/${id}?version=1`).expect(204);
    expect((await reload(scheduler))[0]!.label).toBe("take off 'Commission' on FX-2418");
    await send(scheduler, 'post', '/api/undo').expect(200);
    const again = await bookingOn(commission);
    expect({
      resource: String(again.resourceId),
      start: again.startsAt.toISOString(),
      end: again.endsAt.toISOString(),
      state: again.state,
    }).toEqual({
      resource: otter,
      start: '2026-11-04T08:00:00.000Z',
      end: '2026-11-04T11:00:00.000Z',
      state: 'pencilled',
    });
  });
});

describe('the stack belongs to one session', () => {
  it('is not offered to the same person signed in elsewhere, and goes when they sign out', async () => {
    const fill = await stageOf('FX-2421', 'fill');
    await send(scheduler, 'post', '/api/bookings', {
      stageId: fill,
      resourceId: otter,
      startsAt: '2026-11-05T08:00:00Z',
    }).expect(201);
    const elsewhere = await signIn(ctx, account('scheduler').email);
    expect(await reload(elsewhere)).toEqual([]);
    expect((await reload(scheduler))[0]!.label).toBe("book 'Fill' on FX-2421");

    await send(scheduler, 'post', '/auth/sign-out');
    expect(await ctx.knex('booking_undo')).toEqual([]);
    scheduler = await signIn(ctx, account('scheduler').email);
  });
});

describe('a change someone else made since', () => {
  it('is not overwritten: the undo is refused (409) and dropped from the stack', async () => {
    const fill = await stageOf('FX-2424', 'fill');
    const booked = await send(scheduler, 'post', '/api/bookings', {
      stageId: fill,
      resourceId: otter,
      startsAt: '2026-11-09T08:00:00Z',
    }).expect(201);
    const id = booked.body.bookings[0].id;
    await send(scheduler, 'post', `/api/stages/${fill}/move`, {
      startsAt: '2026-11-10T08:00:00Z',
      versions: { [id]: 1 },
    }).expect(200);
    const owner = await signIn(ctx, account('owner').email);
    await send(owner, 'post', `/api/stages/${fill}/move`, {
      startsAt: '2026-11-11T08:00:00Z',
      versions: { [id]: 2 },
    }).expect(200);

    const refused = await send(scheduler, 'post', '/api/undo').expect(409);
    expect(refused.body).toMatchObject({
      code: 'undo-stale',
      detail: `"Move 'Fill' on FX-2424" can't be undone any more: those bookings were changed or taken off since.`,
    });
    expect((await bookingOn(fill)).startsAt.toISOString()).toBe('2026-11-11T08:00:00.000Z');
    expect((await reload(scheduler)).map((i) => i.label)).toEqual(["book 'Fill' on FX-2424"]);
  });
});

describe('taking a change back', () => {
  const run = vi.spyOn(BookingWriter.prototype, 'run');
  afterEach(() => {
    run.mockClear();
  });

  it('goes through the guarded write path', async () => {
    const handover = await stageOf('FX-2423', 'handover');
    await send(scheduler, 'post', '/api/bookings', {
      stageId: handover,
      resourceId: otter,
      startsAt: '2026-11-12T08:00:00Z',
    }).expect(201);
    run.mockClear();
    await send(scheduler, 'post', '/api/undo').expect(200);
    expect(run).toHaveBeenCalledTimes(1);
    expect(await bookingOn(handover)).toBeUndefined();
  });

  it('is for those who may change the board', async () => {
    const viewer = await signIn(ctx, account('viewer').email);
    await viewer.get('/api/undo').expect(403);
    await send(viewer, 'post', '/api/undo').expect(403);
  });
});
