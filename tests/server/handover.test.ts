import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { PDFParse } from 'pdf-parse';
import { account, signIn, startTestApp, type Agent, type TestContext } from '../helpers/server.ts';
import { ALL_TICKED, makeHandoverJob, signaturePng } from '../helpers/handover.ts';
import { S3ObjectStore } from '../../server/storage/object-store.ts';
import { composeMessage, type OutgoingMail } from '../../server/mail/messages.ts';

/*
 * The handover with the householder. The test's today is Mon 1 Jun 2026 (07:00 UTC, 08:00 in
 * London); each job's handover is booked on Connor Reid's own row that afternoon, an hour of its own.
 */
let ctx: TestContext;
let store: S3ObjectStore;
let crew: Agent;
let office: Agent;
let signature: string;

beforeAll(async () => {
  ctx = await startTestApp();
  await ctx.knex.raw('TRUNCATE outbox RESTART IDENTITY');
  store = new S3ObjectStore(ctx.config);
  crew = await signIn(ctx, account('crew').email);
  office = await signIn(ctx, account('owner').email);
  signature = await signaturePng();
}, 60_000);
afterAll(async () => {
  store?.close();
  await ctx?.close();
});

const sign = (agent: Agent, jobId: string, body: Record<string, unknown>) =>
  agent.post(`/api/jobs/${jobId}/handover`).set('X-CSRF-Token', agent.csrf).send(body);
const good = () => ({ checklist: { ...ALL_TICKED }, householderName: 'Ruth Calder', signature });

async function pdfText(buffer: Buffer): Promise<string> {
  const parser = new PDFParse({ data: buffer });
  try {
    return (await parser.getText()).text;
  } finally {
    await parser.destroy();
  }
}

