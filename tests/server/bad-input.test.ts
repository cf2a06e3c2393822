import { afterAll, afterEach, beforeAll, describe, expect, it, vi } from 'vitest';
import type { Request, Response } from 'express';
import { z } from 'zod';
import sharp from 'sharp';
import { account, idOf, signIn, startTestApp, type Agent, type TestContext } from '../helpers/server.ts';
import { CONSTRAINT_REFUSALS, errorHandler } from '../../server/errors.ts';
import { parse } from '../../server/middleware/validate.ts';
import { BadRequestError } from '../../server/errors.ts';
import { S3ObjectStore } from '../../server/storage/object-store.ts';
import { Job } from '../../server/models/index.ts';

let ctx: TestContext;
let scheduler: Agent;
let owner: Agent;
let jobId: string;

beforeAll(async () => {
  ctx = await startTestApp();
  scheduler = await signIn(ctx, account('scheduler').email);
  owner = await signIn(ctx, account('owner').email);
  jobId = await idOf(ctx.knex, 'jobs', { reference: 'TW-2405' });
});
afterAll(async () => {
  await ctx.close();
});
afterEach(() => {
  vi.restoreAllMocks();
});

const LINE = 'must be a single line (no line breaks)';
const HIDDEN = 'must not contain tabs or hidden control characters';
const BROKEN = 'contains a broken character; type it again';

interface ProblemResponse {
  status: number;
  headers: Record<string, string>;
  body: { errors?: { field: string; message: string }[]; [k: string]: unknown };
}

/** A 400 problem+json whose field errors are exactly these. */
function expectFieldErrors(res: ProblemResponse, errors: Record<string, string>) {
  expect(res.status, JSON.stringify(res.body)).toBe(400);
  expect(res.headers['content-type']).toMatch(/application\/problem\+json/);
  expect(Object.fromEntries((res.body.errors ?? []).map((e) => [e.field, e.message]))).toEqual(errors);
}

const count = async (table: string) =>
  Number((await ctx.knex(table).count<{ count: string }[]>('* as count'))[0]!.count);
const write = (agent: Agent, method: 'put' | 'post' | 'patch', path: string, body: object) =>
  agent[method](path).set('X-CSRF-Token', agent.csrf).send(body);
const NEW_JOB = {
  reference: 'TW-3100',
  customerName: 'Ines Calloway',
  siteAddress: '4 Heron Row',
  siteTown: 'Otley',
  sitePostcode: 'LS21 3AB',
  installationType: 'slab',
};

describe('what answered 500 answers 400 naming the parameter', () => {
  it('GET /api/jobs?search=%00: the search box refuses a NUL', async () => {
    expectFieldErrors(await scheduler.get('/api/jobs?search=%00'), { 'query.search': HIDDEN });
    expectFieldErrors(await scheduler.get('/api/jobs?search=Otley%0Aroad'), { 'query.search': LINE });
    // The detail says where, in words (not "The query has…"), and so for the path's own parameters.
    expect((await scheduler.get('/api/jobs?search=%00')).body.detail).toBe(
      "The address's query has fields that are not valid.",
    );
    expect((await scheduler.get('/api/jobs/abc')).body.detail).toBe(
      "The address's path has fields that are not valid.",
    );
    // An ordinary search still works.
    expect(
      (await scheduler.get('/api/jobs?search=TW-2405').expect(200)).body.items.map(
        (j: { reference: string }) => j.reference,
      ),
    ).toEqual(['TW-2405']);
  });

  it('GET /api/jobs/%zz: a broken %-escape in the path names the path parameter', async () => {
    const message = 'is not valid in an address (a % must be followed by two hexadecimal digits)';
    expectFieldErrors(await scheduler.get('/api/jobs/%zz'), { 'params.id': message });
    expectFieldErrors(await scheduler.get('/api/jobs/%E0%A4%A/files'), { 'params.id': message });
    expect((await scheduler.get('/api/jobs/%zz')).body).toMatchObject({
      status: 400,
      detail: 'The address has a broken %-escape.',
    });
  });

  it('GET /api/day-sheets?date=9999-12-31: the date must fall in the working years', async () => {
    expectFieldErrors(await scheduler.get('/api/day-sheets?date=9999-12-31'), {
      'query.date': 'must be a date between 2000 and 2100',
    });
    expectFieldErrors(await scheduler.get('/api/day-sheets?date=0000-01-01'), {
      'query.date': 'must be a date between 2000 and 2100',
    });
    expectFieldErrors(await scheduler.get('/api/day-sheets?date=2026-02-30'), {
      'query.date': 'must be a date like 2026-05-12',
    });
    await scheduler.get('/api/day-sheets?date=2026-06-01').expect(200);
  });

  it('the board refuses year 0000 (no working calendar is ever asked about it)', async () => {
    const res = await scheduler.get('/api/board?from=0000-01-01T00:00:00Z&to=0000-01-02T00:00:00Z');
    expectFieldErrors(res, {
      'query.from': 'must be a time between 1900 and 2200',
      'query.to': 'must be a time between 1900 and 2200',
    });
  });
});

