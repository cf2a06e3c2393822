import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { AddressInfo } from 'node:net';
import {
  account,
  idOf,
  openBoardStream,
  signIn,
  startTestApp,
  untilWaitingOnLocks,
  type Agent,
  type TestContext,
} from '../helpers/server.ts';
import { backToEnquiry } from '../helpers/demo.ts';
import { CreateJob, UpdateJob } from '../../shared/schemas/jobs.ts';
import { PutSurvey } from '../../shared/schemas/surveys.ts';
import { CAUTION_NOTE } from '../../shared/cautions.ts';
import { JOB_RECORD_MODELS } from '../../server/models/job-records.ts';
import { ScopedModel } from '../../server/models/base.ts';

let ctx: TestContext;
let scheduler: Agent;
let owner: Agent;
/** TW-2421: a Brook 4 (2000 × 2000 × 850 mm, 300 kg dry) on a slab, taken back to an enquiry: not yet surveyed or booked. */
let enquiry: string;

beforeAll(async () => {
  ctx = await startTestApp();
  scheduler = await signIn(ctx, account('scheduler').email);
  owner = await signIn(ctx, account('owner').email);
  await backToEnquiry(ctx.knex, 'TW-2421');
  enquiry = await idOf(ctx.knex, 'jobs', { reference: 'TW-2421' });
});
afterAll(async () => {
  await ctx.close();
});

const write = (agent: Agent, method: 'put' | 'post' | 'patch', path: string, body?: object) =>
  agent[method](path)
    .set('X-CSRF-Token', agent.csrf)
    .send(body ?? {});

const SURVEY = {
  accessWidthMm: 1200,
  accessHeightMm: null,
  steps: 2,
  gates: 1,
  overheadObstructions: false,
  groundType: 'clay',
  buriedServicesNotes: 'Gas pipe along the side path (utility plan)',
  craneStandingPosition: 'Road outside no. 14',
  unitFacing: 'Controls towards the house, service side to the gate',
  craneDistanceToSetDownM: 11.5,
  consumerUnitDistanceM: 14,
  mainFuseAmps: 60,
  drainage: 'Gully by the back door',
};

const fieldsOf = (body: { errors: { field: string; message: string }[] }) =>
  Object.fromEntries(body.errors.map((e) => [e.field, e.message]));

describe('the site survey', () => {
  it('is recorded once, moves the enquiry to surveyed, and refuses a stale save (409)', async () => {
    await scheduler.get(`/api/jobs/${enquiry}/survey`).expect(404);
    const first = await write(scheduler, 'put', `/api/jobs/${enquiry}/survey`, { version: 0, survey: SURVEY }).expect(
      200,
    );
    expect(first.body).toMatchObject({
      version: 1,
      accessWidthMm: 1200,
      mainFuseAmps: 60,
      craneDistanceToSetDownM: 11.5,
      unitFacing: 'Controls towards the house, service side to the gate',
      surveyedBy: { name: 'Sam Okafor' },
    });
    expect((await ctx.knex('jobs').where('id', enquiry).first()).status).toBe('surveyed');

    const again = await write(scheduler, 'put', `/api/jobs/${enquiry}/survey`, {
      version: 1,
      survey: { ...SURVEY, steps: 3 },
    }).expect(200);
    expect(again.body.version).toBe(2);
    const stale = await write(owner, 'put', `/api/jobs/${enquiry}/survey`, {
      version: 1,
      survey: { ...SURVEY, steps: 9 },
    }).expect(409);
    expect(stale.body).toMatchObject({ code: 'stale-version', current: { version: 2, steps: 3 } });
  });

  it('is checked by the same schema on the form and the server', async () => {
    const bad = {
      version: 2,
      survey: { ...SURVEY, accessWidthMm: -5, overheadObstructions: true, groundType: 'marsh' },
    };
    const unit = PutSurvey.safeParse(bad);
    expect(unit.success).toBe(false);
    const local = Object.fromEntries(unit.error!.issues.map((i) => [i.path.join('.'), i.message]));
    const res = await write(scheduler, 'put', `/api/jobs/${enquiry}/survey`, bad).expect(400);
    expect(res.headers['content-type']).toMatch(/application\/problem\+json/);
    const remote = fieldsOf(res.body);
    expect(remote['survey.accessWidthMm']).toBe('must be more than 0');
    expect(remote['survey.groundType']).toBe('pick a ground type');
    for (const [field, message] of Object.entries(local)) expect(remote[field]).toBe(message);
  });
});