describe('signing the handover', () => {
  it('refuses a handover without a signature, with a blank one, or with a checklist item left out', async () => {
    const job = await makeHandoverJob(ctx.knex, { reference: 'HO-101', startsAt: '2026-06-01T16:00:00Z' });
    const { signature: _none, ...unsigned } = good();
    const missing = await sign(crew, job.jobId, unsigned).expect(400);
    expect(missing.body.errors).toEqual([expect.objectContaining({ field: 'signature' })]);

    const blank = await sign(crew, job.jobId, { ...good(), signature: await signaturePng(true) }).expect(400);
    expect(blank.body.errors).toEqual([{ field: 'signature', message: 'is blank: ask the householder to sign' }]);

    const notPng = await sign(crew, job.jobId, {
      ...good(),
      signature: `data:image/png;base64,${Buffer.from('%PDF-1.4 not a picture').toString('base64')}`,
    }).expect(400);
    expect(notPng.body.errors[0].field).toBe('signature');

    const { chemicals: _skipped, ...partly } = ALL_TICKED;
    const unticked = await sign(crew, job.jobId, { ...good(), checklist: partly }).expect(400);
    expect(unticked.body.errors).toEqual([
      { field: 'checklist.chemicals', message: 'must be gone through with the householder' },
    ]);
    const untrue = await sign(crew, job.jobId, { ...good(), checklist: { ...ALL_TICKED, cover: false } }).expect(400);
    expect(untrue.body.errors).toEqual([
      { field: 'checklist.cover', message: 'must be gone through with the householder' },
    ]);

    const nul = await sign(crew, job.jobId, { ...good(), householderName: 'Ruth\u0000Calder' }).expect(400);
    expect(nul.body.errors[0].field).toBe('householderName');
    // Nothing was kept by any of the refusals.
    expect(await ctx.knex('handovers').where('job_id', job.jobId).first()).toBeUndefined();
    expect(await ctx.knex('bookings').where('id', job.handoverBookingId).first('state')).toEqual({
      state: 'confirmed',
    });
  });

  it('keeps the signature, marks the handover stage done through the write path and queues the pack e-mail exactly once on a double submit', async () => {
    const job = await makeHandoverJob(ctx.knex, { reference: 'HO-102', startsAt: '2026-06-01T10:00:00Z', store });
    // The pool opens connections on demand (3 s to connect, server/db.ts); on a loaded machine a cold
    // one can time out, which is not what this test is about: a few are opened first and kept idle.
    await Promise.all([1, 2, 3, 4].map(() => ctx.knex.raw('SELECT 1')));
    const [a, b] = await Promise.all([sign(crew, job.jobId, good()), sign(crew, job.jobId, good())]);
    expect([a.status, b.status].sort()).toEqual([201, 409]);
    const refused = a.status === 409 ? a : b;
    expect(refused.body.code).toBe('already-handed-over');

    const handover = await ctx.knex('handovers').where('job_id', job.jobId).first();
    expect(handover).toMatchObject({
      householderName: 'Ruth Calder',
      checklist: ALL_TICKED,
      signedAt: new Date('2026-06-01T07:00:00Z'),
    });
    const outbox = await ctx
      .knex('outbox')
      .where('kind', 'handover_pack')
      .whereRaw(`payload->>'jobId' = ?`, [job.jobId]);
    expect(outbox).toHaveLength(1);
    expect(String(handover.packOutboxId)).toBe(String(outbox[0].id));
    // Crew progress through the guarded writer: arrived, then done, each audited as a booking change.
    expect(await ctx.knex('bookings').where('id', job.handoverBookingId).first('state', 'version')).toEqual({
      state: 'done',
      version: 3,
    });
    const audits = await ctx
      .knex('audit_log')
      .where({ entity: 'booking', entity_id: job.handoverBookingId })
      .orderBy('id')
      .pluck('after');
    expect(audits.map((x: { action: string }) => x.action)).toEqual(['arrive', 'finish']);
    expect(await ctx.knex('jobs').where('id', job.jobId).first('status')).toEqual({ status: 'handed_over' });
    const files = await ctx.knex('job_files').where('job_id', job.jobId).orderBy('id').pluck('name');
    expect(files).toEqual(['EIC-7731.pdf', 'Handover signature HO-102.png', 'Handover pack HO-102.pdf']);

    // A later submit is refused the same way, and still nothing more is queued.
    await sign(office, job.jobId, good()).expect(409);
    expect(
      await ctx.knex('outbox').where('kind', 'handover_pack').whereRaw(`payload->>'jobId' = ?`, [job.jobId]),
    ).toHaveLength(1);
  });

  it('e-mails a pack whose text carries the commissioning readings with their ranges, the certificate and the water-care cautions', async () => {
    const job = await makeHandoverJob(ctx.knex, { reference: 'HO-103', startsAt: '2026-06-01T11:00:00Z', store });
    await sign(crew, job.jobId, { ...good(), householderName: 'Ruth Calder-Łukasiewicz' }).expect(201);
    const row = await ctx
      .knex('outbox')
      .where('kind', 'handover_pack')
      .whereRaw(`payload->>'jobId' = ?`, [job.jobId])
      .first();
    const mail = (await composeMessage(
      { knex: ctx.knex, config: ctx.config, store },
      row.kind,
      row.payload,
    )) as OutgoingMail;
    expect(mail.to).toEqual(['ruth@calder.example']);
    expect(mail.subject).toBe('Your hot tub handover pack (HO-103)');
    expect(mail.attachments?.map((x) => [x.filename, x.contentType])).toEqual([
      ['Handover pack HO-103.pdf', 'application/pdf'],
      ['EIC-7731.pdf', 'application/pdf'],
    ]);

    const text = (await pdfText(mail.attachments![0]!.content)).replace(/\s+/g, ' ');
    // The record's readings against the default ranges (shared/water-balance.ts, common practice, no source).
    expect(text).toContain('pH 7.4 7.2–7.8 In range');
    expect(text).toContain('Total alkalinity 100 ppm 80–120 ppm In range');
    expect(text).toContain('Free chlorine 3.5 ppm 3–5 ppm In range');
    expect(text).toContain('Done: No leaks at unions, valves and the cabinet');
    expect(text).toContain('Electrical installation certificate "EIC-7731.pdf", from Brightspark Electrical');
    expect(text).toContain('Store oxidisers apart from acids');
    expect(text).toContain('Dissolve sanitiser in warm water');
    expect(text).toContain('read the safety data sheet');
    expect(text).toContain('Keep chemicals locked away from children');
    expect(text).toContain('Lock the cover straps every time the spa is left');
    expect(text).toContain('Test the RCD as often as its maker says');
    expect(text).toContain("Register the spa's warranty");
    expect(text).toContain('Tideway Hot Tubs: 0113 496 0001');
    expect(text).toContain('Keep the water at or below 40 °C');
    // Latin-1 and Latin Extended-A letters both print (two subsets of the embedded font).
    expect(text).toContain('Ruth Calder-Łukasiewicz signed');
    expect(text).toContain('Handed over: Monday 1 June 2026 by Connor Reid');
    expect(text).toContain('September 2026 (HO-103-S1)');
  });

  it('says plainly in the pack when the certificate is not on file, and the gate refuses the handover without the certificate or a waiver', async () => {
    const job = await makeHandoverJob(ctx.knex, { reference: 'HO-104', startsAt: '2026-06-01T12:00:00Z' });
    const refused = await sign(crew, job.jobId, good()).expect(409);
    expect(refused.body.type).toMatch(/\/certificate-missing$/);
    expect(await ctx.knex('handovers').where('job_id', job.jobId).first()).toBeUndefined();
    expect(await ctx.knex('job_files').where('job_id', job.jobId).count('* as n')).toEqual([{ n: '0' }]);

    await ctx
      .knex('jobs')
      .where('id', job.jobId)
      .update({ certificate_waiver_reason: 'Electrician re-testing on Friday' });
    await sign(crew, job.jobId, good()).expect(201);
    const row = await ctx
      .knex('outbox')
      .where('kind', 'handover_pack')
      .whereRaw(`payload->>'jobId' = ?`, [job.jobId])
      .first();
    const mail = (await composeMessage(
      { knex: ctx.knex, config: ctx.config, store },
      row.kind,
      row.payload,
    )) as OutgoingMail;
    expect(mail.attachments).toHaveLength(1);
    const text = (await pdfText(mail.attachments![0]!.content)).replace(/\s+/g, ' ');
    expect(text).toContain('The electrical certificate was not on file at handover (Electrician re-testing on Friday)');
  });

  it('is not signed before the commissioning is done: the page says so first, and the gate refuses it', async () => {
    const job = await makeHandoverJob(ctx.knex, {
      reference: 'HO-105',
      startsAt: '2026-06-01T15:00:00Z',
      store,
      commissionDone: false,
    });
    const page = (await crew.get(`/api/jobs/${job.jobId}/handover`).expect(200)).body;
    expect(page.notReady).toEqual([
      'Commissioning is not marked done yet: the spa is handed over working, so finish the commissioning record and mark Commission done first.',
    ]);
    const refused = await sign(crew, job.jobId, good()).expect(409);
    expect(refused.body.type).toMatch(/\/commissioning-not-done$/);
    expect(await ctx.knex('handovers').where('job_id', job.jobId).first()).toBeUndefined();
    expect(await ctx.knex('bookings').where('id', job.handoverBookingId).first('state')).toEqual({
      state: 'confirmed',
    });

    // Commissioning marked done (its record is complete): the page has nothing left to ask, and it signs.
    await ctx.knex('bookings').where('stage_id', job.stage.commission).update({ state: 'done' });
    expect((await crew.get(`/api/jobs/${job.jobId}/handover`).expect(200)).body.notReady).toEqual([]);
    await sign(crew, job.jobId, good()).expect(201);
  });
});