describe('NUL, lone surrogates and year 0000 are refused by field, before the database', () => {
  it('a new job: each bad field named, nothing stored', async () => {
    const before = await count('jobs');
    expectFieldErrors(await write(scheduler, 'post', '/api/jobs', { ...NEW_JOB, reference: 'TW-3100\u0000' }), {
      reference: HIDDEN,
    });
    expectFieldErrors(await write(scheduler, 'post', '/api/jobs', { ...NEW_JOB, customerName: 'Ines \uD800' }), {
      customerName: BROKEN,
    });
    expectFieldErrors(await write(scheduler, 'post', '/api/jobs', { ...NEW_JOB, promisedFrom: '0000-01-01' }), {
      promisedFrom: 'must be a date between 2000 and 2100',
    });
    expectFieldErrors(await write(scheduler, 'post', '/api/jobs', { ...NEW_JOB, orderedOn: '2026-02-29' }), {
      orderedOn: 'must be a date like 2026-05-12',
    });
    expect(await count('jobs')).toBe(before);
  });

  it('a field a schema takes as plain text still never carries NUL or a lone surrogate to the database', () => {
    const plain = z.object({ note: z.string(), tags: z.record(z.string(), z.string()) });
    const refusal = (value: unknown) => {
      try {
        parse(plain, value);
        return null;
      } catch (e) {
        return e as BadRequestError;
      }
    };
    expect(refusal({ note: 'a\u0000b', tags: {} })?.errors).toEqual([
      { field: 'note', message: 'contains a character that cannot be stored (a NUL or a broken character)' },
    ]);
    expect(refusal({ note: 'ok', tags: { colour: '\uDC00' } })?.errors).toEqual([
      { field: 'tags.colour', message: 'contains a character that cannot be stored (a NUL or a broken character)' },
    ]);
    expect(refusal({ note: 'ok', tags: { 'x\u0000': 'y' } })?.errors).toEqual([
      { field: 'tags.(key)', message: 'has a name with a character that cannot be stored' },
    ]);
    expect(parse(plain, { note: 'Gate code 1234', tags: { colour: 'teal' } })).toEqual({
      note: 'Gate code 1234',
      tags: { colour: 'teal' },
    });
  });
});

