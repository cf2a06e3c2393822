import { afterAll, beforeAll, describe, expect, it, onTestFinished } from 'vitest';
import type { AddressInfo } from 'node:net';
import {
  account,
  idOf,
  openBoardStream,
  signIn,
  startTestApp,
  sentWhileResourcesHeld,
  untilWaitingOnLocks,
  type Agent,
  type TestContext,
} from '../helpers/server.ts';
import type { ClashReport, HireReport, UtilisationReport } from '../../shared/reports/types.ts';
import { lockResources } from '../../server/services/booking-writes.ts';

/*
 * A small known week added to the demo (TEST_TODAY is Mon 1 Jun 2026; June is BST, UTC+1):
 * the week Mon 22 – Fri 26 Jun 2026 has no bank holiday in England. Tideway's standard week is
 * Mon–Fri 08:00–17:00 (9 h a day, 45 h a week).
 */
let ctx: TestContext;
let manager: Agent;
let tidewayId: string;
let moorviewId: string;
let jobId: string;
let digger: string;
let wren: string;
let finch: string;
let priya: string;
let hireId: string;

const WEEK = { from: '2026-06-21T23:00:00Z', to: '2026-06-28T23:00:00Z' }; // Mon 22 Jun 00:00 BST → Mon 29 Jun 00:00 BST
const JUNE = { from: '2026-05-31T23:00:00Z', to: '2026-07-04T23:00:00Z' };
const qs = (r: { from: string; to: string }) => `from=${encodeURIComponent(r.from)}&to=${encodeURIComponent(r.to)}`;

/**
 * Records a hire of the digger from Ridgeway Plant Hire at £145.00 a day, as requested (more of the
 * body as given), through the API; its id.
 */
async function recordDiggerHire(onHireAt: string, offHireAt: string, more: Record<string, unknown> = {}) {
  const ridgeway = await idOf(ctx.knex, 'firms', { name: 'Ridgeway Plant Hire' });
  const res = await manager
    .post('/api/hire-periods')
    .set('X-CSRF-Token', manager.csrf)
    .send({ supplierFirmId: ridgeway, resourceId: digger, onHireAt, offHireAt, dayRatePence: 14500, ...more })
    .expect(201);
  return String(res.body.id);
}

async function addStage(name: string, sequence: number, kinds: string[]): Promise<string> {
  const [row] = await ctx
    .knex('stages')
    .insert({
      job_id: jobId,
      kind: 'groundworks',
      name,
      sequence,
      duration_minutes: 540,
      requirements: JSON.stringify(kinds.map((kind) => ({ kind, count: 1 }))),
    })
    .returning('id');
  return String(row.id);
}
async function book(
  stageId: string,
  resourceId: string,
  startsAt: string,
  endsAt: string,
  state = 'confirmed',
): Promise<void> {
  await ctx
    .knex('bookings')
    .insert({ stage_id: stageId, resource_id: resourceId, starts_at: startsAt, ends_at: endsAt, state });
}

beforeAll(async () => {
  ctx = await startTestApp();
  manager = await signIn(ctx, account('manager').email);
  tidewayId = await idOf(ctx.knex, 'firms', { name: 'Tideway Hot Tubs' });
  moorviewId = await idOf(ctx.knex, 'firms', { name: 'Moorview Spas' });
  const calendar = await idOf(ctx.knex, 'calendars', { firm_id: tidewayId, name: 'Standard week' });
  const resource = async (name: string, category: string, kind: string, ownership = 'owned') =>
    String(
      (
        await ctx
          .knex('resources')
          .insert({ firm_id: tidewayId, name, category, kind, ownership, calendar_id: calendar })
          .returning('id')
      )[0].id,
    );
  digger = await resource('Test mini digger (hired)', 'machine', 'mini_excavator', 'hired');
  wren = await resource('Crew Wren', 'crew', 'test_crew');
  finch = await resource('Crew Finch', 'crew', 'test_crew');
  priya = await idOf(ctx.knex, 'resources', { name: 'Priya Nair' });
  const [job] = await ctx
    .knex('jobs')
    .insert({
      firm_id: tidewayId,
      reference: 'TW-9001',
      customer_name: 'Iris Test',
      site_address: '1 Sample Row',
      site_town: 'Testbury',
      site_postcode: 'LS1 1AA',
      installation_type: 'in_ground',
      status: 'planned',
      promised_from: '2026-07-20',
      promised_to: '2026-07-24',
    })
    .returning('id');
  jobId = String(job.id);

  // Tue 23 and Wed 24 Jun, 08:00–17:00 BST: the hired digger and Crew Wren, both days.
  const dig1 = await addStage('Dig (day 1)', 1, ['mini_excavator', 'test_crew']);
  const dig2 = await addStage('Dig (day 2)', 2, ['mini_excavator', 'test_crew']);
  for (const [stage, day] of [
    [dig1, '23'],
    [dig2, '24'],
  ] as const) {
    await book(stage, digger, `2026-06-${day}T07:00:00Z`, `2026-06-${day}T16:00:00Z`);
    await book(stage, wren, `2026-06-${day}T07:00:00Z`, `2026-06-${day}T16:00:00Z`);
  }
  // Crew Finch twice on Thu 25 Jun: 08:00–12:00 and 10:00–14:00 BST (pencilled; the database refuses confirmed overlaps).
  await book(
    await addStage('Walls', 3, ['test_crew']),
    finch,
    '2026-06-25T07:00:00Z',
    '2026-06-25T11:00:00Z',
    'pencilled',
  );
  await book(
    await addStage('Backfill', 4, ['test_crew']),
    finch,
    '2026-06-25T09:00:00Z',
    '2026-06-25T13:00:00Z',
    'pencilled',
  );
  // The digger on Mon 29 Jun, after its off-hire: one working day outside the hire.
  await book(
    await addStage('Level the pit', 5, ['mini_excavator']),
    digger,
    '2026-06-29T07:00:00Z',
    '2026-06-29T16:00:00Z',
    'pencilled',
  );
  // Priya Nair (Brightspark) on Mon 8 Jun 09:00–13:00 BST, the time Moorview has asked her for MV-118.
  await book(
    await addStage('Connect (test)', 6, ['electrician']),
    priya,
    '2026-06-08T08:00:00Z',
    '2026-06-08T12:00:00Z',
    'pencilled',
  );
});
afterAll(async () => {
  await ctx.close();
});

