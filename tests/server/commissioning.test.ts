import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import sharp from 'sharp';
import {
  account,
  idOf,
  signIn,
  startTestApp,
  untilWaitingOnLocks,
  type Agent,
  type TestContext,
} from '../helpers/server.ts';
import { loadCommissioningRecord } from '../../server/services/commissioning.ts';

/*
 * The commissioning record on the crew's phone and the gate it puts on "Done". The demo's TW-2402
 * is commissioned by Crew Heron (Connor Reid's crew) after Brightspark connects it; the tests put
 * that booking on site (as if the crew had arrived) and then try to mark it done.
 */
let ctx: TestContext;
let crew: Agent;
let scheduler: Agent;
let viewer: Agent;
let partner: Agent;
let otherInstaller: Agent;
let jobId: string;
let bookingId: string;
let photoId: string;
let pdfId: string;

const PDF = Buffer.from('%PDF-1.4\n1 0 obj << /Type /Catalog >> endobj\ntrailer << /Root 1 0 R >>\n%%EOF\n');
const ALL_TICKED = { pumpsPrimed: true, pumpsTested: true, heaterWorking: true, lightsWorking: true, noLeaks: true };

const record = (as: Agent = crew) => as.get(`/api/jobs/${jobId}/commissioning`);
const save = (body: object, as: Agent = crew) =>
  as.put(`/api/jobs/${jobId}/commissioning`).set('X-CSRF-Token', as.csrf).send(body);
const version = async () => (await record().expect(200)).body.version as number;
const bookingVersion = async () =>
  (await ctx.knex('bookings').where('id', bookingId).first('version')).version as number;
const finish = async (as: Agent = crew) =>
  as
    .post(`/api/bookings/${bookingId}/progress`)
    .set('X-CSRF-Token', as.csrf)
    .send({ action: 'finish', version: await bookingVersion() });
const stateOf = async () => (await ctx.knex('bookings').where('id', bookingId).first('state')).state as string;

beforeAll(async () => {
  ctx = await startTestApp();
  crew = await signIn(ctx, account('crew').email);
  scheduler = await signIn(ctx, account('scheduler').email);
  viewer = await signIn(ctx, account('viewer').email);
  partner = await signIn(ctx, account('partner', 'Brightspark Electrical').email);
  otherInstaller = await signIn(ctx, account('scheduler', 'Moorview Spas').email);
  jobId = await idOf(ctx.knex, 'jobs', { reference: 'TW-2402' });
  const booking = await ctx
    .knex('bookings as b')
    .join('stages as s', 's.id', 'b.stage_id')
    .join('resources as r', 'r.id', 'b.resource_id')
    .where({ 's.job_id': jobId, 's.kind': 'commission', 'r.name': 'Crew Heron' })
    .first('b.id', 'b.version');
  bookingId = String(booking.id);
  // The crew arrived (marking on site is only possible on the booking's day; the demo's is later).
  await ctx
    .knex('bookings')
    .where('id', bookingId)
    .update({ state: 'on_site', version: booking.version + 1 });
  const jpeg = await sharp({ create: { width: 640, height: 480, channels: 3, background: { r: 30, g: 110, b: 150 } } })
    .jpeg()
    .toBuffer();
  photoId = (
    await crew
      .post(`/api/jobs/${jobId}/files`)
      .set('X-CSRF-Token', crew.csrf)
      .attach('file', jpeg, { filename: 'running.jpg' })
      .expect(201)
  ).body.id;
  pdfId = (
    await crew
      .post(`/api/jobs/${jobId}/files`)
      .set('X-CSRF-Token', crew.csrf)
      .attach('file', PDF, { filename: 'manual.pdf' })
      .expect(201)
  ).body.id;
});
afterAll(async () => {
  await ctx.close();
});