describe('service visits from the handover', () => {
  it("plans the firm's default visits (3 months, then yearly, 2 ahead) as service jobs due on hand-worked dates, and tells the householder", async () => {
    const job = await makeHandoverJob(ctx.knex, { reference: 'HO-201', startsAt: '2026-06-01T13:00:00Z', store });
    const res = await sign(crew, job.jobId, good()).expect(201);
    // Handed over Mon 1 Jun 2026: + 3 months = 1 Sep 2026; + 12 more = 1 Sep 2027. Windows ± 14 days.
    expect(res.body.serviceVisits.map((v: { reference: string; dueOn: string }) => [v.reference, v.dueOn])).toEqual([
      ['HO-201-S1', '2026-09-01'],
      ['HO-201-S2', '2027-09-01'],
    ]);
    const jobs = await ctx
      .knex('jobs')
      .where('parent_job_id', job.jobId)
      .orderBy('service_due_on')
      .select(
        'reference',
        'kind',
        'status',
        'service_due_on',
        'promised_from',
        'promised_to',
        'customer_name',
        'site_postcode',
      );
    expect(jobs).toEqual([
      {
        reference: 'HO-201-S1',
        kind: 'service',
        status: 'planned',
        serviceDueOn: '2026-09-01',
        promisedFrom: '2026-08-18',
        promisedTo: '2026-09-15',
        customerName: 'Ruth Calder',
        sitePostcode: 'LS21 1AA',
      },
      {
        reference: 'HO-201-S2',
        kind: 'service',
        status: 'planned',
        serviceDueOn: '2027-09-01',
        promisedFrom: '2027-08-18',
        promisedTo: '2027-09-15',
        customerName: 'Ruth Calder',
        sitePostcode: 'LS21 1AA',
      },
    ]);
    const stages = await ctx
      .knex('stages')
      .whereIn('job_id', ctx.knex('jobs').where('parent_job_id', job.jobId).select('id'))
      .select('kind', 'duration_minutes', 'requirements');
    expect(stages).toEqual([
      { kind: 'service_visit', durationMinutes: 120, requirements: [{ kind: 'install_crew', count: 1 }] },
      { kind: 'service_visit', durationMinutes: 120, requirements: [{ kind: 'install_crew', count: 1 }] },
    ]);
    const notice = await ctx
      .knex('outbox')
      .where('kind', 'service_plan_notice')
      .whereRaw(`payload->>'jobId' = ?`, [job.jobId])
      .first();
    const mail = (await composeMessage(
      { knex: ctx.knex, config: ctx.config, store },
      notice.kind,
      notice.payload,
    )) as OutgoingMail;
    expect(mail.to).toEqual(['ruth@calder.example']);
    expect(mail.text).toContain('September 2026 (HO-201-S1)\nSeptember 2027 (HO-201-S2)');
  });

  it("follows the firm's own plan, and shows a visit in the board's tray only as its window comes near", async () => {
    await office
      .put('/api/firm/service-plan')
      .set('X-CSRF-Token', office.csrf)
      .send({ version: 0, firstAfterMonths: 6, everyMonths: 12, visitsAhead: 3 })
      .expect(200);
    const job = await makeHandoverJob(ctx.knex, { reference: 'HO-202', startsAt: '2026-06-01T14:00:00Z', store });
    const res = await sign(crew, job.jobId, good()).expect(201);
    // 1 Jun 2026 + 6 months = 1 Dec 2026; then 1 Dec 2027 and 1 Dec 2028.
    expect(res.body.serviceVisits.map((v: { dueOn: string }) => v.dueOn)).toEqual([
      '2026-12-01',
      '2027-12-01',
      '2028-12-01',
    ]);
    await office
      .put('/api/firm/service-plan')
      .set('X-CSRF-Token', office.csrf)
      .send({ version: 1, firstAfterMonths: 3, everyMonths: 12, visitsAhead: 2 })
      .expect(200);

    const trayRefs = async (from: string, to: string) => {
      const board = await office.get('/api/board').query({ from, to }).expect(200);
      return (board.body.jobs as { reference: string }[])
        .map((j) => j.reference)
        .filter((r) => r.startsWith('HO-202-'));
    };
    // The board of the week of 1 Jun: the first visit's window (from 17 Nov) is months away.
    expect(await trayRefs('2026-06-01T00:00:00Z', '2026-06-08T00:00:00Z')).toEqual([]);
    // The board of the week of 19 Oct: 17 Nov lies within 28 days of its end (26 Oct).
    expect(await trayRefs('2026-10-19T00:00:00Z', '2026-10-26T00:00:00Z')).toEqual(['HO-202-S1']);
  });

  it('lets only the owner change the plan, within bounds', async () => {
    const scheduler = await signIn(ctx, account('scheduler').email);
    await scheduler
      .put('/api/firm/service-plan')
      .set('X-CSRF-Token', scheduler.csrf)
      .send({ version: 2, firstAfterMonths: 3, everyMonths: 12, visitsAhead: 2 })
      .expect(403);
    const bad = await office
      .put('/api/firm/service-plan')
      .set('X-CSRF-Token', office.csrf)
      .send({ version: 2, firstAfterMonths: 0, everyMonths: 9999, visitsAhead: 2 })
      .expect(400);
    expect(bad.body.errors.map((e: { field: string }) => e.field).sort()).toEqual(['everyMonths', 'firstAfterMonths']);
    expect((await scheduler.get('/api/firm/service-plan').expect(200)).body).toEqual({
      firstAfterMonths: 3,
      everyMonths: 12,
      visitsAhead: 2,
      isDefault: true,
      source: 'common practice, no source',
      version: 2,
    });
  });

  it('never overwrites a plan someone else saved meanwhile: a save from an older version is refused with theirs', async () => {
    const put = (body: Record<string, unknown>) =>
      office.put('/api/firm/service-plan').set('X-CSRF-Token', office.csrf).send(body);
    const missing = await put({ firstAfterMonths: 3, everyMonths: 12, visitsAhead: 2 }).expect(400);
    expect(missing.body.errors).toEqual([
      { field: 'version', message: 'is required: the version of the plan you loaded' },
    ]);
    const asText = await put({ version: '1', firstAfterMonths: 3, everyMonths: 12, visitsAhead: 2 }).expect(400);
    expect(asText.body.errors).toEqual([{ field: 'version', message: 'must be a number' }]);
    const { version } = (await office.get('/api/firm/service-plan').expect(200)).body;
    // Two owners save from the same version at once: one wins, the other is told and sees the winner's plan.
    const [a, b] = await Promise.all([
      put({ version, firstAfterMonths: 4, everyMonths: 6, visitsAhead: 2 }),
      put({ version, firstAfterMonths: 5, everyMonths: 24, visitsAhead: 1 }),
    ]);
    expect([a.status, b.status].sort()).toEqual([200, 409]);
    const [won, lost] = a.status === 200 ? [a, b] : [b, a];
    expect(lost.body).toMatchObject({
      code: 'stale-version',
      detail: 'Someone else changed the service plan since you loaded it: reload to see theirs.',
      current: { ...won.body, version: version + 1 },
    });
    expect((await office.get('/api/firm/service-plan').expect(200)).body).toEqual(won.body);
    // A save from the version before is refused too, however late it comes.
    await put({ version, firstAfterMonths: 3, everyMonths: 12, visitsAhead: 2 }).expect(409);
    await put({ version: version + 1, firstAfterMonths: 3, everyMonths: 12, visitsAhead: 2 }).expect(200);
  });
});

