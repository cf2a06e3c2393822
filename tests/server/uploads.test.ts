import { afterAll, afterEach, beforeAll, describe, expect, it, vi } from 'vitest';
import sharp from 'sharp';
import { account, idOf, signIn, startTestApp, type Agent, type TestContext } from '../helpers/server.ts';
import { S3ObjectStore } from '../../server/storage/object-store.ts';
import { MAX_FILE_BYTES } from '../../shared/schemas/files.ts';

let ctx: TestContext;
let scheduler: Agent;
let jobId: string;
let jpeg: Buffer;
const PDF = Buffer.from('%PDF-1.4\n1 0 obj << /Type /Catalog >> endobj\ntrailer << /Root 1 0 R >>\n%%EOF\n');

beforeAll(async () => {
  ctx = await startTestApp();
  scheduler = await signIn(ctx, account('scheduler').email);
  jobId = await idOf(ctx.knex, 'jobs', { reference: 'TW-2405' });
  // A 1280 × 960 photo made here: a thumbnail of it is 320 × 240 (960 × 320 ÷ 1280 = 240).
  jpeg = await sharp({ create: { width: 1280, height: 960, channels: 3, background: { r: 40, g: 120, b: 160 } } })
    .jpeg()
    .toBuffer();
});
afterAll(async () => {
  await ctx.close();
});
afterEach(() => {
  vi.restoreAllMocks();
});

const fileRows = async () => Number((await ctx.knex('job_files').count<{ count: string }[]>('* as count'))[0]!.count);
const upload = (buffer: Buffer, filename: string, as: Agent = scheduler) =>
  as.post(`/api/jobs/${jobId}/files`).set('X-CSRF-Token', as.csrf).attach('file', buffer, { filename });

function expectProblem(
  res: { status: number; headers: Record<string, string>; body: Record<string, unknown> },
  status: number,
  code: string,
) {
  expect(res.status).toBe(status);
  expect(res.headers['content-type']).toMatch(/application\/problem\+json/);
  expect(res.body).toMatchObject({ status, type: `${ctx.config.PUBLIC_URL}/problems/${code}` });
}

describe('uploading a photo', () => {
  it('keeps the original and a 320 px thumbnail behind private links that expire in ten minutes', async () => {
    const res = await upload(jpeg, 'pit from the patio.jpg').expect(201);
    expect(res.body).toMatchObject({
      name: 'pit from the patio.jpg',
      contentType: 'image/jpeg',
      sizeBytes: jpeg.length,
      isPhoto: true,
    });
    expect(res.body.url).toContain('X-Amz-Expires=600');
    const original = await fetch(res.body.url);
    expect(original.status).toBe(200);
    expect(Buffer.from(await original.arrayBuffer()).equals(jpeg)).toBe(true);
    const thumb = await fetch(res.body.thumbnailUrl);
    const meta = await sharp(Buffer.from(await thumb.arrayBuffer())).metadata();
    expect([meta.format, meta.width, meta.height]).toEqual(['jpeg', 320, 240]);

    const list = await scheduler.get(`/api/jobs/${jobId}/files`).expect(200);
    expect(list.body.items.map((f: { id: string }) => f.id)).toContain(res.body.id);
    // The object key comes from the type found in the content, never from the name.
    const row = await ctx.knex('job_files').where('id', res.body.id).first();
    expect(row.objectKey).toMatch(new RegExp(`^jobs/${jobId}/[0-9a-f-]{36}\\.jpg$`));
  });

  it('takes a PDF without a thumbnail', async () => {
    const res = await upload(PDF, 'lift plan.pdf').expect(201);
    expect(res.body).toMatchObject({ contentType: 'application/pdf', isPhoto: false, thumbnailUrl: null });
  });
});

describe('refusing a file', () => {
  it('whose content is not what its .jpg name says (a PDF)', async () => {
    const before = await fileRows();
    expectProblem(await upload(PDF, 'photo.jpg'), 415, 'file-type-mismatch');
    expect(await fileRows()).toBe(before);
  });

  it('whose content is text, whatever it is called', async () => {
    expectProblem(await upload(Buffer.from('just some words, not a photo'), 'photo.jpg'), 415, 'unsupported-file-type');
  });

  it('over 10 MB', async () => {
    const big = Buffer.concat([jpeg, Buffer.alloc(MAX_FILE_BYTES + 1 - jpeg.length)]);
    const res = await upload(big, 'big.jpg');
    expectProblem(res, 413, 'file-too-large');
  });

  it('with a name that climbs out of its folder', async () => {
    const before = await fileRows();
    // `filepath` makes the test client send the name as given (by default it keeps only the last part).
    const res = await scheduler
      .post(`/api/jobs/${jobId}/files`)
      .set('X-CSRF-Token', scheduler.csrf)
      .attach('file', jpeg, { filepath: '../../etc/passwd.jpg' } as unknown as { filename: string });
    expectProblem(res, 400, 'bad-file-name');
    expect(res.body.detail).toMatch(/folder path/);
    expect(await fileRows()).toBe(before);
  });

  it('that is empty', async () => {
    expectProblem(await upload(Buffer.alloc(0), 'nothing.jpg'), 400, 'empty-file');
  });

  it('when none is sent, or two are', async () => {
    expectProblem(
      await scheduler.post(`/api/jobs/${jobId}/files`).set('X-CSRF-Token', scheduler.csrf).field('note', 'x'),
      400,
      'bad-request',
    );
    const two = await scheduler
      .post(`/api/jobs/${jobId}/files`)
      .set('X-CSRF-Token', scheduler.csrf)
      .attach('file', jpeg, { filename: 'a.jpg' })
      .attach('file', jpeg, { filename: 'b.jpg' });
    expectProblem(two, 400, 'bad-request');
  });

  it('from a role that may not change jobs', async () => {
    const viewer = await signIn(ctx, account('viewer').email);
    expect((await upload(jpeg, 'a.jpg', viewer)).status).toBe(403);
  });
});