describe("the job's quantities", () => {
  it('come from the unit, the survey and the firm defaults', async () => {
    const res = await scheduler.get(`/api/jobs/${enquiry}/quantities`).expect(200);
    const q = res.body.quantities;
    // Brook 4 on a slab: (2000 + 2 × 150)² = 2.3 × 2.3 = 5.29 m²; dug 5.29 × (150 + 100) mm = 1.3225 → 1.323 m³;
    // concrete 5.29 × 0.15 = 0.7935 → 0.794 m³, × 1.05 = 0.833175 → 0.833 m³, ordered in 0.25 m³ steps: 1 m³.
    expect(q.pit.result).toMatchObject({ lengthMm: 2300, widthMm: 2300, areaM2: 5.29 });
    expect(q.excavation.result.volumeM3).toBe(1.323);
    expect(q.concrete.result).toEqual({ netVolumeM3: 0.794, withWasteM3: 0.833, orderVolumeM3: 1 });
    expect(q.concrete.formula).toContain('5.29 m² × 0.15 m');
    // On its side: 850 + 100 = 950 ≤ 1200 mm wide, 2000 + 150 = 2150 mm high with no limit → no crane.
    expect(q.access.result.way).toBe('on_side');
    expect(q.crane.result.needed).toBe(false);
    // 16 A ÷ 60 A = 26.7 % → ok. Filled 1650 kg × 9.80665 = 16.181 kN ÷ 4 m² = 4.05 kN/m².
    expect(q.supply.result).toMatchObject({ totalAmps: 16, verdict: 'ok' });
    expect(q.loading.result.pressureKNPerM2).toBe(4.05);
  });

  it("use the owner's own figures once saved", async () => {
    await write(scheduler, 'put', '/api/firm/settings', { version: 0, quantities: { perimeterGapMm: 200 } }).expect(
      403,
    );
    const saved = await write(owner, 'put', '/api/firm/settings', {
      version: 0,
      quantities: { perimeterGapMm: 200 },
    }).expect(200);
    expect(saved.body).toMatchObject({
      version: 1,
      overrides: { perimeterGapMm: 200 },
      quantities: { perimeterGapMm: 200, baseThicknessMm: 150 },
    });
    // (2000 + 2 × 200)² = 2.4 × 2.4 = 5.76 m².
    const res = await scheduler.get(`/api/jobs/${enquiry}/quantities`).expect(200);
    expect(res.body.quantities.pit.result.areaM2).toBe(5.76);
    await write(owner, 'put', '/api/firm/settings', { version: 0, quantities: {} }).expect(409);
    await write(owner, 'put', '/api/firm/settings', { version: 1, quantities: { bulkingFactor: 7 } }).expect(400);
    await write(owner, 'put', '/api/firm/settings', { version: 1, quantities: {} }).expect(200);
  });
});