describe('line breaks and direction overrides stay out of one-line fields', () => {
  it('jobs: names, references, towns, postcodes, phone numbers and e-mail; notes keep their lines', async () => {
    const res = await write(scheduler, 'post', '/api/jobs', {
      ...NEW_JOB,
      customerName: 'Ines\r\nCalloway',
      siteTown: 'Ot\u202Eley',
      customerPhone: '0113 496\n0000',
      customerEmail: 'ines@calloway.test\r\nBcc: all@elsewhere.test',
      sitePostcode: 'LS21\u20663AB',
      reference: 'TW\u20283100',
    });
    expectFieldErrors(res, {
      customerName: LINE,
      siteTown: HIDDEN,
      customerPhone: LINE,
      customerEmail: LINE,
      sitePostcode: HIDDEN,
      reference: LINE,
    });
    expect(await ctx.knex('jobs').where('reference', 'like', 'TW%3100')).toEqual([]);

    const created = await write(scheduler, 'post', '/api/jobs', {
      ...NEW_JOB,
      accessNotes: 'Side gate, 900 mm.\r\nDog in the garden.',
    }).expect(201);
    expect((await ctx.knex('jobs').where('id', created.body.id).first()).accessNotes).toBe(
      'Side gate, 900 mm.\nDog in the garden.',
    );
  });

  it('a job edit is refused whole: the town is not changed', async () => {
    const job = await ctx.knex('jobs').where('id', jobId).first();
    expectFieldErrors(
      await write(scheduler, 'patch', `/api/jobs/${jobId}`, { version: job.version, siteTown: 'Ilkley\nMoor' }),
      { siteTown: LINE },
    );
    expect((await ctx.knex('jobs').where('id', jobId).first()).siteTown).toBe(job.siteTown);
  });

  it('surveys, templates and invitations', async () => {
    const enquiry = await idOf(ctx.knex, 'jobs', { reference: 'TW-2421' });
    const survey = {
      accessWidthMm: 1200,
      groundType: 'clay',
      craneStandingPosition: 'Road outside\r\nno. 14',
      notes: 'Lawn is level.\nSoft by the shed.\u0000',
    };
    expectFieldErrors(await write(scheduler, 'put', `/api/jobs/${enquiry}/survey`, { version: 0, survey }), {
      'survey.craneStandingPosition': LINE,
      'survey.notes': HIDDEN,
    });
    expect(await ctx.knex('surveys').where('job_id', enquiry)).toEqual([]);

    const templates = await scheduler.get('/api/templates').expect(200);
    const slab = templates.body.items.find((t: { installationType: string }) => t.installationType === 'slab');
    const stages = slab.stages.map((s: { name: string }, i: number) =>
      i === 0 ? { ...s, name: 'Survey\u202Eyevrus' } : s,
    );
    expectFieldErrors(
      await write(scheduler, 'put', '/api/templates/slab', {
        version: slab.version,
        name: 'Slab\nbase',
        stages,
        links: slab.links,
      }),
      { name: LINE, 'stages.0.name': HIDDEN },
    );
    expect(await ctx.knex('stage_templates').where('installation_type', 'slab')).toEqual([]);

    const invitations = await count('invitations');
    expectFieldErrors(
      await write(owner, 'post', '/api/firm/invitations', {
        email: 'new.crew@tideway.test\r\nBcc: all@elsewhere.test',
        role: 'crew',
      }),
      { email: LINE },
    );
    expect(await count('invitations')).toBe(invitations);
  });
});

