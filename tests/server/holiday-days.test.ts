import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { HOLIDAY_MARGIN_DAYS, holidaysFor, publicHolidays } from '../../server/services/holiday-days.ts';
import { ENGLAND_AND_WALES, NORTHERN_IRELAND, SCOTLAND } from '../shared/scheduler/uk-holidays.ts';
import { account, idOf, signIn, startTestApp, type Agent, type TestContext } from '../helpers/server.ts';
import type { BoardData } from '../../shared/board-data.ts';

/**
 * Public holidays are worked out on the server (date-holidays stays out of the browser's bundle):
 * the board's calendars carry the days of their region for the loaded range and a margin, and the
 * server's own checks read the same calendars.
 */

const dates = (country: string, state: string, year: number): string[] =>
  publicHolidays({ country, state }, year).map((h) => h.date);

describe('UK public holidays from date-holidays (observed days, as gov.uk lists them)', () => {
  // Source: gov.uk/bank-holidays, England and Wales 2026 and 2027 — from memory (not read in this session).
  it('England and Wales 2026, Boxing Day moved to Monday 28 December', () => {
    expect(dates('GB', 'ENG', 2026)).toEqual([
      '2026-01-01',
      '2026-04-03',
      '2026-04-06',
      '2026-05-04',
      '2026-05-25',
      '2026-08-31',
      '2026-12-25',
      '2026-12-28',
    ]);
    const boxing = publicHolidays({ country: 'GB', state: 'ENG' }, 2026).find((h) => h.date === '2026-12-28');
    expect(boxing?.substitute).toBe(true);
  });

  it('England and Wales 2027, both Christmas days moved to 27 and 28 December', () => {
    // Source: gov.uk/bank-holidays — from memory.
    expect(dates('GB', 'ENG', 2027)).toEqual([
      '2027-01-01',
      '2027-03-26',
      '2027-03-29',
      '2027-05-03',
      '2027-05-31',
      '2027-08-30',
      '2027-12-27',
      '2027-12-28',
    ]);
  });

  it('Wales (GB/WLS) has the same list as England (GB/ENG), as gov.uk publishes one England and Wales list', () => {
    for (const y of [2026, 2027]) expect(dates('GB', 'WLS', y)).toEqual(dates('GB', 'ENG', y));
  });

  it("Scotland 2026: 2 January, first Monday of August, St Andrew's Day, no Easter Monday", () => {
    // Source: gov.uk/bank-holidays, Scotland 2026 — from memory.
    expect(dates('GB', 'SCT', 2026)).toEqual([
      '2026-01-01',
      '2026-01-02',
      '2026-04-03',
      '2026-05-04',
      '2026-05-25',
      '2026-08-03',
      '2026-11-30',
      '2026-12-25',
      '2026-12-28',
    ]);
  });

  it('Scotland 2027: 2 January (a Saturday) moved to Monday 4 January', () => {
    // Source: gov.uk/bank-holidays, Scotland 2027 — from memory.
    expect(dates('GB', 'SCT', 2027)).toEqual([
      '2027-01-01',
      '2027-01-04',
      '2027-03-26',
      '2027-05-03',
      '2027-05-31',
      '2027-08-02',
      '2027-11-30',
      '2027-12-27',
      '2027-12-28',
    ]);
  });

  it("Northern Ireland 2026: St Patrick's Day, and the Battle of the Boyne (12 July, a Sunday) on Monday 13 July", () => {
    // Source: gov.uk/bank-holidays, Northern Ireland 2026 — from memory; 13 July as the substitute
    // is what date-holidays gives and what we recall gov.uk publishing (check against gov.uk before relying on it).
    expect(dates('GB', 'NIR', 2026)).toEqual([
      '2026-01-01',
      '2026-03-17',
      '2026-04-03',
      '2026-04-06',
      '2026-05-04',
      '2026-05-25',
      '2026-07-13',
      '2026-08-31',
      '2026-12-25',
      '2026-12-28',
    ]);
  });

  it('Northern Ireland 2027: 17 March and 12 July fall on weekdays', () => {
    // Source: gov.uk/bank-holidays, Northern Ireland 2027 — from memory.
    expect(dates('GB', 'NIR', 2027)).toEqual([
      '2027-01-01',
      '2027-03-17',
      '2027-03-26',
      '2027-03-29',
      '2027-05-03',
      '2027-05-31',
      '2027-07-12',
      '2027-08-30',
      '2027-12-27',
      '2027-12-28',
    ]);
  });

  it('keeps weekend originals when asked (date-holidays lists them beside the substitutes)', () => {
    const all = publicHolidays({ country: 'GB', state: 'ENG' }, 2026, { observedOnly: false }).map((h) => h.date);
    expect(all).toContain('2026-12-26');
    expect(all).toContain('2026-12-28');
  });
});