describe('recording and approving a hire period', () => {
  it('refuses a missing day rate and an off-hire before the on-hire, naming the field (400 problem+json)', async () => {
    const base = { supplierFirmId: await idOf(ctx.knex, 'firms', { name: 'Ridgeway Plant Hire' }), resourceId: digger };
    const noRate = await manager
      .post('/api/hire-periods')
      .set('X-CSRF-Token', manager.csrf)
      .send({ ...base, onHireAt: '2026-06-22T06:00:00Z', offHireAt: '2026-06-26T17:00:00Z' });
    expect(noRate.status).toBe(400);
    expect(noRate.headers['content-type']).toContain('application/problem+json');
    expect(noRate.body.errors.map((e: { field: string }) => e.field)).toEqual(['dayRatePence']);
    const backwards = await manager
      .post('/api/hire-periods')
      .set('X-CSRF-Token', manager.csrf)
      .send({ ...base, onHireAt: '2026-06-26T17:00:00Z', offHireAt: '2026-06-22T06:00:00Z', dayRatePence: 14500 });
    expect(backwards.status).toBe(400);
    expect(backwards.body.errors).toEqual([{ field: 'offHireAt', message: 'must be after the on-hire' }]);
  });

  it('records the digger on hire Mon 22 – Fri 26 Jun at £145.00 a day, approved and audited', async () => {
    const res = await manager
      .post('/api/hire-periods')
      .set('X-CSRF-Token', manager.csrf)
      .send({
        supplierFirmId: await idOf(ctx.knex, 'firms', { name: 'Ridgeway Plant Hire' }),
        resourceId: digger,
        onHireAt: '2026-06-22T06:00:00Z',
        offHireAt: '2026-06-26T17:00:00Z', // 07:00 Mon to 18:00 Fri BST
        dayRatePence: 14500,
        deliveryPence: 6000,
        collectionPence: 6000,
        approve: true,
      })
      .expect(201);
    expect(res.body).toMatchObject({ status: 'approved', version: 1, dayRatePence: 14500, hirerFirmId: tidewayId });
    hireId = res.body.id;
    const audit = await ctx
      .knex('audit_log')
      .where({ entity: 'hire_period', entity_id: hireId, action: 'create' })
      .first();
    expect(audit).toBeTruthy();
  });

  it('changes the hire only from the version it was loaded at (409 otherwise) and audits the change', async () => {
    await manager
      .patch(`/api/hire-periods/${hireId}`)
      .set('X-CSRF-Token', manager.csrf)
      .send({ version: 7, dayRatePence: 15000 })
      .expect(409);
    const bad = await manager
      .patch(`/api/hire-periods/${hireId}`)
      .set('X-CSRF-Token', manager.csrf)
      .send({ version: 1, offHireAt: '2026-06-20T17:00:00Z' });
    expect(bad.status).toBe(400);
    expect(bad.body.errors).toEqual([{ field: 'offHireAt', message: 'must be after the on-hire' }]);
    // A misspelt field, or none at all, is refused rather than saved as a change of nothing.
    const misspelt = await manager
      .patch(`/api/hire-periods/${hireId}`)
      .set('X-CSRF-Token', manager.csrf)
      .send({ version: 1, dayRatePounds: 150 })
      .expect(400);
    expect(misspelt.body.errors).toEqual([{ field: 'dayRatePounds', message: 'is not a field this request takes' }]);
    const nothing = await manager
      .patch(`/api/hire-periods/${hireId}`)
      .set('X-CSRF-Token', manager.csrf)
      .send({ version: 1 })
      .expect(400);
    expect(nothing.body.errors).toEqual([
      { field: '(body)', message: 'names nothing to change: send at least one field with the version' },
    ]);
    const ok = await manager
      .patch(`/api/hire-periods/${hireId}`)
      .set('X-CSRF-Token', manager.csrf)
      .send({ version: 1, status: 'approved' })
      .expect(200);
    expect(ok.body.hire.version).toBe(2);
    // A version sent as text is told so, not that it is missing.
    const text = await manager
      .patch(`/api/hire-periods/${hireId}`)
      .set('X-CSRF-Token', manager.csrf)
      .send({ version: '2', dayRatePence: 15000 })
      .expect(400);
    expect(text.body.errors).toEqual([{ field: 'version', message: 'must be a number' }]);
    expect(
      await ctx
        .knex('audit_log')
        .where({ entity: 'hire_period', entity_id: hireId, action: 'update' })
        .count('* as n')
        .first(),
    ).toEqual({ n: '1' });
  });

  it("reloads open boards, and waits for a booking of the machine under way (the write path's lock)", async () => {
    const server = ctx.waterline.app.listen(0, '127.0.0.1');
    await new Promise((r) => server.once('listening', r));
    const board = await openBoardStream(manager, (server.address() as AddressInfo).port);
    try {
      const { waited, response } = await sentWhileResourcesHeld(ctx.knex, [digger], () =>
        manager
          .patch(`/api/hire-periods/${hireId}`)
          .set('X-CSRF-Token', manager.csrf)
          .send({ version: 2, dayRatePence: 14500 }),
      );
      expect(waited).toBe(true);
      expect(response.status).toBe(200);
      // The board reloads (an event naming no booking).
      expect(await board.until((t) => t.includes('data: {"bookingId":""}'))).toContain(
        'event: bookings\ndata: {"bookingId":""}\n\n',
      );
    } finally {
      board.close();
      await new Promise((r) => server.close(r));
    }
  });

  it('is for managers and owners only', async () => {
    const scheduler = await signIn(ctx, account('scheduler').email);
    await scheduler.post('/api/hire-periods').set('X-CSRF-Token', scheduler.csrf).send({}).expect(403);
    await scheduler
      .patch(`/api/hire-periods/${hireId}`)
      .set('X-CSRF-Token', scheduler.csrf)
      .send({ version: 3 })
      .expect(403);
  });
});