describe('before anything is recorded', () => {
  it("shows an empty record with the firm's ranges, each with its source, and the cautions", async () => {
    const body = (await record().expect(200)).body;
    expect(body).toMatchObject({ version: 0, jobReference: 'TW-2402', canEdit: true, photos: [], completedAt: null });
    expect(body.targets.ph).toEqual({ min: 7.2, max: 7.8, unit: '', source: 'common practice, no source' });
    expect(body.gaps).toEqual(['Nothing is recorded yet: fill in the commissioning record.']);
    expect(body.cautions).toContain('Never run the pumps or the heater dry: fill above the intakes first.');
  });

  it('refuses Done with 409 problem+json saying the record is missing, and the booking stays on site', async () => {
    const res = await finish();
    expect(res.status).toBe(409);
    expect(res.headers['content-type']).toMatch(/application\/problem\+json/);
    expect(res.body.type).toBe(`${ctx.config.PUBLIC_URL}/problems/commissioning-incomplete`);
    expect(res.body.missing).toEqual(['Nothing is recorded yet: fill in the commissioning record.']);
    expect(res.body.detail).toBe(
      "'Commission' can't be marked done yet. Nothing is recorded yet: fill in the commissioning record.",
    );
    expect(await stateOf()).toBe('on_site');
  });
});

