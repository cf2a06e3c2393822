import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type request from 'supertest';
import { account, idOf, signIn, startTestApp, type Agent, type TestContext } from '../helpers/server.ts';
import { fixRequest } from '../../shared/reports/fixes.ts';
import type { ClashReport, UtilisationReport } from '../../shared/reports/types.ts';

/*
 * The reports' problems, fixes and CSV files over a small scenario added to the demo. TEST_TODAY is
 * Mon 1 Jun 2026 08:00 BST (07:00 UTC). Tideway's standard week is Mon–Fri 08:00–17:00.
 *
 * - TW-9101's lift needs a crane (Fellside's "Fix crane", sent) and a crew: Crew A is booked for it
 *   on Wed 3 Jun 08:00–12:00 BST while already booked there for TW-9101's prep (a clash). Tideway
 *   gives the fix crane 5 working days' notice from today: nothing may put it before Mon 8 Jun 08:00.
 * - TW-9102 has a stage needing two crews with one booked (short of resources) and a stage booked
 *   before the stage it waits for (out of order); it has no promised date, so nothing is "late".
 */
// http: a secure session cookie would not come back over supertest's plain connection.
const PUBLIC_URL = 'http://plan.tideway.example';
const JUNE = { from: '2026-05-31T23:00:00Z', to: '2026-07-04T23:00:00Z' };
const WEEK = { from: '2026-05-31T23:00:00Z', to: '2026-06-07T23:00:00Z' }; // Mon 1 Jun 00:00 BST → Mon 8 Jun 00:00 BST
const qs = (r: { from: string; to: string }) => `from=${encodeURIComponent(r.from)}&to=${encodeURIComponent(r.to)}`;
const CRANE_EARLIEST = Date.parse('2026-06-08T07:00:00Z'); // 5 working days after Mon 1 Jun 08:00 BST

let ctx: TestContext;
let manager: Agent;
let owner: Agent;
let viewer: Agent;
let crewA: string;
let liftStage: string;
let liftCrewBooking: string;
let prepBooking: string;

/** The raw bytes of a download (supertest would decode them). */
const bytes = (res: request.Response, done: (err: Error | null, body: Buffer) => void) => {
  const stream = res as unknown as NodeJS.ReadableStream;
  const chunks: Buffer[] = [];
  stream.on('data', (c: Buffer) => chunks.push(c));
  stream.on('end', () => done(null, Buffer.concat(chunks)));
};

beforeAll(async () => {
  ctx = await startTestApp({ PUBLIC_URL });
  manager = await signIn(ctx, account('manager').email);
  owner = await signIn(ctx, account('owner').email);
  viewer = await signIn(ctx, account('viewer').email);
  const tideway = await idOf(ctx.knex, 'firms', { name: 'Tideway Hot Tubs' });
  const fellside = await idOf(ctx.knex, 'firms', { name: 'Fellside Crane Hire' });
  const calendar = await idOf(ctx.knex, 'calendars', { firm_id: tideway, name: 'Standard week' });
  const resource = async (firm: string, name: string, category: string, kind: string) =>
    String(
      (
        await ctx
          .knex('resources')
          .insert({
            firm_id: firm,
            name,
            category,
            kind,
            ownership: 'owned',
            calendar_id: firm === tideway ? calendar : await idOf(ctx.knex, 'calendars', { firm_id: firm }),
          })
          .returning('id')
      )[0].id,
    );
  const crane = await resource(fellside, 'Fix crane', 'machine', 'fix_crane');
  crewA = await resource(tideway, 'Fix crew A', 'crew', 'fix_crew');
  await resource(tideway, 'Fix crew B', 'crew', 'fix_crew');
  await ctx
    .knex('lead_time_rules')
    .insert({ firm_id: tideway, resource_kind: 'fix_crane', working_days: 5, counted_from: 'now' });

  const job = async (reference: string) =>
    String(
      (
        await ctx
          .knex('jobs')
          .insert({
            firm_id: tideway,
            reference,
            customer_name: 'Test Householder',
            site_address: '1 Test Row',
            site_town: 'Testbury',
            site_postcode: 'LS1 1AA',
            installation_type: 'slab',
            status: 'planned',
          })
          .returning('id')
      )[0].id,
    );
  const stage = async (jobId: string, name: string, sequence: number, needs: { kind: string; count: number }[]) =>
    String(
      (
        await ctx
          .knex('stages')
          .insert({
            job_id: jobId,
            kind: 'test_work',
            name,
            sequence,
            duration_minutes: 240,
            requirements: JSON.stringify(needs),
          })
          .returning('id')
      )[0].id,
    );
  const book = async (stageId: string, resourceId: string, startsAt: string, endsAt: string, state: string) =>
    String(
      (
        await ctx
          .knex('bookings')
          .insert({ stage_id: stageId, resource_id: resourceId, starts_at: startsAt, ends_at: endsAt, state })
          .returning('id')
      )[0].id,
    );

  const j1 = await job('TW-9101');
  const prep = await stage(j1, 'Prep (fix test)', 1, [{ kind: 'fix_crew', count: 1 }]);
  liftStage = await stage(j1, 'Lift (fix test)', 2, [
    { kind: 'fix_crane', count: 1 },
    { kind: 'fix_crew', count: 1 },
  ]);
  // The prep is booked first, so the lift's crew booking is the later-booked side: the one to move.
  prepBooking = await book(prep, crewA, '2026-06-03T07:00:00Z', '2026-06-03T11:00:00Z', 'pencilled');
  await book(liftStage, crane, '2026-06-03T07:00:00Z', '2026-06-03T11:00:00Z', 'sent');
  liftCrewBooking = await book(liftStage, crewA, '2026-06-03T07:00:00Z', '2026-06-03T11:00:00Z', 'pencilled');

  const j2 = await job('TW-9102');
  const base = await stage(j2, 'Base (risk test)', 1, [{ kind: 'fix_crew', count: 1 }]);
  const set = await stage(j2, 'Set (risk test)', 2, [{ kind: 'fix_crew', count: 1 }]);
  const heavy = await stage(j2, 'Heavy lift (risk test)', 3, [{ kind: 'fix_crew', count: 2 }]);
  await ctx
    .knex('dependencies')
    .insert({ from_stage_id: base, to_stage_id: set, type: 'FS', lag_amount: 0, lag_unit: 'working_hours' });
  // "Set" on Tue 16 Jun, before the base it waits for on Wed 17 Jun; the heavy lift with one crew of two.
  await book(set, crewA, '2026-06-16T07:00:00Z', '2026-06-16T11:00:00Z', 'pencilled');
  await book(base, crewA, '2026-06-17T07:00:00Z', '2026-06-17T11:00:00Z', 'pencilled');
  await book(heavy, crewA, '2026-06-18T07:00:00Z', '2026-06-18T11:00:00Z', 'pencilled');
});
afterAll(async () => {
  await ctx.close();
});