describe('the hire report', () => {
  it('counts 3 idle paid days = £435.00 when the digger is booked Tue and Wed of a Mon–Fri hire', async () => {
    const report: HireReport = (await manager.get(`/api/reports/hire?${qs(WEEK)}`).expect(200)).body;
    const p = report.periods.find((x) => x.id === hireId)!;
    // Paid: Mon 22 – Fri 26 = 5 working days. Booked: Tue 23, Wed 24 = 2. Idle: 5 − 2 = 3 days.
    expect(p.paidDays).toBe(5);
    expect(p.bookedDays).toBe(2);
    expect(p.idleDays).toEqual(['2026-06-22', '2026-06-25', '2026-06-26']);
    expect(p.idleCostPence).toBe(3 * 14500); // £435.00
    expect(p.totalCostPence).toBe(5 * 14500 + 6000 + 6000); // £725.00 + £60.00 + £60.00 = £845.00
    expect(p.bookingsOutsideHire).toBe(1); // Mon 29 Jun
    expect(p.suggestions.map((s) => [s.kind, s.savesPence])).toEqual([
      ['shorten_start', 14500],
      ['shorten_end', 2 * 14500],
    ]);
    expect(p.suggestions[1]!.label).toBe('Off-hire 2 days earlier (last paid day Wed 24 Jun): saves £290.00');
    // The board at the hire's week, on the digger's row, with the hire drawn (a single idle day showed an empty day).
    expect(p.link).toBe(`/board?view=week&date=2026-06-22&q=Test+mini+digger+%28hired%29&hire=${hireId}`);
    // Idle cost per week: all three idle days fall in the week of Mon 22 Jun.
    expect(report.idlePerWeek).toEqual([{ week: '2026-06-22', idleDays: 3, costPence: 43500 }]);
  });

  it("gives the same idle figures as the board's own idle-hire warning", async () => {
    const board = (await manager.get(`/api/board?${qs(WEEK)}`).expect(200)).body;
    const { analyseBoard } = await import('../../shared/scheduler/index.ts');
    const { toEngineBoard } = await import('../../shared/board-data.ts');
    const warning = analyseBoard(toEngineBoard(board), { now: board.now, skipCriticalPath: true }).violations.find(
      (v) => v.kind === 'idle_hire' && v.details?.hirePeriodId === hireId,
    );
    expect(warning?.details).toMatchObject({ costPence: 43500, paidDays: 5 });
  });

  it('exports to CSV with the same figures', async () => {
    const res = await manager.get(`/api/reports/hire.csv?${qs(WEEK)}`).expect(200);
    expect(res.headers['content-type']).toBe('text/csv; charset=utf-8');
    expect(res.headers['content-disposition']).toBe(
      'attachment; filename="waterline-hire-2026-06-21-to-2026-06-28.csv"',
    );
    const line = res.text.split('\r\n').find((l) => l.startsWith('Test mini digger (hired),'))!;
    expect(line).toContain(
      ',2026-06-22,2026-06-26,145.00,5,2,3,2026-06-22; 2026-06-25; 2026-06-26,435.00,60.00,60.00,845.00,1,',
    );
  });
  it('names the other hire of a merge suggestion by its day, as the other suggestions do', async () => {
    const hire = (onHireAt: string, offHireAt: string, deliveryPence: number) =>
      recordDiggerHire(onHireAt, offHireAt, { deliveryPence, collectionPence: 6000, approve: true });
    // Thu 25 – Fri 26 Jun again: two paid days on both hires. Then Tue 30 Jun after a one-working-day
    // gap (Mon 29), delivered for £100.00: collecting and delivering again costs more than the day.
    // Overlapping the hire from Mon 22 Jun: asked about first, naming it, then recorded as well.
    const ridgeway = await idOf(ctx.knex, 'firms', { name: 'Ridgeway Plant Hire' });
    const asked = await manager
      .post('/api/hire-periods')
      .set('X-CSRF-Token', manager.csrf)
      .send({
        supplierFirmId: ridgeway,
        resourceId: digger,
        onHireAt: '2026-06-25T06:00:00Z',
        offHireAt: '2026-06-26T17:00:00Z',
        dayRatePence: 14500,
      })
      .expect(409);
    expect(asked.body).toMatchObject({
      code: 'hire-overlap',
      detail:
        'Test mini digger (hired) is already on hire Mon 22 Jun – Fri 26 Jun from Ridgeway Plant Hire: both hires would be paid for over the days they share.',
      overlapping: { id: hireId, supplierName: 'Ridgeway Plant Hire' },
    });
    const overlapping = await recordDiggerHire('2026-06-25T06:00:00Z', '2026-06-26T17:00:00Z', {
      deliveryPence: 6000,
      collectionPence: 6000,
      approve: true,
      alsoOverlapping: true,
    });
    // A change of its price alone is not asked about again: its days were answered for.
    await manager
      .patch(`/api/hire-periods/${overlapping}`)
      .set('X-CSRF-Token', manager.csrf)
      .send({ version: 1, dayRatePence: 14500 })
      .expect(200);
    // The answer alone is no change.
    expect(
      (
        await manager
          .patch(`/api/hire-periods/${overlapping}`)
          .set('X-CSRF-Token', manager.csrf)
          .send({ version: 2, alsoOverlapping: true })
          .expect(400)
      ).body.errors,
    ).toEqual([{ field: '(body)', message: 'names nothing to change: send at least one field with the version' }]);
    const later = await hire('2026-06-30T06:00:00Z', '2026-06-30T17:00:00Z', 10000);
    // Wed 1 Jul, the next day after that one: no working day between.
    const next = await hire('2026-07-01T06:00:00Z', '2026-07-01T17:00:00Z', 10000);
    onTestFinished(async () => {
      await ctx.knex('hire_periods').whereIn('id', [overlapping, later, next]).del();
    });
    const report: HireReport = (await manager.get(`/api/reports/hire?${qs(JUNE)}`).expect(200)).body;
    const labels = (id: string) => report.periods.find((x) => x.id === id)!.suggestions.map((s) => s.label);
    // 2 shared days × £145.00 + £60.00 collection + £60.00 delivery = £410.00
    expect(labels(overlapping)).toContain('Overlaps the hire from Mon 22 Jun on 2 days: merge them: saves £410.00');
    // £60.00 collection + £100.00 delivery − 1 day × £145.00 = £15.00
    expect(labels(later)).toContain(
      'Keep it on hire through the 1 working day since the hire ending Fri 26 Jun instead of collecting and delivering again: saves £15.00',
    );
    // £60.00 collection + £100.00 delivery − 0 days = £160.00
    expect(labels(next)).toEqual([
      // Nothing is booked on it: 1 × £145.00 + £100.00 delivery + £60.00 collection = £305.00
      'Nothing is booked on this hire: cancel it: saves £305.00',
      'Keep it on hire from the hire ending Tue 30 Jun, with no working day between, instead of collecting and delivering again: saves £160.00',
    ]);
  });
});

