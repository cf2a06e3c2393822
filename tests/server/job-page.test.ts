import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { account, idOf, signIn, startTestApp, type Agent, type TestContext } from '../helpers/server.ts';
import { addStage } from '../helpers/flows.ts';

/*
 * The job page's reads, for the office and for a crew member booked on the job. TW-8802 is added:
 * Connor Reid (the demo crew member) is booked on its survey; it has the Aurora 6 unit and a survey.
 */
let ctx: TestContext;
let crew: Agent;
let scheduler: Agent;
let jobId: string;

beforeAll(async () => {
  ctx = await startTestApp();
  crew = await signIn(ctx, account('crew').email);
  scheduler = await signIn(ctx, account('scheduler').email);
  const tideway = await idOf(ctx.knex, 'firms', { name: 'Tideway Hot Tubs' });
  const [job] = await ctx
    .knex('jobs')
    .insert({
      firm_id: tideway,
      reference: 'TW-8802',
      customer_name: 'Owen Pike',
      customer_phone: '07700 900802',
      customer_email: 'owen@home.example',
      site_address: '4 Ash Grove',
      site_town: 'Horsforth',
      site_postcode: 'LS18 4AA',
      installation_type: 'in_ground',
      status: 'planned',
      unit_id: await idOf(ctx.knex, 'units', { model: 'Aurora 6' }),
    })
    .returning('id');
  jobId = String(job.id);
  const stage = (kind: string, name: string, sequence: number) =>
    addStage(ctx.knex, jobId, { kind, name, minutes: 120, needs: { installer: 1 } }, sequence);
  const survey = await stage('survey', 'Site survey', 1);
  const firstFix = await stage('electrical_first_fix', 'Supply cable first fix', 2);
  const lift = await stage('lift', 'Crane lift into pit', 3);
  await ctx.knex('dependencies').insert([
    { from_stage_id: survey, to_stage_id: firstFix, type: 'FS', lag_amount: 0, lag_unit: 'working_days' },
    { from_stage_id: firstFix, to_stage_id: lift, type: 'FS', lag_amount: 1, lag_unit: 'elapsed_days' },
  ]);
  await ctx.knex('bookings').insert({
    stage_id: survey,
    resource_id: await idOf(ctx.knex, 'resources', { name: 'Connor Reid' }),
    starts_at: '2026-06-03T07:00:00Z',
    ends_at: '2026-06-03T09:00:00Z',
    state: 'confirmed',
  });
  await ctx.knex('surveys').insert({
    job_id: jobId,
    access_width_mm: 1200,
    steps: 0,
    gates: 0,
    overhead_obstructions: false,
    ground_type: 'clay',
    surveyed_at: '2026-05-28T09:00:00Z',
  });
});
afterAll(async () => {
  await ctx.close();
});

describe('the job page for a crew member booked on the job', () => {
  it('reads the job, its stages, its quantities and its files without a refusal', async () => {
    const job = await crew.get(`/api/jobs/${jobId}`).expect(200);
    expect(job.body).toMatchObject({
      reference: 'TW-8802',
      unitName: 'Aurora 6',
      unitMaker: 'Harbourline Works',
      surveyedAt: '2026-05-28T09:00:00.000Z',
    });
    // The read policy: no householder e-mail or phone on the job page for crew.
    expect(job.body).toMatchObject({ customerEmail: null, customerPhone: null });
    await crew.get(`/api/jobs/${jobId}/stages`).expect(200);
    await crew.get(`/api/jobs/${jobId}/files`).expect(200);
    // The job's own unit is read through the job, so the quantities are worked out (no "choose the unit").
    const quantities = await crew.get(`/api/jobs/${jobId}/quantities`).expect(200);
    expect(quantities.body.unit).toMatchObject({ model: 'Aurora 6', lengthMm: 2200, widthMm: 2200 });
    expect(quantities.body.surveyed).toBe(true);
  });
});

describe('the job page for the office', () => {
  it('has the unit and the customer e-mail for the header, and no survey date before a survey', async () => {
    const job = await scheduler.get(`/api/jobs/${jobId}`).expect(200);
    expect(job.body).toMatchObject({
      unitName: 'Aurora 6',
      customerEmail: 'owen@home.example',
      customerPhone: '07700 900802',
    });
    const tideway = await idOf(ctx.knex, 'firms', { name: 'Tideway Hot Tubs' });
    const [fresh] = await ctx
      .knex('jobs')
      .insert({
        firm_id: tideway,
        reference: 'TW-8803',
        customer_name: 'Ruth Lane',
        site_address: '1 Elm Row',
        site_town: 'Otley',
        site_postcode: 'LS21 1AA',
        installation_type: 'slab',
        status: 'planned',
      })
      .returning('id');
    const unsurveyed = await scheduler.get(`/api/jobs/${fresh.id}`).expect(200);
    // Planned, yet never surveyed: the step bar must not tick "Surveyed".
    expect(unsurveyed.body).toMatchObject({ status: 'planned', surveyedAt: null, unitName: null });
  });

  it("names each stage's predecessors as those stages are named on the job", async () => {
    const { items } = (await scheduler.get(`/api/jobs/${jobId}/stages`).expect(200)).body as {
      items: { name: string; after: { name: string; lagAmount: number }[] }[];
    };
    const lift = items.find((s) => s.name === 'Crane lift into pit')!;
    expect(lift.after).toMatchObject([{ name: 'Supply cable first fix', lagAmount: 1 }]);
    expect(items.find((s) => s.name === 'Supply cable first fix')!.after).toMatchObject([{ name: 'Site survey' }]);
  });
});