describe('an incomplete record', () => {
  it('is saved as the crew goes, and Done names each missing item', async () => {
    const saved = await save({
      version: 0,
      checks: { ...ALL_TICKED, lightsWorking: false },
      ph: 7.9,
      totalAlkalinityPpm: 100,
      sanitiserPpm: null,
      sanitiserKind: 'chlorine',
      notes: null,
      photoFileIds: [],
    }).expect(200);
    expect(saved.body.version).toBe(1);
    expect(saved.body.readings.map((r: { key: string; verdict: string }) => [r.key, r.verdict])).toEqual([
      ['ph', 'high'],
      ['totalAlkalinityPpm', 'in-range'],
      ['sanitiserPpm', 'missing'],
    ]);
    const res = await finish();
    expect(res.status).toBe(409);
    expect(res.body.missing).toEqual([
      'Not ticked: lights working.',
      "pH 7.9 is above the firm's range (7.2–7.8): bring it into range, or say in the notes what was done about it.",
      'No free chlorine reading.',
      'No photo: add at least one photo of the running unit.',
    ]);
    expect(await stateOf()).toBe('on_site');
  });

  it('blocks the office marking it done too (the rule is in the write path, not the crew page)', async () => {
    const res = await finish(scheduler);
    expect(res.status).toBe(409);
    expect(res.body.type).toBe(`${ctx.config.PUBLIC_URL}/problems/commissioning-incomplete`);
  });

  it("flags a reading against the firm's own range, set by the owner, and names that range's source", async () => {
    const owner = await signIn(ctx, account('owner').email);
    const loaded = async () => (await owner.get('/api/firm/settings').expect(200)).body.waterTargets;
    // Each save sends the targets as loaded, as the Firm page's card does.
    const setTargets = async (waterTargets: object, status: number, who: Agent = owner) =>
      who
        .put('/api/firm/settings')
        .set('X-CSRF-Token', who.csrf)
        .send({ waterTargets, waterTargetsWas: await loaded() })
        .expect(status);
    // Only the owner sets them; a range must be whole, in bounds, in order and say where it comes from.
    await setTargets({ totalAlkalinityPpm: { min: 110, max: 150, source: 'x' } }, 403, scheduler);
    for (const [bad, field, message] of [
      [{ ph: { min: 7.8, max: 7.2, source: 'x' } }, 'waterTargets.ph.max', 'must not be below the lowest value'],
      [{ ph: { min: -1, max: 7.2, source: 'x' } }, 'waterTargets.ph.min', 'must be between 0 and 14'],
      [
        { brominePpm: { min: 4, max: 6, source: ' ' } },
        'waterTargets.brominePpm.source',
        'must say where the figures come from, e.g. the unit maker’s manual',
      ],
      [
        { brominePpm: { min: 4, max: 6, source: 'manual\u0000' } },
        'waterTargets.brominePpm.source',
        'must not contain control characters',
      ],
      [{ copper: { min: 0, max: 1, source: 'x' } }, 'waterTargets.copper', 'is not a field this request takes'],
    ] as const) {
      const res = await setTargets(bad, 400);
      expect(res.body.errors, JSON.stringify(bad)).toEqual([{ field, message }]);
    }
    const saved = await setTargets(
      { totalAlkalinityPpm: { min: 110, max: 150, source: " the unit maker's manual " } },
      200,
    );
    expect(saved.body.waterTargets.totalAlkalinityPpm).toEqual({
      min: 110,
      max: 150,
      unit: 'ppm',
      source: "the unit maker's manual",
    });
    // The others stay at the usual figures.
    expect(saved.body.waterTargets.ph).toEqual(saved.body.waterTargetDefaults.ph);
    try {
      const body = (await record().expect(200)).body;
      expect(body.readings[1]).toMatchObject({
        key: 'totalAlkalinityPpm',
        value: 100,
        verdict: 'low',
        range: { min: 110, max: 150, source: "the unit maker's manual" },
      });
    } finally {
      await setTargets({}, 200);
    }
    expect((await record().expect(200)).body.readings[1]).toMatchObject({ verdict: 'in-range', range: { min: 80 } });
  });

  it("never overwrites water targets someone else saved meanwhile: two owners' saves from the same load, one wins", async () => {
    const owner = await signIn(ctx, account('owner').email);
    const put = (body: object) => owner.put('/api/firm/settings').set('X-CSRF-Token', owner.csrf).send(body);
    const loaded = (await owner.get('/api/firm/settings').expect(200)).body.waterTargets;
    const missing = await put({ waterTargets: {} }).expect(400);
    expect(missing.body.errors).toEqual([
      { field: 'waterTargetsWas', message: 'is required when changing the water targets: the targets you loaded' },
    ]);
    const [a, b] = await Promise.all([
      put({ waterTargets: { ph: { min: 7.0, max: 7.6, source: 'maker A' } }, waterTargetsWas: loaded }),
      put({ waterTargets: { brominePpm: { min: 3, max: 5, source: 'maker B' } }, waterTargetsWas: loaded }),
    ]);
    expect([a.status, b.status].sort()).toEqual([200, 409]);
    const [won, lost] = a.status === 200 ? [a, b] : [b, a];
    expect(lost.body).toMatchObject({
      code: 'stale-version',
      detail: 'Someone else changed the water targets since you loaded them: reload to see theirs.',
      current: { waterTargets: won.body.waterTargets },
    });
    // The winner's change stands; the loser's never landed.
    const now = (await owner.get('/api/firm/settings').expect(200)).body;
    expect(now.waterTargets).toEqual(won.body.waterTargets);
    expect([now.waterTargets.ph.source, now.waterTargets.brominePpm.source].sort()).toEqual(
      ['common practice, no source', won === a ? 'maker A' : 'maker B'].sort(),
    );
    await put({ waterTargets: {}, waterTargetsWas: now.waterTargets }).expect(200);
  });

  it('refuses a save based on an older version (409), keeping the newer one', async () => {
    const res = await save({ version: 0, checks: ALL_TICKED, photoFileIds: [] });
    expect(res.status).toBe(409);
    expect(res.body.code).toBe('stale-version');
    expect((await loadCommissioningRecord(ctx.knex, jobId))?.checks.lightsWorking).toBe(false);
  });

  it('two saves at once from the same version: one is kept, the other is told someone else saved (409)', async () => {
    const v = await version();
    const body = {
      version: v,
      checks: { ...ALL_TICKED, lightsWorking: false },
      ph: 7.9,
      totalAlkalinityPpm: 100,
      sanitiserKind: 'chlorine',
      photoFileIds: [],
    };
    // Hold the record's row so both saves are under way before either can write (polled, 10 s at most).
    const holder = await ctx.knex.transaction();
    await holder('commissioning_records').where('job_id', jobId).forUpdate().first('id');
    const both = Promise.all([save(body), save(body)]);
    await untilWaitingOnLocks(ctx.knex, 2);
    await holder.commit();
    const results = await both;
    expect(results.map((r) => r.status).sort()).toEqual([200, 409]);
    expect((await loadCommissioningRecord(ctx.knex, jobId))?.version).toBe(v + 1);
  });

  it("takes only photos of this job as its photos (a PDF or another job's file is 400 naming the field)", async () => {
    const v = await version();
    const res = await save({ version: v, checks: ALL_TICKED, photoFileIds: [pdfId] });
    expect(res.status).toBe(400);
    expect(res.body.errors).toEqual([{ field: 'photoFileIds', message: `${pdfId} is not a photo on this job` }]);
    const otherJobFile = await ctx
      .knex('job_files')
      .insert({
        job_id: await idOf(ctx.knex, 'jobs', { reference: 'TW-2405' }),
        object_key: 'jobs/x/other.jpg',
        name: 'other.jpg',
        content_type: 'image/jpeg',
        size_bytes: 10,
      })
      .returning('id');
    expect((await save({ version: v, checks: ALL_TICKED, photoFileIds: [String(otherJobFile[0].id)] })).status).toBe(
      400,
    );
  });

  it('refuses readings that are not readings (400 naming the field)', async () => {
    const v = await version();
    const res = await save({
      version: v,
      checks: ALL_TICKED,
      ph: 15,
      sanitiserKind: 'ozone',
      notes: 'ok\u0000',
      photoFileIds: [],
    });
    expect(res.status).toBe(400);
    expect(res.body.errors.map((e: { field: string }) => e.field).sort()).toEqual(['notes', 'ph', 'sanitiserKind']);
  });
});