describe('file names', () => {
  const jpeg = () =>
    sharp({ create: { width: 8, height: 8, channels: 3, background: '#2878a0' } })
      .jpeg()
      .toBuffer();

  /** A multipart body written out by hand, so the file name reaches the server exactly as given. */
  function multipart(disposition: string, content: Buffer) {
    const boundary = 'waterline-test-boundary';
    const body = Buffer.concat([
      Buffer.from(
        `--${boundary}\r\nContent-Disposition: form-data; name="file"; ${disposition}\r\nContent-Type: image/jpeg\r\n\r\n`,
        'utf8',
      ),
      content,
      Buffer.from(`\r\n--${boundary}--\r\n`),
    ]);
    return scheduler
      .post(`/api/jobs/${jobId}/files`)
      .set('X-CSRF-Token', scheduler.csrf)
      .set('Content-Type', `multipart/form-data; boundary=${boundary}`)
      .send(body);
  }

  it('are refused with a field error on file when they hold a line break, a control or a direction override; nothing is stored', async () => {
    const photo = await jpeg();
    const put = vi.spyOn(S3ObjectStore.prototype, 'put');
    const before = await count('job_files');
    const message = 'A file name may not contain line breaks, tabs, control characters or text-direction overrides.';
    for (const disposition of [
      'filename="pit\u202Egpj.exe"', // shows as "pitexe.jpg"
      "filename*=UTF-8''pit%0D%0Aphoto.jpg",
      "filename*=UTF-8''pit%09photo.jpg",
      "filename*=UTF-8''pit%E2%81%A6photo.jpg", // U+2066
      "filename*=UTF-8''pit%C2%85photo.jpg", // U+0085, a C1 control
    ]) {
      const res = await multipart(disposition, photo);
      expect(res.status, disposition).toBe(400);
      expect(res.body, disposition).toMatchObject({
        type: `${ctx.config.PUBLIC_URL}/problems/bad-file-name`,
        errors: [{ field: 'file', message }],
      });
    }
    expect(put).not.toHaveBeenCalled();
    expect(await count('job_files')).toBe(before);
    // The same photo under a plain name (accents and all) is taken.
    const ok = await multipart("filename*=UTF-8''fosse%20c%C3%B4t%C3%A9%20jardin.jpg", photo).expect(201);
    expect(ok.body.name).toBe('fosse côté jardin.jpg');
  });
});