describe('the next job reference', () => {
  it("suggests the firm's highest reference of the prefix + 1, keeping the digits' width", async () => {
    const highest = (
      await ctx
        .knex('jobs')
        .where('firm_id', await idOf(ctx.knex, 'firms', { name: 'Tideway Hot Tubs' }))
        .whereRaw(`reference ~ '^TW-[0-9]+$'`)
        .select('reference')
    )
      .map((r) => Number(r.reference.slice(3)))
      .sort((a, b) => b - a)[0]!;
    expect(highest).toBe(8803); // the jobs added above are the highest
    const next = await scheduler.get('/api/job-references/next').expect(200);
    expect(next.body).toEqual({ prefix: 'TW-', nextReference: 'TW-8804' });
    const other = await scheduler.get('/api/job-references/next').query({ prefix: 'SPA/' }).expect(200);
    expect(other.body).toEqual({ prefix: 'SPA/', nextReference: 'SPA/0001' });
    const bad = await scheduler.get('/api/job-references/next').query({ prefix: 'TW-7' }).expect(400);
    expect(bad.body.errors).toEqual([{ field: 'query.prefix', message: 'must not end in a digit' }]);
  });

  it('answers a reference already taken with 409 naming the next free one, on create and on edit', async () => {
    const body = {
      reference: 'TW-8802',
      customerName: 'Ada Marsh',
      siteAddress: '2 Mill Lane',
      siteTown: 'Ilkley',
      sitePostcode: 'LS29 8AA',
      installationType: 'slab',
    };
    const taken = await scheduler.post('/api/jobs').set('X-CSRF-Token', scheduler.csrf).send(body).expect(409);
    expect(taken.headers['content-type']).toContain('application/problem+json');
    expect(taken.body).toMatchObject({
      code: 'duplicate-reference',
      nextReference: 'TW-8804',
      detail: 'TW-8802 is already the reference of another job (Owen Pike, Horsforth). TW-8804 is the next free one.',
      errors: [{ field: 'reference', message: 'is already used by another job; TW-8804 is free' }],
    });
    const job = (await scheduler.get(`/api/jobs/${jobId}`).expect(200)).body;
    const edit = await scheduler
      .patch(`/api/jobs/${jobId}`)
      .set('X-CSRF-Token', scheduler.csrf)
      .send({ version: job.version, reference: 'TW-8803' })
      .expect(409);
    expect(edit.body.errors).toEqual([
      { field: 'reference', message: 'is already used by another job; TW-8804 is free' },
    ]);
  });

  it('is for those who create jobs', async () => {
    await crew.get('/api/job-references/next').expect(403);
  });
});

describe('editing a job', () => {
  const edit = async (body: Record<string, unknown>, status: number) =>
    scheduler.patch(`/api/jobs/${jobId}`).set('X-CSRF-Token', scheduler.csrf).send(body).expect(status);
  const current = async () => (await scheduler.get(`/api/jobs/${jobId}`).expect(200)).body;

  it('clears an optional field sent as null and keeps one left out', async () => {
    const job = await current();
    expect(job.customerPhone).toBe('07700 900802');
    const saved = (await edit({ version: job.version, customerPhone: null, promisedTo: null }, 200)).body;
    expect(saved.customerPhone ?? null).toBeNull();
    expect(saved.customerEmail).toBe('owen@home.example');
    const row = await ctx.knex('jobs').where('id', jobId).first('customer_phone', 'customer_email', 'version');
    expect(row).toEqual({ customerPhone: null, customerEmail: 'owen@home.example', version: job.version + 1 });
  });

  it('refuses a field it does not take, naming it, and a change that names no field, changing nothing', async () => {
    const job = await current();
    const misspelt = await edit({ version: job.version, customerPhon: '07700 900999' }, 400);
    expect(misspelt.headers['content-type']).toContain('application/problem+json');
    expect(misspelt.body.errors).toEqual([{ field: 'customerPhon', message: 'is not a field this request takes' }]);
    const empty = await edit({ version: job.version }, 400);
    expect(empty.body.errors).toEqual([
      { field: '(body)', message: 'names nothing to change: send at least one field with the version' },
    ]);
    expect((await current()).version).toBe(job.version);
  });

  it("won't clear a field every job must have", async () => {
    const job = await current();
    const bad = await edit({ version: job.version, customerName: null }, 400);
    expect(bad.body.errors).toEqual([{ field: 'customerName', message: 'must be text' }]);
  });
});