describe('the days a calendar carries for a range', () => {
  const SCT = { country: 'GB', state: 'SCT' };
  it('lists the days within the range and the margin either side, oldest first, with names', () => {
    expect(holidaysFor(SCT, { from: Date.UTC(2026, 10, 23), to: Date.UTC(2026, 11, 7) }, 0)).toEqual([
      { date: '2026-11-30', name: 'St Andrew’s Day' },
    ]);
    // Ten days either side of one November week reach neither 2 January nor Christmas.
    expect(
      holidaysFor(SCT, { from: Date.UTC(2026, 10, 23), to: Date.UTC(2026, 10, 30) }, 10).map((h) => h.date),
    ).toEqual(['2026-11-30']);
    expect(holidaysFor(SCT, { from: Date.UTC(2026, 10, 2), to: Date.UTC(2026, 10, 9) }, 0)).toEqual([]);
  });

  it('by default reaches 400 days either side: a notice of 250 working days counted back from the range', () => {
    expect(HOLIDAY_MARGIN_DAYS).toBe(400);
    const days = holidaysFor(
      { country: 'GB', state: 'ENG' },
      { from: Date.UTC(2027, 0, 4), to: Date.UTC(2027, 1, 1) },
    ).map((h) => h.date);
    expect(days[0]).toBe('2025-12-25'); // 4 Jan 2027 − 400 days = 30 Nov 2025
    // 1 Feb 2027 + 400 days = 7 Mar 2028: the last is New Year's Day 2028 (a Saturday) taken on Monday 3 January.
    expect(days.at(-1)).toBe('2028-01-03');
    expect(days).toEqual(expect.arrayContaining([...ENGLAND_AND_WALES.map((h) => h.date)]));
  });

  it("gives the test fixtures' dates (tests/shared/scheduler/uk-holidays.ts)", () => {
    const twoYears = { from: Date.UTC(2026, 0, 1), to: Date.UTC(2027, 11, 31) };
    expect(holidaysFor({ country: 'GB', state: 'ENG' }, twoYears, 0).map((h) => h.date)).toEqual(
      ENGLAND_AND_WALES.map((h) => h.date),
    );
    expect(holidaysFor(SCT, twoYears, 0).map((h) => h.date)).toEqual(SCOTLAND.map((h) => h.date));
    expect(holidaysFor({ country: 'GB', state: 'NIR' }, twoYears, 0).map((h) => h.date)).toEqual(
      NORTHERN_IRELAND.map((h) => h.date),
    );
  });

  it('is empty without a region, and for a range beyond twenty years (never a long loop)', () => {
    expect(holidaysFor(null, { from: 0, to: 1 })).toEqual([]);
    expect(holidaysFor(SCT, { from: Date.UTC(1900, 0, 1), to: Date.UTC(2200, 0, 1) })).toEqual([]);
    expect(holidaysFor(SCT, { from: Number.NaN, to: 1 })).toEqual([]);
  });
});

describe("the board's calendars and the server's checks", () => {
  let ctx: TestContext;
  let scheduler: Agent;
  beforeAll(async () => {
    ctx = await startTestApp();
    scheduler = await signIn(ctx, account('scheduler').email);
  });
  afterAll(async () => {
    await ctx.close();
  });

  it("carry England's bank holidays, the summer one inside the range", async () => {
    const data: BoardData = (
      await scheduler.get('/api/board').query({ from: '2026-08-24T00:00:00Z', to: '2026-09-07T00:00:00Z' }).expect(200)
    ).body;
    expect(data.calendars.length).toBeGreaterThan(3);
    for (const cal of data.calendars) {
      const dates = (cal.holidays ?? []).map((h) => h.date);
      expect(dates).toContain('2026-08-31');
      expect(dates).toContain('2026-12-28'); // within the margin ahead
      expect(dates).not.toContain('2026-12-26'); // the weekend original of a substitute day is not listed
    }
  });

  it('refuse a booking on the bank holiday (422, "public holiday") and take it the next day', async () => {
    const firm = await idOf(ctx.knex, 'firms', { name: 'Tideway Hot Tubs' });
    const [job] = await ctx
      .knex('jobs')
      .insert({
        firm_id: firm,
        reference: 'TW-9931',
        customer_name: 'Hal Pendry',
        site_address: '9 Lock Row',
        site_town: 'Bingley',
        site_postcode: 'BD16 2AA',
        installation_type: 'slab',
        status: 'surveyed',
        ordered_on: '2026-05-15',
      })
      .returning('id');
    const post = (path: string, body: object) => scheduler.post(path).set('X-CSRF-Token', scheduler.csrf).send(body);
    await post(`/api/jobs/${job.id}/plan`, {}).expect(201);
    const [survey] = await ctx.knex('stages').where({ job_id: job.id }).orderBy('sequence').limit(1);
    const crew = await idOf(ctx.knex, 'resources', { name: 'Crew Heron' });
    // Monday 31 August 2026, 09:00 BST: the summer bank holiday in England (gov.uk, from memory).
    const refused = await post('/api/bookings', {
      stageId: String(survey.id),
      resourceId: crew,
      startsAt: '2026-08-31T08:00:00Z',
    }).expect(422);
    expect(
      (refused.body.violations as { kind: string; message: string }[])
        .filter((v) => v.kind === 'availability')
        .map((v) => v.message)
        .join(' '),
    ).toMatch(/public holiday/);
    expect(await ctx.knex('bookings').where({ stage_id: survey.id })).toEqual([]);
    const taken = await post('/api/bookings', {
      stageId: String(survey.id),
      resourceId: crew,
      startsAt: '2026-09-01T08:00:00Z',
    });
    expect(taken.status, JSON.stringify(taken.body)).toBe(201);
  });
});
