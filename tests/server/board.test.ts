import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { account, signIn, startTestApp, TEST_TODAY, type TestContext } from '../helpers/server.ts';
import { analyseBoard } from '../../shared/scheduler/index.ts';
import { toEngineBoard, type BoardData } from '../../shared/board-data.ts';

let ctx: TestContext;
beforeAll(async () => {
  ctx = await startTestApp();
});
afterAll(async () => {
  await ctx.close();
});

const range = { from: TEST_TODAY.toISOString(), to: new Date(TEST_TODAY.getTime() + 28 * 86_400_000).toISOString() };

describe('the board data for a scheduler', () => {
  let data: BoardData;
  beforeAll(async () => {
    const agent = await signIn(ctx, account('scheduler').email);
    data = (await agent.get('/api/board').query(range).expect(200)).body;
  });

  it('has rows for own crews and machines and for every partner firm', () => {
    const firms = new Set(data.resources.map((r) => r.firmName));
    expect(firms).toEqual(
      new Set([
        'Tideway Hot Tubs',
        'Fellside Crane Hire',
        'Brightspark Electrical',
        'Northgate Electrical',
        'Millstone Groundworks',
        'Carrow Haulage',
      ]),
    );
    expect(data.resources.find((r) => r.name === 'Crew Heron')).toMatchObject({
      ownership: 'owned',
      kind: 'install_crew',
      personIds: expect.any(Array),
    });
    expect(data.resources.find((r) => r.name === '3 t excavator (hired)')).toMatchObject({
      ownership: 'hired',
      hired: true,
    });
    expect(data.resources.find((r) => r.name === 'Priya Nair')).toMatchObject({ ownership: 'partner' });
  });

  it("shows another installer's booking of a shared electrician only as busy elsewhere", () => {
    const priya = data.resources.find((r) => r.name === 'Priya Nair')!;
    const elsewhere = data.bookings.filter((b) => b.elsewhere);
    expect(elsewhere).toHaveLength(1);
    expect(elsewhere[0]).toMatchObject({ resourceId: priya.id, installerFirmId: 'elsewhere' });
    expect(JSON.stringify(data)).not.toContain('MV-118');
    expect(JSON.stringify(data)).not.toContain('Alan Frost');
  });

  it('includes the tray: open jobs whose stages are not booked yet', () => {
    const booked = new Set(data.bookings.map((b) => b.stageId));
    const tray = data.stages.filter((s) => !booked.has(s.id) && s.jobId !== 'elsewhere');
    expect(tray.length).toBeGreaterThan(20);
    expect(data.jobs.map((j) => j.reference)).toContain('TW-2424');
  });

  it('gives calendars with bank holidays and absences the engine can analyse', () => {
    const tom = data.resources.find((r) => r.name === 'Tom Ashworth')!;
    const cal = data.calendars.find((c) => c.id === tom.calendarId)!;
    expect(cal.closures?.length).toBe(1);
    expect(cal.holidayRegion).toEqual({ country: 'GB', state: 'ENG' });
    const analysis = analyseBoard(toEngineBoard(data), { now: data.now });
    for (const v of analysis.violations.filter((x) => x.kind === 'cross_firm')) {
      expect(v.message).toMatch(/busy elsewhere/i);
      expect(v.message).not.toMatch(/Moorview|MV-118/);
    }
    expect(analysis.criticalPaths.length).toBeGreaterThan(10);
  });
});

describe('a partner coordinator', () => {
  it('is refused the board and its stream: their own slots are on the partner pages (tests/server/read-policy.test.ts)', async () => {
    const agent = await signIn(ctx, account('partner', 'Brightspark Electrical').email);
    const res = await agent.get('/api/board').query(range).expect(403);
    expect(JSON.stringify(res.body)).not.toContain('MV-118');
    await agent.get('/api/board/stream').expect(403);
  });
});

