import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { account, idOf, signIn, startTestApp, TEST_TODAY, type Agent, type TestContext } from '../helpers/server.ts';
import { makeJob } from '../helpers/flows.ts';
import { startFakeWeather, type FakeWeather } from '../../scripts/fakes/weather.ts';
import { refreshForecasts } from '../../server/services/weather.ts';
import { startWeatherRefresh, WEATHER_SCHEDULER_ID } from '../../workers/weather.ts';
import pino from 'pino';

let ctx: TestContext;
let scheduler: Agent;
let owner: Agent;
let fake: FakeWeather;
let job: string;
let base: string;
let lift: string;
let gang: string;
let otter: string;

/** The fixture job's site as typed on the survey (invented, in the Yorkshire Dales). */
const SITE = { siteLatitude: 53.93, siteLongitude: -1.88 };
const today = TEST_TODAY.getTime();

beforeAll(async () => {
  ctx = await startTestApp();
  // A fake of our own (a free port, "today" the scenario's), so its temperatures and outage are this file's alone.
  fake = await startFakeWeather(0, { now: () => today, temperature: () => 11.5 });
  scheduler = await signIn(ctx, account('scheduler').email);
  owner = await signIn(ctx, account('owner').email);
  // A job of this file's own: a pour whose lift waits for its cure (70% of 28-day strength), nothing else in the way.
  const fx = await makeJob(ctx.knex, {
    reference: 'FX-CURE',
    town: 'Thornby Wold',
    stages: [
      { kind: 'base_pour', name: 'Pour reinforced base', minutes: 300, needs: { install_crew: 1 } },
      { kind: 'lift', name: 'Lift onto the base', minutes: 60, needs: { install_crew: 1 } },
    ],
    links: [['base_pour', 'lift']],
  });
  job = fx.jobId;
  base = fx.stage.base_pour!;
  lift = fx.stage.lift!;
  await ctx
    .knex('stages')
    .where('id', base)
    .update({ cure: JSON.stringify({ targetFraction: 0.7 }) });
  await ctx.knex('dependencies').where({ from_stage_id: base, to_stage_id: lift }).update({ waits_for_cure: true });
  // Crew Kestrel is free on 2 June and Crew Otter from 9 to 19 June in the scenario.
  gang = await idOf(ctx.knex, 'resources', { name: 'Crew Kestrel' });
  otter = await idOf(ctx.knex, 'resources', { name: 'Crew Otter' });
});
afterAll(async () => {
  await fake?.stop();
  await ctx?.close();
});

const write = (agent: Agent, method: 'put' | 'post', path: string, body: object) =>
  agent[method](path).set('X-CSRF-Token', agent.csrf).send(body);
const fieldsOf = (body: { errors: { field: string; message: string }[] }) =>
  Object.fromEntries(body.errors.map((e) => [e.field, e.message]));
const refresh = () => refreshForecasts(ctx.knex, { baseUrl: fake.url, now: today });
type V = { kind: string; details: { releaseAt: number; summary: string; datumC: number } };
/** The cure refusal of a lift booked at `startsAt` (422), as the write path words it. */
async function cureRefusal(startsAt: string): Promise<V['details']> {
  const res = await write(scheduler, 'post', '/api/bookings', { stageId: lift, resourceId: otter, startsAt });
  expect(res.status, JSON.stringify(res.body)).toBe(422);
  const cure = (res.body.violations as V[]).find((v) => v.kind === 'cure');
  expect(cure, JSON.stringify(res.body.violations)).toBeDefined();
  return cure!.details;
}

describe('the site position on the survey', () => {
  it('is refused out of range, or half given, with the field and the reason (problem+json)', async () => {
    const version = 0;
    const put = (survey: object) =>
      write(scheduler, 'put', `/api/jobs/${job}/survey`, {
        version,
        survey: { accessWidthMm: 1200, groundType: 'clay', ...survey },
      });

    const north = await put({ siteLatitude: 91, siteLongitude: 0 }).expect(400);
    expect(north.headers['content-type']).toMatch(/application\/problem\+json/);
    expect(fieldsOf(north.body)).toEqual({ 'survey.siteLatitude': 'must be between −90 and 90 degrees' });
    expect(fieldsOf((await put({ siteLatitude: 10, siteLongitude: -180.5 }).expect(400)).body)).toEqual({
      'survey.siteLongitude': 'must be between −180 and 180 degrees',
    });
    expect(fieldsOf((await put({ siteLatitude: 53.9, siteLongitude: null }).expect(400)).body)).toEqual({
      'survey.siteLongitude': 'give both the latitude and the longitude, or neither',
    });

    const ok = await put(SITE).expect(200);
    expect(ok.body).toMatchObject({ ...SITE, version: version + 1 });
  });
});