describe('the utilisation report', () => {
  it('puts a crew with 45 working hours in the week booked for 18 at 40 %', async () => {
    const report: UtilisationReport = (await manager.get(`/api/reports/utilisation?${qs(WEEK)}`).expect(200)).body;
    const row = report.resources.find((r) => r.resourceName === 'Crew Wren')!;
    // Available: Mon–Fri 08:00–17:00 = 5 × 9 h = 45 h = 2700 min. Booked: Tue + Wed 9 h = 18 h = 1080 min.
    expect(row.availableMinutes).toBe(2700);
    expect(row.bookedMinutes).toBe(1080);
    expect(row.ratio).toBe(0.4); // 18 / 45
    expect(row.weeks).toEqual([{ week: '2026-06-22', availableMinutes: 2700, bookedMinutes: 1080, ratio: 0.4 }]);
    expect(report.weeks).toEqual(['2026-06-22']);
  });

  it('counts two overlapping bookings of one crew once', async () => {
    const report: UtilisationReport = (await manager.get(`/api/reports/utilisation?${qs(WEEK)}`).expect(200)).body;
    const row = report.resources.find((r) => r.resourceName === 'Crew Finch')!;
    // 08:00–12:00 and 10:00–14:00 together cover 08:00–14:00 = 6 h = 360 min of 2700: 13.33 %.
    expect(row.bookedMinutes).toBe(360);
    expect(row.ratio).toBe(0.1333);
  });

  it('exports per resource and week to CSV', async () => {
    const res = await manager.get(`/api/reports/utilisation.csv?${qs(WEEK)}`).expect(200);
    expect(res.text.split('\r\n')).toContain('Crew Wren,Tideway Hot Tubs,crew,2026-06-22,45.00,18.00,40.0');
  });
});