describe('who reads and writes the record', () => {
  it('is 404 to another installer and 403 to a partner firm, for reads and writes', async () => {
    expect((await record(otherInstaller)).status).toBe(404);
    expect((await save({ version: 1, checks: ALL_TICKED }, otherInstaller)).status).toBe(404);
    expect((await record(partner)).status).toBe(403);
    expect((await save({ version: 1, checks: ALL_TICKED }, partner)).status).toBe(403);
    expect((await loadCommissioningRecord(ctx.knex, jobId))?.version).toBe(2);
  });

  it('lets the office viewer read it but not change it', async () => {
    expect((await record(viewer)).body.canEdit).toBe(false);
    expect((await save({ version: 1, checks: ALL_TICKED }, viewer)).status).toBe(403);
  });

  it('refuses crew who are not booked on the commissioning (403)', async () => {
    await ctx
      .knex('bookings')
      .where('id', bookingId)
      .update({ resource_id: await idOf(ctx.knex, 'resources', { name: 'Crew Kestrel' }) });
    try {
      // Connor still sees the job through his crew's other stages, but may not change its commissioning.
      expect((await record()).body.canEdit).toBe(false);
      const res = await save({ version: await version(), checks: ALL_TICKED, photoFileIds: [] });
      expect(res.status).toBe(403);
    } finally {
      await ctx
        .knex('bookings')
        .where('id', bookingId)
        .update({ resource_id: await idOf(ctx.knex, 'resources', { name: 'Crew Heron' }) });
    }
  });
});

describe('a complete record', () => {
  it('with an out-of-range reading explained in the notes and a photo, lets Done through', async () => {
    const saved = await save({
      version: await version(),
      checks: ALL_TICKED,
      ph: 7.9,
      totalAlkalinityPpm: 100,
      sanitiserPpm: 4,
      sanitiserKind: 'chlorine',
      notes: 'pH a little high after the fill: dosed pH minus, householder to re-test tomorrow.',
      photoFileIds: [photoId],
    }).expect(200);
    expect(saved.body.gaps).toEqual([]);
    expect(saved.body.completedAt).toBe(new Date(saved.body.updatedAt).toISOString());
    expect(saved.body.photos.map((p: { id: string }) => p.id)).toEqual([photoId]);
    expect(saved.body.readings[0].verdict).toBe('high');
    const res = await finish();
    expect(res.status).toBe(200);
    expect(res.body.state).toBe('done');
  });

  it('keeps the record when its photo is deleted from the job, which makes it incomplete again', async () => {
    await scheduler.delete(`/api/files/${photoId}`).set('X-CSRF-Token', scheduler.csrf).expect(204);
    const body = (await record().expect(200)).body;
    expect(body.photos).toEqual([]);
    expect(body.gaps).toEqual(['No photo: add at least one photo of the running unit.']);
  });
});

describe('the demo scenario', () => {
  it('has no commissioning or handover marked done, so it needs no record or certificate to stay consistent', async () => {
    const done = await ctx
      .knex('bookings as b')
      .join('stages as s', 's.id', 'b.stage_id')
      .whereIn('s.kind', ['commission', 'handover'])
      .where('b.state', 'done')
      .whereNot('b.id', bookingId)
      .count<{ count: string }[]>('* as count');
    expect(Number(done[0]!.count)).toBe(0);
  });
});