describe('the cure from the site forecast', () => {
  it('fetches the forecast through the documented parameters, stores it, and the lift waits for the release it gives', async () => {
    // Tue 2 Jun 08:00–13:00 BST: the pour ends 12:00 UTC.
    const poured = await write(scheduler, 'post', '/api/bookings', {
      stageId: base,
      resourceId: gang,
      startsAt: '2026-06-02T07:00:00Z',
    });
    expect(poured.status, JSON.stringify(poured.body)).toBe(201);
    const result = await refresh();
    expect(result).toMatchObject({ refreshed: [job], failed: [] });
    const asked = fake.requests.at(-1)!;
    expect(Object.fromEntries(asked)).toEqual({
      latitude: '53.93',
      longitude: '-1.88',
      daily: 'temperature_2m_mean',
      timezone: 'Europe/London',
      forecast_days: '16',
    });
    const stored = await ctx.knex('site_forecasts').where('job_id', job).orderBy('date').select('date', 'mean_c');
    expect(stored).toHaveLength(16);
    expect(stored[0]).toEqual({ date: '2026-06-01', meanC: 11.5 });

    // Worked by hand (ASTM C1074 Nurse–Saul, datum 0 °C, reference 23 °C): each 11.5 °C day counts 11.5/23 = 0.5 day,
    // 70% (ACI 209R-92) needs 6.913580 days of equivalent age, so 13.827160 days: 2 Jun 12:00 UTC + 13 d = 15 Jun 12:00,
    // + 0.827160 d (19 h 51.1 min) = 16 Jun 07:51.1 → 07:52 UTC. At the plain 23 °C it would have been 9 Jun 09:56.
    const cure = await cureRefusal('2026-06-12T07:00:00Z');
    expect(new Date(cure.releaseAt).toISOString()).toBe('2026-06-16T07:52:00.000Z');
    expect(cure.summary).toContain('datum 0 °C, reference 23 °C');
    expect(cure.summary).toContain(
      'from 2026-06-02: the weather forecast for Thornby Wold 11.5 (× 14) °C: released after 13.8 days',
    );
  });

  it('tells the office when a colder forecast moves the release past a booked lift', async () => {
    // 20 °C: 20/23 = 0.869565 a day, 6.913580 / 0.869565 = 7.950617 days → released Wed 10 Jun 10:49 UTC; the lift on Fri 12 Jun fits.
    fake.setTemperature(() => 20);
    expect((await refresh()).lateLifts).toEqual([]);
    const booked = await write(scheduler, 'post', '/api/bookings', {
      stageId: lift,
      resourceId: otter,
      startsAt: '2026-06-12T07:00:00Z',
    });
    expect(booked.status, JSON.stringify(booked.body)).toBe(201);
    const liftBooking = String(booked.body.bookings[0].id);

    // 8 °C: 8/23 = 0.347826 a day, 6.913580 / 0.347826 = 19.876543 days → released 22 Jun, after the booked lift.
    fake.setTemperature(() => 8);
    const colder = await refresh();
    expect(colder.lateLifts).toEqual([
      {
        jobId: job,
        stageId: lift,
        bookingIds: [liftBooking],
        message: expect.stringMatching(/can't start before the base has cured/),
      },
    ]);
    const audit = await ctx.knex('audit_log').where({ entity: 'cure_forecast', entity_id: lift }).select('after');
    expect(audit).toHaveLength(1);
    expect(audit[0].after).toMatchObject({
      jobId: job,
      stageId: lift,
      summary: expect.stringContaining('the weather forecast for'),
    });
    // The same forecast again is no news.
    expect((await refresh()).lateLifts).toEqual([]);
  });

  it('falls back to the seasonal assumption when the forecast service is down, and says so', async () => {
    await ctx.knex('bookings').where('stage_id', lift).delete();
    await ctx.knex('site_forecasts').where('job_id', job).delete();
    fake.setOutage(true);
    const result = await refresh();
    fake.setOutage(false);
    expect(result.refreshed).toEqual([]);
    expect(result.failed).toEqual([{ jobId: job, reason: 'The weather service answered 503' }]);
    expect(await ctx.knex('site_forecasts').where('job_id', job)).toEqual([]);

    // June's seasonal mean 13.7 °C: 13.7/23 = 0.595652 a day, 6.913580 / 0.595652 = 11.606741 days:
    // 2 Jun 12:00 UTC + 11 d = 13 Jun 12:00, + 0.606741 d (14 h 33.7 min) = 14 Jun 02:33.7 → 02:34 UTC.
    const cure = await cureRefusal('2026-06-12T07:00:00Z');
    expect(new Date(cure.releaseAt).toISOString()).toBe('2026-06-14T02:34:00.000Z');
    expect(cure.summary).toContain(
      'no forecast for Thornby Wold on file, so the seasonal assumption (UK monthly mean air temperature, Met Office 1991–2020 averages, an assumption) 13.7 (× 12) °C',
    );
  });

  it("counts above the firm's own datum when it sets one", async () => {
    expect(
      fieldsOf(
        (await write(owner, 'put', '/api/firm/settings', { cureDatumC: 40, cureDatumCWas: 0 }).expect(400)).body,
      ),
    ).toEqual({ cureDatumC: 'must be between −15 and 15 °C' });
    expect(fieldsOf((await write(owner, 'put', '/api/firm/settings', { cureDatumC: 5 }).expect(400)).body)).toEqual({
      cureDatumCWas: 'is required when changing the cure datum: the datum you loaded',
    });
    await write(scheduler, 'put', '/api/firm/settings', { cureDatumC: 5, cureDatumCWas: 0 }).expect(403);
    expect(
      (await write(owner, 'put', '/api/firm/settings', { cureDatumC: 5, cureDatumCWas: 0 }).expect(200)).body
        .cureDatumC,
    ).toBe(5);
    try {
      // Datum 5 °C on June's 13.7 °C: (13.7 − 5) / (23 − 5) = 0.483333 a day; 6.913580 / 0.483333 = 14.303959 days:
      // 2 Jun 12:00 + 14 d = 16 Jun 12:00, + 0.303959 d (7 h 17.7 min) = 16 Jun 19:17.7 → 19:18 UTC.
      const cure = await cureRefusal('2026-06-12T07:00:00Z');
      expect(cure.datumC).toBe(5);
      expect(new Date(cure.releaseAt).toISOString()).toBe('2026-06-16T19:18:00.000Z');
      expect(cure.summary).toContain('datum 5 °C, reference 23 °C');
      // A second tab that loaded 0 °C does not type over the 5 °C saved since.
      const stale = await write(owner, 'put', '/api/firm/settings', { cureDatumC: -2, cureDatumCWas: 0 }).expect(409);
      expect(stale.body).toMatchObject({ code: 'stale-version', field: 'cureDatumCWas', current: { cureDatumC: 5 } });
      expect(stale.body.detail).toBe(
        'Someone else set the cure datum to 5 °C since you loaded it: reload to see it before changing it.',
      );
    } finally {
      await write(owner, 'put', '/api/firm/settings', { cureDatumC: 0, cureDatumCWas: 5 }).expect(200);
    }
  });
});

describe('the daily refresh job', () => {
  it('is one BullMQ job scheduler repeating every 24 hours, whose first run fetches the forecasts', async () => {
    await ctx.knex('site_forecasts').where('job_id', job).delete();
    fake.setTemperature(() => 9);
    const refresh = startWeatherRefresh({
      knex: ctx.knex,
      // A queue of this run's own: a worker of another test file (tests/ops) on the same Redis never takes its job.
      config: { ...ctx.config, WEATHER_API_URL: fake.url, WEATHER_QUEUE: `weather-test-${process.pid}-${Date.now()}` },
      logger: pino({ level: 'silent' }),
      now: () => today,
    });
    try {
      // Poll: the scheduler's first job runs at once; its worker stores the fetched days.
      const deadline = Date.now() + 20_000;
      let rows: { meanC: number }[] = [];
      while (Date.now() < deadline && rows.length < 16) {
        rows = await ctx.knex('site_forecasts').where('job_id', job).select('mean_c');
        if (rows.length < 16) await new Promise((r) => setTimeout(r, 100));
      }
      expect(rows).toHaveLength(16);
      expect(rows.every((r) => r.meanC === 9)).toBe(true);
      const scheduler = await refresh.queue.getJobScheduler(WEATHER_SCHEDULER_ID);
      expect(scheduler).toMatchObject({ key: WEATHER_SCHEDULER_ID, every: 24 * 3600_000 });
    } finally {
      await refresh.queue.removeJobScheduler(WEATHER_SCHEDULER_ID);
      await refresh.close();
    }
  });
});