describe('nothing half-stored', () => {
  it('writes no row when storage refuses the file', async () => {
    const before = await fileRows();
    vi.spyOn(S3ObjectStore.prototype, 'put').mockRejectedValueOnce(new Error('storage is down'));
    expectProblem(await upload(jpeg, 'pit.jpg'), 503, 'storage-unavailable');
    expect(await fileRows()).toBe(before);
  });

  it('removes the original again when the thumbnail cannot be stored', async () => {
    const realPut = S3ObjectStore.prototype.put;
    let calls = 0;
    const put = vi.spyOn(S3ObjectStore.prototype, 'put').mockImplementation(async function (
      this: S3ObjectStore,
      key: string,
      body: Buffer,
      type: string,
    ) {
      calls += 1;
      if (calls === 2) throw new Error('storage went away');
      return realPut.call(this, key, body, type);
    });
    const before = await fileRows();
    expectProblem(await upload(jpeg, 'pit.jpg'), 503, 'storage-unavailable');
    expect(await fileRows()).toBe(before);
    const originalKey = put.mock.calls[0]![0];
    put.mockRestore();
    const store = new S3ObjectStore(ctx.config);
    expect((await fetch(await store.presignGet(originalKey, { expiresInSeconds: 60 }))).status).toBe(404);
    store.close();
  });

  it('removes the stored objects when the database refuses the row', async () => {
    // A trigger that fails the insert, as a database fault would after the objects are stored.
    await ctx.knex.raw(`CREATE FUNCTION job_files_test_refusal() RETURNS trigger AS $$
      BEGIN IF NEW.name = 'refused.jpg' THEN RAISE EXCEPTION 'refused for the test'; END IF; RETURN NEW; END $$ LANGUAGE plpgsql`);
    await ctx.knex.raw(
      'CREATE TRIGGER job_files_test_refusal BEFORE INSERT ON job_files FOR EACH ROW EXECUTE FUNCTION job_files_test_refusal()',
    );
    const del = vi.spyOn(S3ObjectStore.prototype, 'delete');
    try {
      const before = await fileRows();
      const res = await upload(jpeg, 'refused.jpg');
      expectProblem(res, 500, 'internal');
      expect(await fileRows()).toBe(before);
      const keys = del.mock.calls.map((c) => c[0]);
      expect(keys).toHaveLength(2);
      expect(keys[0]).toMatch(/\.jpg$/);
      expect(keys[1]).toMatch(/-thumb\.jpg$/);
    } finally {
      await ctx.knex.raw('DROP TRIGGER job_files_test_refusal ON job_files');
      await ctx.knex.raw('DROP FUNCTION job_files_test_refusal()');
    }
  });
});

describe('deleting a file', () => {
  it('removes the row and the objects together', async () => {
    const res = await upload(jpeg, 'to remove.jpg').expect(201);
    await scheduler.delete(`/api/files/${res.body.id}`).set('X-CSRF-Token', scheduler.csrf).expect(204);
    expect(await ctx.knex('job_files').where('id', res.body.id).first()).toBeUndefined();
    expect((await fetch(res.body.url)).status).toBe(404);
    const audit = await ctx
      .knex('audit_log')
      .where({ entity: 'job_file', entity_id: res.body.id })
      .orderBy('id')
      .pluck('action');
    expect(audit).toEqual(['create', 'delete']);
  });

  it('keeps the row when storage refuses the delete', async () => {
    const res = await upload(jpeg, 'kept.jpg').expect(201);
    vi.spyOn(S3ObjectStore.prototype, 'delete').mockRejectedValueOnce(new Error('storage is down'));
    expectProblem(
      await scheduler.delete(`/api/files/${res.body.id}`).set('X-CSRF-Token', scheduler.csrf),
      503,
      'storage-unavailable',
    );
    expect(await ctx.knex('job_files').where('id', res.body.id).first()).toBeDefined();
  });

  it('is not possible from another firm (404, as if it did not exist)', async () => {
    const res = await upload(jpeg, 'private.jpg').expect(201);
    const other = await signIn(ctx, account('scheduler', 'Moorview Spas').email);
    await other.get(`/api/jobs/${jobId}/files`).expect(404);
    await other.delete(`/api/files/${res.body.id}`).set('X-CSRF-Token', other.csrf).expect(404);
  });
});