describe('the clash report', () => {
  it('lists the double-booked crew, the digger outside its hire and the shared electrician, soonest first', async () => {
    const report: ClashReport = (await manager.get(`/api/reports/clashes?${qs(JUNE)}`).expect(200)).body;
    const mine = report.rows.filter((r) => r.jobReferences.includes('TW-9001'));
    expect(mine.map((r) => [r.date, r.kind])).toEqual([
      ['2026-06-08', 'cross_firm'],
      ['2026-06-25', 'clash'],
      ['2026-06-29', 'hire'],
    ]);
    const dates = report.rows.map((r) => r.date);
    expect(dates).toEqual([...dates].sort());

    const clash = mine.find((r) => r.kind === 'clash')!;
    // The overlap: 10:00–12:00 BST on Thu 25 Jun = 09:00–11:00 UTC.
    expect([clash.from, clash.to]).toEqual([Date.parse('2026-06-25T09:00:00Z'), Date.parse('2026-06-25T11:00:00Z')]);
    expect(clash.stageName).toBe('Backfill'); // the later-booked of the two moves
    // Both sides: Crew Finch's row, no job filter, both bookings outlined.
    const finchBookings = (await ctx.knex('bookings').where('resource_id', finch).orderBy('id').select('id')).map((b) =>
      String(b.id),
    );
    expect(clash.link).toBe(`/board?view=day&date=2026-06-25&q=Crew+Finch&highlight=${finchBookings.join('%2C')}`);
    expect(clash.message).toContain('Crew Finch');
    expect(clash.fixes.length).toBeGreaterThan(0);
    for (const f of clash.fixes) {
      // The crews of kind test_crew are Tideway's own: no hire, so a fix costs nothing extra.
      expect(f.extraHirePence).toBe(0);
      expect(f.start).toBeGreaterThanOrEqual(Date.parse('2026-06-01T07:00:00Z')); // never before now
      const overlapsOther =
        f.resourceId === finch &&
        f.start < Date.parse('2026-06-25T11:00:00Z') &&
        f.end > Date.parse('2026-06-25T07:00:00Z');
      expect(overlapsOther).toBe(false);
    }

    const hire = mine.find((r) => r.kind === 'hire')!;
    expect(hire.costPence).toBe(14500); // 1 working day (Mon 29 Jun) outside the hire × £145.00
    // What would cover it: the hire (Mon 22 – Fri 26 Jun) running to Mon 29 Jun.
    expect(hire.cover).toEqual({ hireId, offHireDate: '2026-06-29' });
  });

  it("gives the hire's days that cover a booking outside it, which the hire then does", async () => {
    const version = async () => Number((await ctx.knex('hire_periods').where({ id: hireId }).first('version')).version);
    const change = async (body: Record<string, unknown>) =>
      manager
        .patch(`/api/hire-periods/${hireId}`)
        .set('X-CSRF-Token', manager.csrf)
        .send({ version: await version(), ...body })
        .expect(200);
    const hireRows = async () =>
      ((await manager.get(`/api/reports/clashes?${qs(JUNE)}`).expect(200)).body as ClashReport).rows.filter(
        (r) => r.kind === 'hire' && r.jobReferences.includes('TW-9001'),
      );
    try {
      // On hire from Wed 24 Jun: the Tue 23 dig is before it; the Mon 29 one still after it.
      await change({ onHireAt: '2026-06-23T23:00:00Z' });
      expect((await hireRows()).map((r) => [r.date, r.cover])).toEqual([
        ['2026-06-23', { hireId, onHireDate: '2026-06-23' }],
        ['2026-06-29', { hireId, offHireDate: '2026-06-29' }],
      ]);
      // The days given, as the hire form records them (00:00 of the first, 23:59 of the last, BST).
      await change({ onHireAt: '2026-06-22T23:00:00Z', offHireAt: '2026-06-29T22:59:00Z' });
      expect(await hireRows()).toEqual([]);
    } finally {
      await change({ onHireAt: '2026-06-22T06:00:00Z', offHireAt: '2026-06-26T17:00:00Z' });
    }
  });

  it('tells Tideway only that Priya Nair is busy elsewhere, never whose job it is', async () => {
    const report: ClashReport = (await manager.get(`/api/reports/clashes?${qs(JUNE)}`).expect(200)).body;
    const cross = report.rows.find((r) => r.kind === 'cross_firm' && r.jobReferences.includes('TW-9001'))!;
    expect(cross.message).toBe('Priya Nair is busy elsewhere from Mon 8 Jun 09:00 to Mon 8 Jun 13:00');
    expect(cross.jobIds).toEqual([jobId]);
  });

  it('exports to CSV, quoting fields with commas, quotes and newlines', async () => {
    const res = await manager.get(`/api/reports/clashes.csv?${qs(JUNE)}`).expect(200);
    expect(res.headers['content-disposition']).toBe(
      'attachment; filename="waterline-clashes-2026-05-31-to-2026-07-04.csv"',
    );
    expect(
      res.text.startsWith(
        '\uFEFFDate,Problem,Resources,Jobs,Stage to move,What the check says,Cost as booked (£),Suggested fixes,Board link\r\n',
      ),
    ).toBe(true);
    expect(res.text).toContain(
      '2026-06-29,Machine used outside its hire,Test mini digger (hired),TW-9001,Level the pit,',
    );
  });
});