describe('the board data for a crew member', () => {
  it('has only the rows they work as', async () => {
    const agent = await signIn(ctx, account('crew').email);
    const data: BoardData = (await agent.get('/api/board').query(range).expect(200)).body;
    expect(data.resources.map((r) => r.name).sort()).toEqual(['Connor Reid', 'Crew Heron']);
    // Their own bookings only, and no householder's name on the board.
    expect(data.bookings.length).toBeGreaterThan(0);
    expect(data.bookings.every((b) => data.resources.some((r) => r.id === b.resourceId))).toBe(true);
    expect(data.jobs.every((j) => j.customerName === '')).toBe(true);
  });
});

describe('two schedulers on two server processes', () => {
  it("see each other's changes through PostgreSQL LISTEN/NOTIFY", async () => {
    const { createApp } = await import('../../server/app.ts');
    const other = createApp({ config: ctx.config, knex: ctx.knex, now: () => TEST_TODAY.getTime() });
    const serverB = other.app.listen(0, '127.0.0.1');
    try {
      await new Promise((r) => serverB.once('listening', r));
      const port = (serverB.address() as { port: number }).port;
      // The second scheduler's board, served by process B, listens on its stream.
      const owner = await signIn(ctx, account('owner').email);
      const cookie = (
        owner as unknown as { jar: { getCookie: (n: string, o: object) => { toValueString(): string } } }
      ).jar
        .getCookie('waterline.sid', { domain: '127.0.0.1', path: '/', secure: false, script: false })
        .toValueString();
      const controller = new AbortController();
      const res = await fetch(`http://127.0.0.1:${port}/api/board/stream`, {
        headers: { cookie },
        signal: controller.signal,
      });
      expect(res.status).toBe(200);
      expect(res.headers.get('content-type')).toMatch(/text\/event-stream/);
      const reader = res.body!.getReader();
      await reader.read(); // the retry line: the stream is open

      // The first scheduler books through process A.
      const scheduler = await signIn(ctx, account('scheduler').email);
      const stage = await ctx
        .knex('stages')
        .join('jobs', 'jobs.id', 'stages.job_id')
        .where({ 'jobs.reference': 'TW-2419', 'stages.kind': 'handover' })
        .first('stages.id');
      const crew = await ctx.knex('resources').where({ name: 'Crew Otter' }).first('id');
      const saved = await scheduler
        .post('/api/bookings')
        .set('X-CSRF-Token', scheduler.csrf)
        .send({ stageId: String(stage.id), resourceId: String(crew.id), startsAt: '2026-11-02T09:00:00Z' })
        .expect(201);
      // Read until process B passes the change on (how fast is bench:api's business, not a test's).
      let text = '';
      while (!text.includes('event: bookings')) {
        const chunk = await reader.read();
        if (chunk.done) throw new Error(`the stream ended before the change came: ${text}`);
        text += new TextDecoder().decode(chunk.value);
      }
      expect(text).toContain(`"bookingId":"${saved.body.bookings[0].id}"`);
      controller.abort();
    } finally {
      serverB.close();
      await other.close();
    }
  });
});

describe("a partner's proposal on the board", () => {
  it('shows on the booking until the scheduler accepts or refuses it', async () => {
    const partner = await signIn(ctx, account('partner', 'Brightspark Electrical').email);
    const slots = (await partner.get('/api/partner/slots').query({ from: TEST_TODAY.toISOString() }).expect(200)).body
      .items as { id: string; version: number; state: string; startsAt: string; installer: { name: string } }[];
    const asked = slots.find((s) => s.state === 'sent' && s.installer.name === 'Tideway Hot Tubs');
    expect(asked).toBeTruthy();
    const start = Date.parse(asked!.startsAt) + 86_400_000;
    await partner
      .post(`/api/partner/slots/${asked!.id}/answer`)
      .set('X-CSRF-Token', partner.csrf)
      .send({
        version: asked!.version,
        action: 'propose',
        proposedStart: new Date(start).toISOString(),
        proposedEnd: new Date(start + 4 * 3_600_000).toISOString(),
      })
      .expect(200);
    const scheduler = await signIn(ctx, account('scheduler').email);
    const data: BoardData = (await scheduler.get('/api/board').query(range).expect(200)).body;
    expect(data.bookings.find((b) => b.id === asked!.id)?.proposal).toEqual({ start, end: start + 4 * 3_600_000 });
  });
});