const liftClash = async () => {
  const report: ClashReport = (await manager.get(`/api/reports/clashes?${qs(JUNE)}`).expect(200)).body;
  return report.rows.find((r) => r.kind === 'clash' && r.stageId === liftStage);
};

describe('jobs at risk', () => {
  it('lists a job with a stage short of a resource and stages out of order as unable to go ahead, not on time', async () => {
    const report: UtilisationReport = (await manager.get(`/api/reports/utilisation?${qs(JUNE)}`).expect(200)).body;
    const row = report.risks.find((r) => r.reference === 'TW-9102');
    expect(row).toBeDefined();
    expect(row!.lateByMs).toBe(0); // no promised date: the critical path has nothing to be late for
    expect(row!.reasons.map((r) => r.reason).sort()).toEqual(['order', 'short_resourced']);
    expect(row!.reasons.find((r) => r.reason === 'short_resourced')!.label).toContain('Heavy lift (risk test)');
    expect(row!.reasons.find((r) => r.reason === 'order')!.label).toContain('Set (risk test)');
    expect(row).toMatchObject({ status: 'blocked', statusLabel: "Can't go ahead as booked" });
  });

  it('says so in the jobs-at-risk CSV', async () => {
    const res = await manager.get(`/api/reports/risks.csv?${qs(JUNE)}`).expect(200);
    const line = res.text.split('\r\n').find((l) => l.startsWith('TW-9102,'))!;
    expect(line).toContain(",Can't go ahead as booked,");
  });
});

describe('"Show on the board" for a clash', () => {
  it("opens the resource's row on the day with both bookings outlined, not one job filtered", async () => {
    const row = (await liftClash())!;
    const link = new URL(row.link, PUBLIC_URL);
    expect(link.pathname).toBe('/board');
    expect(Object.fromEntries(link.searchParams)).toEqual({
      view: 'day',
      date: '2026-06-03',
      q: 'Fix crew A',
      highlight: [prepBooking, liftCrewBooking].sort().join(','),
    });
  });
});