describe('privacy between installer firms', () => {
  let moorview: Agent;
  beforeAll(async () => {
    const [user] = await ctx
      .knex('users')
      .insert({ email: 'nell.moor@moorview.example', name: 'Nell Moor' })
      .returning('id');
    await ctx.knex('memberships').insert({ user_id: user.id, firm_id: moorviewId, role: 'manager' });
    moorview = await signIn(ctx, 'nell.moor@moorview.example');
    // Tideway sends its request to Priya: only then is she busy for Moorview (a pencilled booking blocks nobody else).
    await ctx
      .knex('bookings')
      .where({ resource_id: priya, starts_at: new Date('2026-06-08T08:00:00Z') })
      .whereIn('stage_id', ctx.knex('stages').select('id').where('name', 'Connect (test)'))
      .update({ state: 'sent' });
  });

  const paths = ['clashes', 'clashes.csv', 'hire', 'hire.csv', 'utilisation', 'utilisation.csv', 'risks.csv'];
  const everything = async (agent: Agent) =>
    (
      await Promise.all(
        paths.map(async (p) => {
          const res = await agent.get(`/api/reports/${p}?${qs(JUNE)}`).expect(200);
          return p.endsWith('.csv') ? res.text : JSON.stringify(res.body);
        }),
      )
    ).join('\n');
  const jobWords = async (firmId: string) =>
    (
      await ctx.knex('jobs').where('firm_id', firmId).select('reference', 'customer_name', 'site_address', 'site_town')
    ).flatMap((j) => [j.reference, j.customerName, j.siteAddress, j.siteTown] as string[]);

  it("shows neither installer the other's job reference, customer or site in any report or CSV", async () => {
    const tidewayWords = await jobWords(tidewayId),
      moorviewWords = await jobWords(moorviewId);
    const tidewaySees = await everything(manager),
      moorviewSees = await everything(moorview);
    // Harrogate is a town both firms work in: a shared town is no leak.
    for (const w of moorviewWords.filter((x) => !tidewayWords.includes(x))) expect(tidewaySees).not.toContain(w);
    for (const w of tidewayWords.filter((x) => !moorviewWords.includes(x))) expect(moorviewSees).not.toContain(w);
    // Each still sees its own side of the shared electrician.
    const mv: ClashReport = (await moorview.get(`/api/reports/clashes?${qs(JUNE)}`).expect(200)).body;
    const cross = mv.rows.filter((r) => r.kind === 'cross_firm');
    expect(cross.map((r) => r.jobReferences)).toEqual([['MV-118']]);
    expect(cross[0]!.message).toBe('Priya Nair is busy elsewhere from Mon 8 Jun 09:00 to Mon 8 Jun 13:00');
    // Moorview sees Priya's time taken by others only as a number: 4 h on Mon 8 Jun.
    const util: UtilisationReport = (await moorview.get(`/api/reports/utilisation?${qs(JUNE)}`).expect(200)).body;
    expect(util.resources.find((r) => r.resourceName === 'Priya Nair')!.elsewhereMinutes).toBeGreaterThanOrEqual(240);
  });
});

describe('who may read the reports', () => {
  const routes = ['clashes', 'clashes.csv', 'hire', 'hire.csv', 'utilisation', 'utilisation.csv', 'risks.csv'];
  it.each([
    ['scheduler', account('scheduler').email],
    ['viewer', account('viewer').email],
    ['crew', account('crew').email],
    ['partner', account('partner', 'Brightspark Electrical').email],
    ['Moorview scheduler', account('scheduler', 'Moorview Spas').email],
  ])('refuses the %s (403)', async (_who, email) => {
    const agent = await signIn(ctx, email);
    for (const r of routes) await agent.get(`/api/reports/${r}?${qs(WEEK)}`).expect(403);
  });

  it('lets the owner read them, and refuses a bad range naming the field', async () => {
    const owner = await signIn(ctx, account('owner').email);
    await owner.get(`/api/reports/clashes?${qs(WEEK)}`).expect(200);
    const bad = await owner
      .get(`/api/reports/hire?from=${encodeURIComponent(WEEK.to)}&to=${encodeURIComponent(WEEK.from)}`)
      .expect(400);
    expect(bad.body.errors).toEqual([{ field: 'query.to', message: 'must be after from' }]);
  });
});