describe('planning a job from its template', () => {
  const stagesOf = async (jobId: string) => ctx.knex('stages').where('job_id', jobId).orderBy('sequence');

  it('places the unit without a crane when the survey says it passes the route', async () => {
    await ctx.knex('stages').where('job_id', enquiry).delete();
    const res = await write(scheduler, 'post', `/api/jobs/${enquiry}/plan`).expect(201);
    expect(res.body.crane).toEqual({ needed: false, reason: 'The unit goes along the route on its side on a dolly.' });
    const stages = await stagesOf(enquiry);
    expect(stages.map((s) => s.kind)).toEqual([
      'survey',
      'base_pour',
      'electrical_first_fix',
      'delivery',
      'placement',
      'fill',
      'electrical_connect',
      'commission',
      'handover',
    ]);
    expect(stages.find((s) => s.kind === 'base_pour').cure).toEqual({ targetFraction: 0.7 });
    expect(stages.find((s) => s.kind === 'placement').requirements).toEqual([
      { kind: 'install_crew', count: 1 },
      { kind: 'pallet_truck', count: 2 },
    ]);
    const deps = await ctx
      .knex('dependencies as d')
      .join('stages as a', 'a.id', 'd.from_stage_id')
      .join('stages as b', 'b.id', 'd.to_stage_id')
      .where('a.job_id', enquiry)
      .select('a.kind as from', 'b.kind as to', 'd.lag_amount', 'd.lag_unit');
    expect(deps).toContainEqual({ from: 'base_pour', to: 'placement', lagAmount: 0, lagUnit: 'working_hours' });
    expect(deps).toContainEqual({ from: 'commission', to: 'handover', lagAmount: 0, lagUnit: 'working_hours' });
    expect(deps).toHaveLength(res.body.links.length);
    expect(
      await ctx
        .knex('bookings')
        .whereIn(
          'stage_id',
          stages.map((s) => s.id),
        )
        .count('* as n')
        .first(),
    ).toEqual({ n: '0' });
    expect((await ctx.knex('jobs').where('id', enquiry).first()).status).toBe('planned');
  });

  it('plans a crane lift once the survey finds the route too narrow, replacing the unbooked plan', async () => {
    const current = (await scheduler.get(`/api/jobs/${enquiry}/survey`).expect(200)).body.version;
    // On its side the Brook 4 needs 850 + 100 = 950 mm: an 800 mm gate is too narrow.
    await write(scheduler, 'put', `/api/jobs/${enquiry}/survey`, {
      version: current,
      survey: { ...SURVEY, accessWidthMm: 800 },
    }).expect(200);
    const res = await write(scheduler, 'post', `/api/jobs/${enquiry}/plan`).expect(201);
    expect(res.body.crane.needed).toBe(true);
    const kinds = (await stagesOf(enquiry)).map((s) => s.kind);
    expect(kinds).toContain('lift');
    expect(kinds).not.toContain('placement');
    const lift = res.body.stages.find((s: { kind: string }) => s.kind === 'lift');
    expect(lift.cautions.at(-1)).toBe(CAUTION_NOTE);
    expect(lift.requirements).toContainEqual({ kind: 'crane', count: 1 });
  });

  it('refuses (409) a job that already has bookings', async () => {
    const booked = await idOf(ctx.knex, 'jobs', { reference: 'TW-2405' });
    const before = await stagesOf(booked);
    const res = await write(scheduler, 'post', `/api/jobs/${booked}/plan`).expect(409);
    expect(res.body.code).toBe('already-booked');
    expect((await stagesOf(booked)).map((s) => s.id)).toEqual(before.map((s) => s.id));
  });

  it('waits for a booking of one of its stages under way, then refuses to plan again: the booking stands', async () => {
    // The survey stage of the plan above, booked on a crew of its kind (Tue 29 Sep 2026, 09:00–11:00 BST).
    const survey = (await stagesOf(enquiry)).find((s) => s.kind === 'survey');
    const kind = survey.requirements[0].kind;
    const crew = await ctx.knex('resources').where({ kind, active: true }).orderBy('id').first('id');
    // The booking is caught half-way (its row written, its audit row held), then the plan is sent.
    const holder = await ctx.knex.transaction();
    await holder.raw('LOCK TABLE audit_log IN SHARE MODE');
    const booking = write(scheduler, 'post', '/api/bookings', {
      stageId: String(survey.id),
      resourceId: String(crew.id),
      startsAt: '2026-09-29T08:00:00Z',
      endsAt: '2026-09-29T10:00:00Z',
    }).then((r) => r);
    await untilWaitingOnLocks(ctx.knex, 1);
    const plan = write(scheduler, 'post', `/api/jobs/${enquiry}/plan`).then((r) => r);
    await untilWaitingOnLocks(ctx.knex, 2);
    await holder.commit();
    const [booked, planned] = await Promise.all([booking, plan]);
    expect(booked.status, JSON.stringify(booked.body)).toBe(201);
    // Before, the plan counted no bookings (the new one not yet saved), then replaced the stages and
    // took the booking that had just been answered 201 with them.
    expect(planned.status, JSON.stringify(planned.body)).toBe(409);
    expect(planned.body.code).toBe('already-booked');
    expect(await ctx.knex('bookings').where('id', booked.body.bookings[0].id).first('stage_id')).toEqual({
      stageId: survey.id,
    });
    await ctx.knex('bookings').where('id', booked.body.bookings[0].id).delete();
  });

  it("uses the firm's edited template, version-checked", async () => {
    const list = await scheduler.get('/api/templates').expect(200);
    const slab = list.body.items.find((t: { installationType: string }) => t.installationType === 'slab');
    expect(slab).toMatchObject({ isDefault: true, version: 0 });
    const edited = {
      version: 0,
      name: slab.name,
      links: slab.links,
      stages: slab.stages.map((s: { kind: string }) =>
        s.kind === 'handover' ? { ...s, duration: { kind: 'fixed', minutes: 90 } } : s,
      ),
    };
    const saved = await write(scheduler, 'put', '/api/templates/slab', edited).expect(200);
    expect(saved.body).toMatchObject({ isDefault: false, version: 1 });
    await write(owner, 'put', '/api/templates/slab', edited).expect(409);
    const looped = {
      ...edited,
      version: 1,
      links: [...edited.links, { from: 'handover', to: 'survey', type: 'FS', lagAmount: 0, lagUnit: 'working_hours' }],
    };
    expect((await write(scheduler, 'put', '/api/templates/slab', looped).expect(400)).body.errors[0].message).toBe(
      'links form a loop',
    );
    await write(scheduler, 'post', `/api/jobs/${enquiry}/plan`).expect(201);
    expect((await stagesOf(enquiry)).find((s) => s.kind === 'handover').durationMinutes).toBe(90);
  });
});