describe('CSV files', () => {
  it('start with the UTF-8 byte order mark, so "£" opens right in a spreadsheet', async () => {
    const res = await manager
      .get(`/api/reports/clashes.csv?${qs(JUNE)}`)
      .buffer(true)
      .parse(bytes)
      .expect(200);
    const body = res.body as Buffer;
    expect([...body.subarray(0, 3)]).toEqual([0xef, 0xbb, 0xbf]);
    // "Cost as booked (£)": the pound sign as UTF-8 (C2 A3).
    expect(body.indexOf(Buffer.from([0xc2, 0xa3]))).toBeGreaterThan(0);
  });

  it('carry board links made absolute from PUBLIC_URL', async () => {
    for (const name of ['clashes', 'hire', 'risks', 'utilisation-summary']) {
      const res = await manager.get(`/api/reports/${name}.csv?${qs(JUNE)}`).expect(200);
      const links = res.text.match(/[^,\s"]*\/board\?[^,\r\n"]*/g) ?? [];
      expect(links.length, name).toBeGreaterThan(0);
      for (const l of links) expect(l.startsWith(`${PUBLIC_URL}/board?`), `${name}: ${l}`).toBe(true);
    }
  });

  it('keep weekly rows and the totals in separate files, each one table', async () => {
    const weekly = (await manager.get(`/api/reports/utilisation.csv?${qs(WEEK)}`).expect(200)).text
      .replace(/^\uFEFF/, '')
      .split('\r\n');
    expect(weekly[0]).toBe('Resource,Firm,Group,Week from,Available hours,Booked hours,Booked %');
    // Every data row is one resource in one week: no "All" rows to be summed twice.
    expect(
      weekly
        .slice(1)
        .filter(Boolean)
        .every((l) => /,\d{4}-\d{2}-\d{2},/.test(l)),
    ).toBe(true);
    // Fix crew A: Mon–Fri 08:00–17:00 = 45 h; booked Wed 3 Jun 08:00–12:00 (two bookings at once count once) = 4 h = 8.9 %.
    expect(weekly).toContain('Fix crew A,Tideway Hot Tubs,crew,2026-06-01,45.00,4.00,8.9');
    const summary = (await manager.get(`/api/reports/utilisation-summary.csv?${qs(WEEK)}`).expect(200)).text
      .replace(/^\uFEFF/, '')
      .split('\r\n');
    expect(summary[0]).toBe(
      'Resource,Firm,Group,Available hours,Booked hours,Booked %,Busy elsewhere hours,Board link',
    );
    expect(summary.filter((l) => l.startsWith('Fix crew A,'))).toEqual([
      `Fix crew A,Tideway Hot Tubs,crew,45.00,4.00,8.9,0.00,${PUBLIC_URL}/board?view=day&date=2026-06-01&q=Fix+crew+A`,
    ]);
  });
});

describe('suggested fixes', () => {
  it('never move a booking inside its notice period, whatever its state', async () => {
    const row = (await liftClash())!;
    const cranes = row.fixes.map((fix) => fix.moves.find((m) => m.resourceName === 'Fix crane')!);
    // Crew B is free at the booked time: the crane stays put. Every other fix moves the crane with
    // its stage, and Fellside needs 5 working days' notice of a new time (Mon 1 Jun would have been free).
    expect(cranes[0]).toMatchObject({ start: Date.parse('2026-06-03T07:00:00Z'), asksPartnerAgain: false });
    expect(cranes.length).toBe(3);
    for (const crane of cranes.slice(1)) {
      expect(crane.start).toBeGreaterThanOrEqual(CRANE_EARLIEST);
      expect(crane.asksPartnerAgain).toBe(true);
    }
  });

  it("preview exactly what applying them through the board's stage move saves", async () => {
    // A fix that moves the stage in time (the crane with it), not only the crew to another row.
    const fix = (await liftClash())!.fixes.find((f) => f.moves.every((m) => m.start !== m.fromStart))!;
    expect(fix.moves.map((m) => m.start)).toEqual([fix.start, fix.start]);
    // A viewer may not change bookings: the write path refuses them. The manager applies the fix.
    const { path, body } = fixRequest(fix);
    await viewer.post(path).set('X-CSRF-Token', viewer.csrf).send(body).expect(403);
    const applied = await manager.post(path).set('X-CSRF-Token', manager.csrf).send(body);
    expect(applied.status, JSON.stringify(applied.body)).toBe(200);
    const saved = await ctx
      .knex('bookings')
      .where('stage_id', liftStage)
      .orderBy('id')
      .select('id', 'resource_id', 'starts_at', 'ends_at', 'state');
    expect(
      saved.map((b) => ({
        bookingId: String(b.id),
        resourceId: String(b.resourceId),
        start: b.startsAt.getTime(),
        end: b.endsAt.getTime(),
      })),
    ).toEqual(fix.moves.map((m) => ({ bookingId: m.bookingId, resourceId: m.resourceId, start: m.start, end: m.end })));
    // The partner's crane is asked again for its new time.
    expect(saved.map((b) => b.state)).toEqual(['sent', 'pencilled']);
    expect(await liftClash()).toBeUndefined();
    // The same fix again was worked out from versions that are gone: refused, nothing changes.
    const stale = await owner.post(path).set('X-CSRF-Token', owner.csrf).send(body).expect(409);
    expect(stale.body.code).toBe('stale-version');
  });
});