describe("changing a hire's dates", () => {
  const change = async (body: Record<string, unknown>) =>
    manager.patch(`/api/hire-periods/${hireId}`).set('X-CSRF-Token', manager.csrf).send(body).expect(200);
  const version = async () => Number((await ctx.knex('hire_periods').where({ id: hireId }).first('version')).version);
  const named = (res: { body: { affected: { jobReference: string; stageName: string; startsAt: string }[] } }) =>
    res.body.affected.map((b) => [b.jobReference, b.stageName, b.startsAt]);

  it('names the bookings an earlier off-hire or a later on-hire leaves off hire, and none when put back', async () => {
    // Off-hire after Tue 23 Jun (23:59 BST): the digger's Wed 24 booking is left off hire. Its Mon 29
    // booking was off hire already, so it is not named again.
    const shorter = await change({ version: await version(), offHireAt: '2026-06-23T22:59:00Z' });
    expect(shorter.body.hire.offHireAt).toBe('2026-06-23T22:59:00.000Z');
    expect(named(shorter)).toEqual([['TW-9001', 'Dig (day 2)', '2026-06-24T07:00:00.000Z']]);
    // The board agrees: the Wed 24 booking is now flagged outside the hire.
    const report: ClashReport = (await manager.get(`/api/reports/clashes?${qs(WEEK)}`).expect(200)).body;
    expect(report.rows.filter((r) => r.kind === 'hire').map((r) => r.date)).toEqual(['2026-06-24']);
    // Put back: nothing is left off hire.
    const back = await change({ version: await version(), offHireAt: '2026-06-26T17:00:00Z' });
    expect(back.body.affected).toEqual([]);
    // On hire from Wed 24 Jun 00:00 BST: the Tue 23 booking is left off hire.
    const later = await change({ version: await version(), onHireAt: '2026-06-23T23:00:00Z' });
    expect(named(later)).toEqual([['TW-9001', 'Dig (day 1)', '2026-06-23T07:00:00.000Z']]);
    expect((await change({ version: await version(), onHireAt: '2026-06-22T06:00:00Z' })).body.affected).toEqual([]);
  });

  it('does not name a booking another hire of the machine still covers, until that hire is cancelled', async () => {
    // A second hire of the digger on Wed 24 Jun alone, and one that started before today (Mon 1 Jun).
    const other = await recordDiggerHire('2026-06-23T23:00:00Z', '2026-06-24T22:59:00Z', { alsoOverlapping: true });
    const started = await recordDiggerHire('2026-05-25T07:00:00Z', '2026-06-05T16:00:00Z');
    onTestFinished(async () => {
      await ctx.knex('hire_periods').whereIn('id', [other, started]).del();
    });
    const shorter = await change({ version: await version(), offHireAt: '2026-06-23T22:59:00Z' });
    expect(shorter.body.affected).toEqual([]);

    const cancel = (id: string, query: string) =>
      manager.delete(`/api/hire-periods/${id}${query}`).set('X-CSRF-Token', manager.csrf);
    expect((await cancel(other, '').expect(400)).body.errors).toEqual([
      { field: 'query.version', message: 'is required: the version of the hire you loaded' },
    ]);
    expect((await cancel(other, '?version=1e3').expect(400)).body.errors).toEqual([
      { field: 'query.version', message: 'must be a whole number from 1' },
    ]);
    expect((await cancel(other, '?version=2').expect(409)).body.code).toBe('stale-version');
    const started409 = await cancel(started, '?version=1').expect(409);
    expect(started409.body).toMatchObject({
      code: 'hire-started',
      detail: 'This hire has started, so it stays on the books: change its off-hire instead.',
    });
    // Cancelled while a booking of the digger on Wed 24 evening is under way (its write path holds
    // the digger's lock and has written the row): the cancel waits for it, and names it too.
    const trim = await addStage('Trim the pit', 7, ['mini_excavator']);
    const holder = await ctx.knex.transaction();
    let answer: Awaited<ReturnType<typeof cancel>> | undefined;
    try {
      await lockResources(holder, [digger]);
      await holder('bookings').insert({
        stage_id: trim,
        resource_id: digger,
        starts_at: '2026-06-24T16:30:00Z',
        ends_at: '2026-06-24T17:30:00Z',
        state: 'pencilled',
      });
      const sent = cancel(other, '?version=1').then((r) => (answer = r));
      await untilWaitingOnLocks(ctx.knex, 1);
      expect(answer).toBeUndefined();
      await holder.commit();
      await sent;
    } catch (e) {
      await holder.rollback();
      throw e;
    }
    onTestFinished(async () => {
      await ctx.knex('stages').where({ id: trim }).del(); // and its booking with it
    });
    // Nothing covers the Wed 24 bookings any more.
    expect(answer!.status).toBe(200);
    expect(named(answer!)).toEqual([
      ['TW-9001', 'Dig (day 2)', '2026-06-24T07:00:00.000Z'],
      ['TW-9001', 'Trim the pit', '2026-06-24T16:30:00.000Z'],
    ]);
    expect(await ctx.knex('hire_periods').whereIn('id', [other, started]).pluck('id')).toEqual([started]);
    expect(
      await ctx
        .knex('audit_log')
        .where({ entity: 'hire_period', entity_id: other, action: 'delete' })
        .count('* as n')
        .first(),
    ).toEqual({ n: '1' });
    await change({ version: await version(), offHireAt: '2026-06-26T17:00:00Z' });
  });

  it('ends a started hire now (its off-hire from now), refuses other changes to it, and reopens it', async () => {
    // A hire of the digger from Mon 25 May to Fri 5 Jun, started (today is Mon 1 Jun, 08:00 BST),
    // with the digger booked on Wed 3 Jun; and the Mon 22 – Fri 26 Jun hire, not started.
    const started = await recordDiggerHire('2026-05-25T07:00:00Z', '2026-06-05T16:00:00Z');
    const level = await addStage('Level the base', 8, ['mini_excavator']);
    await ctx.knex('bookings').insert({
      stage_id: level,
      resource_id: digger,
      starts_at: '2026-06-03T07:00:00Z',
      ends_at: '2026-06-03T11:00:00Z',
      state: 'pencilled',
    });
    onTestFinished(async () => {
      await ctx.knex('stages').where({ id: level }).del();
      await ctx.knex('hire_periods').where({ id: started }).del();
    });
    const patch = (id: string, body: Record<string, unknown>) =>
      manager.patch(`/api/hire-periods/${id}`).set('X-CSRF-Token', manager.csrf).send(body);

    // Requested, not approved yet: it is approved before it is ended.
    expect((await patch(started, { version: 1, status: 'ended' }).expect(409)).body.code).toBe('hire-not-approved');
    await patch(started, { version: 1, status: 'approved' }).expect(200);
    // Not started: nothing to end, it is cancelled instead.
    const notStarted = await patch(hireId, { version: await version(), status: 'ended' }).expect(409);
    expect(notStarted.body).toMatchObject({
      code: 'hire-not-started',
      detail: "This hire hasn't started, so there is nothing to end: cancel it instead.",
    });

    const ended = await patch(started, { version: 2, status: 'ended' }).expect(200);
    expect(ended.body.hire).toMatchObject({
      status: 'ended',
      onHireAt: '2026-05-25T07:00:00.000Z',
      offHireAt: '2026-06-01T07:00:00.000Z',
      version: 3,
    });
    expect(named(ended)).toEqual([['TW-9001', 'Level the base', '2026-06-03T07:00:00.000Z']]);
    // The board's checks agree: the Wed 3 Jun booking is outside every hire of the digger.
    const june: ClashReport = (await manager.get(`/api/reports/clashes?${qs(JUNE)}`).expect(200)).body;
    expect(june.rows.filter((r) => r.kind === 'hire').map((r) => r.date)).toContain('2026-06-03');

    // Ended, the report suggests nothing for it (it paid for today, idle, but it is history), nor
    // keeping it on hire into a hire from Tue 2 Jun with a £500.00 delivery.
    const after = await recordDiggerHire('2026-06-02T06:00:00Z', '2026-06-02T16:00:00Z', { deliveryPence: 50000 });
    onTestFinished(async () => {
      await ctx.knex('hire_periods').where({ id: after }).del();
    });
    const hireReport: HireReport = (await manager.get(`/api/reports/hire?${qs(JUNE)}`).expect(200)).body;
    const row = (id: string) => hireReport.periods.find((p) => p.id === id)!;
    expect(row(started)).toMatchObject({ status: 'ended', suggestions: [] });
    expect(row(after).suggestions.map((s) => s.kind)).toEqual(['end']);

    // Ended, it takes no other change, nor a cancel.
    for (const body of [
      { version: 3, offHireAt: '2026-06-05T16:00:00Z' },
      { version: 3, dayRatePence: 100 },
    ]) {
      expect((await patch(started, body).expect(409)).body.code).toBe('hire-ended');
    }
    expect(
      (await manager.delete(`/api/hire-periods/${started}?version=3`).set('X-CSRF-Token', manager.csrf).expect(409))
        .body.code,
    ).toBe('hire-started');
    // Reopened (the end's Undo): approved again with the off-hire it had, and nothing left off hire.
    // Its old off-hire now overlaps the hire from Tue 2 Jun: asked about first (the page's Undo
    // answers for the manager: it puts back what was).
    const back = { version: 3, status: 'approved', offHireAt: '2026-06-05T16:00:00Z' };
    expect((await patch(started, back).expect(409)).body.code).toBe('hire-overlap');
    const reopened = await patch(started, { ...back, alsoOverlapping: true });
    expect(reopened.status).toBe(200);
    expect(reopened.body.hire).toMatchObject({ status: 'approved', offHireAt: '2026-06-05T16:00:00.000Z', version: 4 });
    expect(reopened.body.affected).toEqual([]);
  });
});