describe('database refusals in the user’s words', () => {
  /** What the one error handler answers for an error, as a client would read it. */
  function answer(err: unknown): { status: number; body: Record<string, unknown> } {
    const out = { status: 0, body: {} as Record<string, unknown> };
    const res = {
      status(s: number) {
        out.status = s;
        return res;
      },
      type() {
        return res;
      },
      json(b: Record<string, unknown>) {
        out.body = b;
        return res;
      },
    };
    errorHandler(
      err,
      { originalUrl: '/api/test', log: { error: () => undefined } } as unknown as Request,
      res as unknown as Response,
      () => undefined,
    );
    return out;
  }
  /** Runs a statement the database must refuse, inside a transaction that is rolled back. */
  async function refusal(statement: (trx: typeof ctx.knex) => Promise<unknown>): Promise<unknown> {
    const trx = await ctx.knex.transaction();
    try {
      await statement(trx as unknown as typeof ctx.knex);
    } catch (e) {
      return e;
    } finally {
      await trx.rollback();
    }
    throw new Error('the database took it');
  }
  /** No table, column, constraint, SQL or SQLSTATE in what the user reads. */
  function expectPlain(body: Record<string, unknown>) {
    expect(JSON.stringify(body)).not.toMatch(
      /_id|_unique|_foreign|_check|_order|_overlap|constraint|violates|insert into|update "|\b23\d{3}\b|stage_id|resource_id|firm_id|secret_column/i,
    );
  }

  it('has a sentence for every unique, exclusion and named check rule the migrations make', async () => {
    const rules = await ctx.knex.raw(`
      SELECT conname AS name FROM pg_constraint WHERE connamespace = 'public'::regnamespace
        AND (contype IN ('u', 'x') OR (contype = 'c' AND conname NOT LIKE '%\\_check'))
      UNION SELECT indexname FROM pg_indexes WHERE schemaname = 'public' AND indexdef LIKE 'CREATE UNIQUE INDEX%' AND indexname NOT LIKE '%\\_pkey'`);
    const names: string[] = rules.rows.map((r: { name: string }) => r.name);
    expect(names).toContain('jobs_firm_id_reference_unique');
    expect(names.filter((n) => !(n in CONSTRAINT_REFUSALS)).sort()).toEqual([]);
  });

  it('a job reference already used: 409 naming the field, not the columns', async () => {
    const res = await write(scheduler, 'post', '/api/jobs', { ...NEW_JOB, reference: 'TW-2405' });
    expect(res.status).toBe(409);
    expect(res.headers['content-type']).toMatch(/application\/problem\+json/);
    // The next free reference is named, so the person can take it (the firm's highest TW- reference + 1).
    const next = (await scheduler.get('/api/job-references/next').expect(200)).body.nextReference as string;
    expect(res.body).toMatchObject({
      code: 'duplicate-reference',
      nextReference: next,
      errors: [{ field: 'reference', message: `is already used by another job; ${next} is free` }],
    });
    expect(res.body.detail).toMatch(
      new RegExp(`^TW-2405 is already the reference of another job \\(.+\\)\\. ${next} is the next free one\\.$`),
    );
    expectPlain(res.body);
  });

  it('the same stage booked twice on one resource: 409 in plain words', async () => {
    const booking = await ctx.knex('bookings').first();
    const err = await refusal((trx) =>
      trx('bookings').insert({
        stage_id: booking.stageId,
        resource_id: booking.resourceId,
        starts_at: booking.startsAt,
        ends_at: booking.endsAt,
        state: 'pencilled',
      }),
    );
    const { status, body } = answer(err);
    expect(status).toBe(409);
    expect(body).toMatchObject({
      detail: 'This stage is already booked on that resource.',
      errors: [{ field: 'resourceId', message: 'already has this stage' }],
    });
    expectPlain(body);
  });

  it('a unique rule with no sentence of its own gets the plain fallback, never the column', async () => {
    const err = await refusal(async (trx) => {
      await trx.raw('CREATE TEMP TABLE refusal_probe (secret_column int UNIQUE) ON COMMIT DROP');
      await trx.raw('INSERT INTO refusal_probe VALUES (1), (1)');
    });
    const { status, body } = answer(err);
    expect(status).toBe(409);
    expect(body).toMatchObject({
      detail: 'This would repeat something that is already recorded; reload to see it.',
      code: 'duplicate',
      errors: [],
    });
    expectPlain(body);
  });

  it('two confirmed bookings of one resource at once: 409 double-booked', async () => {
    const crew = await idOf(ctx.knex, 'resources', { name: 'Pallet truck 4' });
    const [first, second] = await ctx
      .knex('stages')
      .whereNotIn('id', ctx.knex('bookings').where('resource_id', crew).select('stage_id'))
      .orderBy('id')
      .limit(2)
      .pluck('id');
    const err = await refusal(async (trx) => {
      await trx('bookings').insert({
        stage_id: first,
        resource_id: crew,
        starts_at: '2031-03-03T08:00:00Z',
        ends_at: '2031-03-03T12:00:00Z',
        state: 'confirmed',
      });
      await trx('bookings').insert({
        stage_id: second,
        resource_id: crew,
        starts_at: '2031-03-03T10:00:00Z',
        ends_at: '2031-03-03T14:00:00Z',
        state: 'confirmed',
      });
    });
    const { status, body } = answer(err);
    expect(status).toBe(409);
    expect(body).toMatchObject({
      code: 'double-booked',
      detail: 'That resource already has a confirmed booking at that time.',
    });
    expectPlain(body);
  });

  it('a reference to nothing: 422; a record still in use: 409', async () => {
    const missing = answer(
      await refusal(async (trx) => {
        await Job.query(trx)
          .patch({ unitId: '999999' } as Partial<Job>)
          .where('id', jobId);
      }),
    );
    expect(missing.status).toBe(422);
    expect(missing.body).toMatchObject({
      detail: 'Something this refers to does not exist (it may just have been removed).',
      errors: [{ field: 'unitId', message: 'is not a unit your firm lists' }],
    });
    expectPlain(missing.body);

    const booked = await ctx.knex('bookings').first('resource_id');
    const inUse = answer(await refusal((trx) => trx('resources').where('id', booked.resourceId).delete()));
    expect(inUse.status).toBe(409);
    expect(inUse.body).toMatchObject({
      code: 'still-in-use',
      detail: 'This is still in use elsewhere, so it cannot be removed.',
    });
    expectPlain(inUse.body);
  });

  it('a missing required value and a broken check: 400', async () => {
    const notNull = answer(await refusal((trx) => trx('jobs').where('id', jobId).update({ customer_name: null })));
    expect(notNull.status).toBe(400);
    expect(notNull.body).toMatchObject({ detail: 'A required value is missing.' });
    expectPlain(notNull.body);

    const check = answer(
      await refusal((trx) =>
        trx('jobs').where('id', jobId).update({ promised_from: '2026-09-10', promised_to: '2026-09-01' }),
      ),
    );
    expect(check.status).toBe(400);
    expect(check.body).toMatchObject({
      detail: 'The promised window ends before it starts.',
      errors: [{ field: 'promisedTo', message: 'must be on or after the start of the promised window' }],
    });
    expectPlain(check.body);
  });

  it('two writers PostgreSQL had to choose between (a deadlock, a serialisation failure): 409, try again, anywhere', async () => {
    // A real deadlock: each transaction holds one job's row and asks for the other's.
    const other = await idOf(ctx.knex, 'jobs', { reference: 'TW-2406' });
    const [a, b] = [await ctx.knex.transaction(), await ctx.knex.transaction()];
    let deadlock: unknown;
    try {
      await a('jobs').where('id', jobId).forUpdate().first('id');
      await b('jobs').where('id', other).forUpdate().first('id');
      const settled = await Promise.allSettled([
        a('jobs').where('id', other).forUpdate().first('id'),
        b('jobs').where('id', jobId).forUpdate().first('id'),
      ]);
      deadlock = settled.find((r) => r.status === 'rejected')?.reason;
    } finally {
      await a.rollback().catch(() => undefined);
      await b.rollback().catch(() => undefined);
    }
    expect((deadlock as { code?: string }).code).toBe('40P01');
    // A real serialisation failure: two SERIALIZABLE transactions each read what the other writes.
    const [c, d] = [await ctx.knex.transaction(), await ctx.knex.transaction()];
    let serial: unknown;
    try {
      await c.raw('SET TRANSACTION ISOLATION LEVEL SERIALIZABLE');
      await d.raw('SET TRANSACTION ISOLATION LEVEL SERIALIZABLE');
      await c('jobs').where('id', jobId).first('access_notes');
      await d('jobs').where('id', other).first('access_notes');
      await c('jobs').where('id', other).update({ access_notes: 'c' });
      await d('jobs').where('id', jobId).update({ access_notes: 'd' });
      await c.commit();
      // d read what c wrote, and c read what d wrote: d can no longer be serialised.
      await d('jobs').where('id', other).update({ access_notes: 'd' });
    } catch (e) {
      serial = e;
    } finally {
      await c.rollback().catch(() => undefined);
      await d.rollback().catch(() => undefined);
    }
    expect((serial as { code?: string }).code).toBe('40001');
    for (const err of [deadlock, serial]) {
      const told = answer(err);
      expect(told.status).toBe(409);
      expect(told.body).toMatchObject({
        code: 'write-conflict',
        detail: 'Another change was saved at the same moment: reload and try again.',
      });
      expectPlain(told.body);
    }
  });

  it('a value the database cannot hold says what is wrong, without SQL', async () => {
    const nul = answer(await refusal((trx) => trx('jobs').where('id', jobId).update({ site_town: 'Otley\u0000' })));
    expect(nul).toMatchObject({ status: 400, body: { detail: 'A value contains a character that cannot be stored.' } });
    const year = answer(await refusal((trx) => trx.raw("SELECT '0000-01-01'::date")));
    expect(year).toMatchObject({ status: 400, body: { detail: 'A date or time is out of range.' } });
    expectPlain(nul.body);
  });
});
