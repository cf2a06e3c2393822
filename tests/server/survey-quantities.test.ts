import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { account, signIn, startTestApp, type Agent, type TestContext } from '../helpers/server.ts';

let ctx: TestContext;
let scheduler: Agent;
let owner: Agent;
/** A new slab job for a Brook 4 (2000 × 2000 × 850 mm, 300 kg dry, 1650 kg filled, 1250 L, one 16 A supply). */
let job: string;

const write = (agent: Agent, method: 'put' | 'post', path: string, body: object) =>
  agent[method](path).set('X-CSRF-Token', agent.csrf).send(body);

beforeAll(async () => {
  ctx = await startTestApp();
  scheduler = await signIn(ctx, account('scheduler').email);
  owner = await signIn(ctx, account('owner').email);
  const units = (await scheduler.get('/api/units').expect(200)).body.items as { id: string; model: string }[];
  const brook = units.find((u) => u.model === 'Brook 4');
  if (!brook) throw new Error('the demo catalogue has no Brook 4');
  const created = await write(scheduler, 'post', '/api/jobs', {
    reference: 'TW-3200',
    customerName: 'Ines Calloway',
    siteAddress: '4 Heron Row',
    siteTown: 'Otley',
    sitePostcode: 'LS21 3AB',
    installationType: 'slab',
    unitId: brook.id,
  }).expect(201);
  job = String(created.body.id);
});
afterAll(async () => {
  await ctx.close();
});

/** A clay garden up five steps, a 60 A fuse already carrying an EV charger and an electric shower, a TT earth, a slow tap. */
const SURVEY = {
  accessWidthMm: 1200,
  accessHeightMm: null,
  steps: 5,
  gates: 1,
  overheadObstructions: false,
  groundType: 'clay',
  mainFuseAmps: 60,
  evChargerAmps: 32,
  electricShowerAmps: 45,
  heatPumpAmps: null,
  otherLargeLoadAmps: null,
  earthingArrangement: 'TT',
  hoseFlowLitresPerMinute: 12.5,
};

describe('the survey fields behind the quantities', () => {
  it('are saved and read back', async () => {
    const saved = await write(scheduler, 'put', `/api/jobs/${job}/survey`, { version: 0, survey: SURVEY }).expect(200);
    expect(saved.body).toMatchObject({
      version: 1,
      steps: 5,
      groundType: 'clay',
      evChargerAmps: 32,
      electricShowerAmps: 45,
      heatPumpAmps: null,
      otherLargeLoadAmps: null,
      otherLargeLoadNotes: null,
      earthingArrangement: 'TT',
      hoseFlowLitresPerMinute: 12.5,
    });
    const read = await scheduler.get(`/api/jobs/${job}/survey`).expect(200);
    expect(read.body).toMatchObject({
      earthingArrangement: 'TT',
      hoseFlowLitresPerMinute: 12.5,
      electricShowerAmps: 45,
    });
  });

  it('reach the figures through GET /api/jobs/:id/quantities', async () => {
    const q = (await scheduler.get(`/api/jobs/${job}/quantities`).expect(200)).body.quantities;
    // Supply: 16 A new + 32 A EV charger + 45 A shower = 93 A ≥ 60 A (93 ÷ 60 = 1.55); TT earth recorded for the electrician.
    expect(q.supply.inputs.existingLoads).toEqual([
      { name: 'EV charger', amps: 32 },
      { name: 'electric shower', amps: 45 },
    ]);
    expect(q.supply.result).toMatchObject({
      newAmps: 16,
      existingAmps: 77,
      totalAmps: 93,
      shareOfFuse: 1.55,
      verdict: 'exceeds',
      earthing: 'TT',
      electricianToLook: true,
    });
    expect(q.supply.result.reasons.join(' ')).toMatch(/earth electrode/);
    // Fill at the measured 12.5 L/min: 1250 ÷ 12.5 = 100 min → 105 min.
    expect(q.fill.inputs).toEqual({ litres: 1250, flowLitresPerMinute: 12.5, flowFrom: 'survey' });
    expect(q.fill.result.minutes).toBe(105);
    // Heat-up (physics; source: specific heat of water 4.186 kJ/(kg·K)): 1250 × 4.186 × (38 − 10) = 146 510 kJ;
    // ÷ 3 kW (the default heater) = 48 837 s = 13.57 h = 813.9 min → 825 min planned (quarter hours).
    expect(q.heatUp.result).toMatchObject({ energyKJ: 146510, seconds: 48837, hours: 13.57, minutes: 825 });
    // Slab dig (2000 + 300)² = 5.29 m² × 0.25 m = 1.323 m³. Clay digs at 1.5 × 0.75 = 1.125 m³/h:
    // 1.323 ÷ 1.125 = 1.176 h → 90 min (loam would be 0.882 h → 60 min).
    expect(q.excavationTime.inputs).toMatchObject({ groundType: 'clay', groundRateFactor: 0.75 });
    expect(q.excavationTime.result).toEqual({ rateM3PerHour: 1.125, hours: 1.176, minutes: 90 });
    // Five steps: 30 + 5 × 5 = 55 min, 2 + 2 people and boards (on its side: 850 + 100 = 950 ≤ 1200 mm).
    expect(q.access.result.way).toBe('on_side');
    expect(q.move.result).toEqual({ people: 4, minutes: 55, boards: true });
    // Concrete 5.29 × 0.15 × 1.05 = 0.833 m³ → 1 m³ ordered; sub-base 5.29 × 0.1 × 2.1 = 1.111 t → 1.5 t.
    expect(q.concrete.result).toEqual({ netVolumeM3: 0.794, withWasteM3: 0.833, orderVolumeM3: 1 });
    expect(q.subBase.result).toEqual({ volumeM3: 0.529, tonnes: 1.111, orderTonnes: 1.5 });
    // Spoil 1.323 × 1.25 = 1.654 m³ loose × 1.8 = 2.977 t: one skip either way.
    expect(q.spoil.result).toMatchObject({ looseVolumeM3: 1.654, weightT: 2.977, skips: 1 });
  });

  it("follow the firm's own new figures once saved", async () => {
    const current = (await owner.get('/api/firm/settings').expect(200)).body.version;
    await write(owner, 'put', '/api/firm/settings', {
      version: current,
      quantities: { groundRateFactors: { marsh: 1 } },
    }).expect(400);
    await write(owner, 'put', '/api/firm/settings', {
      version: current,
      quantities: { blockLaying: 'sideways' },
    }).expect(400);
    const saved = await write(owner, 'put', '/api/firm/settings', {
      version: current,
      quantities: { groundRateFactors: { clay: 0.5 }, heaterKw: 6 },
    }).expect(200);
    expect(saved.body.quantities.groundRateFactors).toMatchObject({ clay: 0.5, loam: 1 });
    const q = (await scheduler.get(`/api/jobs/${job}/quantities`).expect(200)).body.quantities;
    // Clay × 0.5: 1.323 ÷ 0.75 = 1.764 h → 120 min. Heater 6 kW: 146 510 ÷ 6 = 24 418 s = 6.78 h.
    expect(q.excavationTime.result.minutes).toBe(120);
    expect(q.heatUp.result.hours).toBe(6.78);
    await write(owner, 'put', '/api/firm/settings', { version: saved.body.version, quantities: {} }).expect(200);
  });

  it('are refused with the field named when they make no sense', async () => {
    const bad = {
      version: 1,
      survey: { ...SURVEY, earthingArrangement: 'PME', evChargerAmps: 0, hoseFlowLitresPerMinute: -2 },
    };
    const res = await write(scheduler, 'put', `/api/jobs/${job}/survey`, bad).expect(400);
    expect(res.headers['content-type']).toMatch(/application\/problem\+json/);
    const fields = Object.fromEntries(
      (res.body.errors as { field: string; message: string }[]).map((e) => [e.field, e.message]),
    );
    expect(fields).toMatchObject({
      'survey.earthingArrangement': 'pick an earthing arrangement',
      'survey.evChargerAmps': 'must be more than 0',
      'survey.hoseFlowLitresPerMinute': 'must be more than 0',
    });
  });
});