describe('who may read and sign', () => {
  it("another installer, a partner and a viewer can't read or sign; crew see the householder's e-mail only as a hint", async () => {
    const job = await makeHandoverJob(ctx.knex, { reference: 'HO-301', startsAt: '2026-06-01T15:00:00Z', store });
    const other = await signIn(ctx, account('scheduler', 'Moorview Spas').email);
    await other.get(`/api/jobs/${job.jobId}/handover`).expect(404);
    await sign(other, job.jobId, good()).expect(404);
    const partner = await signIn(ctx, account('partner', 'Brightspark Electrical').email);
    await partner.get(`/api/jobs/${job.jobId}/handover`).expect(403);
    await sign(partner, job.jobId, good()).expect(403);
    const viewer = await signIn(ctx, account('viewer').email);
    await sign(viewer, job.jobId, good()).expect(403);

    const seen = await crew.get(`/api/jobs/${job.jobId}/handover`).expect(200);
    expect(seen.body).toMatchObject({
      householderEmail: null,
      householderEmailHint: 'r…@calder.example',
      stageBooked: true,
      signed: null,
    });
    expect(JSON.stringify(seen.body)).not.toContain('ruth@calder.example');
    expect((await office.get(`/api/jobs/${job.jobId}/handover`).expect(200)).body.householderEmail).toBe(
      'ruth@calder.example',
    );

    // A job the crew member is not booked on does not exist for them.
    await ctx.knex('bookings').whereIn('stage_id', Object.values(job.stage)).delete();
    await crew.get(`/api/jobs/${job.jobId}/handover`).expect(404);
    await sign(crew, job.jobId, good()).expect(404);
    expect(await ctx.knex('handovers').where('job_id', job.jobId).first()).toBeUndefined();
  });

  it("refuses ids that aren't ids", async () => {
    const res = await crew.get('/api/jobs/9999999999999999999999/handover').expect(400);
    expect(res.body.errors[0].field).toBe('params.id');
  });
});