describe('open boards', () => {
  it('reload when a job is edited or planned again (an event naming no booking)', async () => {
    const server = ctx.waterline.app.listen(0, '127.0.0.1');
    await new Promise((r) => server.once('listening', r));
    const RELOAD = 'event: bookings\ndata: {"bookingId":""}\n\n';
    const reloads = (t: string) => t.split(RELOAD).length - 1;
    const board = await openBoardStream(scheduler, (server.address() as AddressInfo).port);
    try {
      const job = await ctx.knex('jobs').where('id', enquiry).first('version');
      await write(scheduler, 'patch', `/api/jobs/${enquiry}`, {
        version: job.version,
        accessNotes: 'Side gate: code 4421',
      }).expect(200);
      expect(reloads(await board.until((t) => reloads(t) >= 1))).toBe(1);
      await write(scheduler, 'post', `/api/jobs/${enquiry}/plan`).expect(201);
      expect(reloads(await board.until((t) => reloads(t) >= 2))).toBe(2);
    } finally {
      board.close();
      await new Promise((r) => server.close(r));
    }
  });
});

describe('editing a job', () => {
  it('saves with the next version and refuses a stale one', async () => {
    const job = await ctx.knex('jobs').where('id', enquiry).first();
    const res = await write(scheduler, 'patch', `/api/jobs/${enquiry}`, {
      version: job.version,
      accessNotes: 'Gate key under the pot',
    }).expect(200);
    expect(res.body).toMatchObject({
      version: job.version + 1,
      accessNotes: 'Gate key under the pot',
      reference: 'TW-2421',
    });
    expect(
      (await write(scheduler, 'patch', `/api/jobs/${enquiry}`, { version: job.version, accessNotes: 'x' }).expect(409))
        .body.code,
    ).toBe('stale-version');
  });

  it('is checked by the same schema on the form and the server', async () => {
    const bad = {
      reference: 'T-1',
      customerName: 'A Person',
      siteAddress: '1 Row',
      siteTown: 'Leeds',
      sitePostcode: 'NOT A CODE',
      installationType: 'slab',
      promisedFrom: '2026-07-10',
      promisedTo: '2026-07-01',
    };
    const local = CreateJob.safeParse(bad);
    expect(local.success).toBe(false);
    const messages = Object.fromEntries(local.error!.issues.map((i) => [i.path.join('.'), i.message]));
    expect(messages).toEqual({
      sitePostcode: 'must be a UK postcode such as LS6 2AB',
      promisedTo: 'must be on or after the start of the promised window',
    });
    const created = await write(scheduler, 'post', '/api/jobs', bad).expect(400);
    expect(fieldsOf(created.body)).toEqual(messages);

    // The window rule runs once the fields are sound, on create and on edit alike.
    const window = { version: 1, promisedFrom: '2026-07-10', promisedTo: '2026-07-01' };
    expect(UpdateJob.safeParse(window).error!.issues[0]!.message).toBe(
      'must be on or after the start of the promised window',
    );
    const job = await ctx.knex('jobs').where('id', enquiry).first();
    const edited = await write(scheduler, 'patch', `/api/jobs/${enquiry}`, { ...window, version: job.version }).expect(
      400,
    );
    expect(fieldsOf(edited.body)).toEqual({ promisedTo: 'must be on or after the start of the promised window' });
  });
});