describe('planning a dug job: the spoil stage', () => {
  it('books the skips or grab lorry after the excavation, with the count the quantities give in its note', async () => {
    const units = (await scheduler.get('/api/units').expect(200)).body.items as { id: string; model: string }[];
    const created = await write(scheduler, 'post', '/api/jobs', {
      reference: 'TW-3201',
      customerName: 'Ansel Whitby',
      siteAddress: '9 Mill Fold',
      siteTown: 'Otley',
      sitePostcode: 'LS21 3AD',
      installationType: 'in_ground',
      unitId: units.find((u) => u.model === 'Brook 4')!.id,
    }).expect(201);
    const dug = String(created.body.id);
    await write(scheduler, 'put', `/api/jobs/${dug}/survey`, { version: 0, survey: SURVEY }).expect(200);
    // In-ground dig 12.5874 m² × (850 + 150 + 100) mm = 13.846 m³; × 1.25 = 17.308 m³ loose; × 1.8 t/m³ = 31.154 t.
    // Skips: ⌈17.308 ÷ 4.587⌉ = 4 by volume, ⌈31.154 ÷ 6⌉ = 6 by weight; grab lorry: ⌈17.308 ÷ 10⌉ = 2, ⌈31.154 ÷ 16⌉ = 2.
    await write(scheduler, 'post', `/api/jobs/${dug}/plan`, {}).expect(201);
    const stages = await ctx.knex('stages').where('job_id', dug).orderBy('sequence');
    expect(stages.map((s) => s.kind).slice(0, 4)).toEqual(['survey', 'excavation', 'spoil_away', 'base_pour']);
    const away = stages.find((s) => s.kind === 'spoil_away');
    expect(away).toMatchObject({
      name: 'Spoil away (skips or grab lorry)',
      requirements: [{ kind: 'spoil_removal', count: 1 }],
      notice: { workingDays: 2, countedFrom: 'now', resourceKind: 'spoil_removal' },
      notes:
        '6 skips by weight or 2 grab-lorry loads by weight (17.308 m³ loose, 31.154 t of wet soil at 1.8 t/m³: common practice, no source).',
    });
    // After the dig is done, the same working day allowed.
    const dig = stages.find((s) => s.kind === 'excavation');
    const into = await ctx
      .knex('dependencies')
      .where('to_stage_id', away.id)
      .select('from_stage_id', 'type', 'lag_amount', 'lag_unit', 'waits_for_cure');
    expect(into).toEqual([
      { fromStageId: dig.id, type: 'FS', lagAmount: 0, lagUnit: 'working_hours', waitsForCure: false },
    ]);
    // The job page shows the note and the spoil cautions.
    const page = (await scheduler.get(`/api/jobs/${dug}/stages`).expect(200)).body.items.find(
      (s: { kind: string }) => s.kind === 'spoil_away',
    );
    expect(page.notes).toBe(away.notes);
    expect(page.cautions.join(' ')).toMatch(/overload a skip/);
  });
});