describe('day sheets', () => {
  it("list each crew's visits that day with site, contacts and cautions", async () => {
    const heron = await idOf(ctx.knex, 'resources', { name: 'Crew Heron' });
    const booking = await ctx.knex('bookings').where('resource_id', heron).orderBy('starts_at').first();
    const date = new Intl.DateTimeFormat('en-CA', { timeZone: 'Europe/London' }).format(booking.startsAt);
    const res = await scheduler.get('/api/day-sheets').query({ date }).expect(200);
    const sheet = res.body.sheets.find((s: { resource: { id: string } }) => s.resource.id === heron);
    const visit = sheet.visits.find((v: { bookingId: string }) => v.bookingId === String(booking.id));
    expect(visit.site.town).toBeTruthy();
    expect(visit.contacts.map((c: { role: string }) => c.role)).toEqual(['Customer', 'Installer office']);
    expect(visit.cautions.at(-1)).toBe(CAUTION_NOTE);
    // People and crews get sheets; machines do not (their operators do).
    const categories = new Set(res.body.sheets.map((s: { resource: { category: string } }) => s.resource.category));
    expect(res.body.sheets.length).toBeGreaterThan(0);
    expect(categories.has('machine')).toBe(false);

    // Connor Reid works in Crew Heron: he sees only his own sheets.
    const crew = await signIn(ctx, account('crew').email);
    const own = await crew.get('/api/day-sheets').query({ date }).expect(200);
    const ownNames = own.body.sheets.map((s: { resource: { name: string } }) => s.resource.name);
    expect(ownNames).toContain('Crew Heron');
    expect(ownNames.filter((n: string) => !['Crew Heron', 'Connor Reid'].includes(n))).toEqual([]);
    await scheduler.get('/api/day-sheets').query({ date: '1 June' }).expect(400);
  });
});

describe('the new records', () => {
  it('each declare a firm scope', () => {
    for (const model of JOB_RECORD_MODELS) {
      expect(Object.prototype.hasOwnProperty.call(model, 'scope'), model.name).toBe(true);
      expect(model.scope).not.toBe(ScopedModel.scope);
    }
  });

  it("are not visible to another firm: surveys and quantities of another firm's job are 404", async () => {
    const other = await signIn(ctx, account('scheduler', 'Moorview Spas').email);
    await other.get(`/api/jobs/${enquiry}/survey`).expect(404);
    await other.get(`/api/jobs/${enquiry}/quantities`).expect(404);
    await write(other, 'post', `/api/jobs/${enquiry}/plan`).expect(404);
    await write(other, 'patch', `/api/jobs/${enquiry}`, { version: 1, accessNotes: 'x' }).expect(404);
  });
});
