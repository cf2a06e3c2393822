import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import sharp from 'sharp';
import { account, idOf, signIn, startTestApp, type Agent, type TestContext } from '../helpers/server.ts';
import { stripPhotoMetadata } from '../../server/storage/photo-metadata.ts';

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

// Invented camera and place; the GPS values are a field near Otley, written as EXIF rationals.
const MAKE = 'Otterbrook';
const MODEL = 'Field Camera 2';
const DATUM = 'WGS-84 pit corner';
const CAMERA_AND_PLACE = {
  IFD0: { Make: MAKE, Model: MODEL },
  IFD3: {
    GPSLatitudeRef: 'N',
    GPSLatitude: '53/1 54/1 3/1',
    GPSLongitudeRef: 'W',
    GPSLongitude: '1/1 41/1 2/1',
    GPSMapDatum: DATUM,
  },
};

/** A 64 × 48 photo taken on its side (EXIF orientation 6) carrying a camera make, model and GPS position. */
function photo(format: 'jpeg' | 'png' | 'webp' | 'avif', options: { progressive?: boolean } = {}): Promise<Buffer> {
  const image = sharp({
    create: { width: 64, height: 48, channels: 3, background: { r: 40, g: 120, b: 160 } },
  }).composite([
    {
      input: { create: { width: 16, height: 16, channels: 3, background: { r: 230, g: 200, b: 40 } } },
      left: 4,
      top: 4,
    },
  ]);
  const encoded = format === 'jpeg' ? image.jpeg({ progressive: options.progressive ?? false }) : image[format]();
  return encoded.withExif(CAMERA_AND_PLACE).withMetadata({ orientation: 6 }).toBuffer();
}

const hasText = (b: Buffer, text: string) => b.includes(Buffer.from(text, 'latin1'));
/** The decoded pixels, exactly as stored (no rotation applied). */
const pixels = (b: Buffer) => sharp(b).raw().toBuffer();

/**
 * What EXIF is left: the entries of IFD0 of the TIFF block (TIFF 6.0, section 2: header, then
 * a 2-byte count and 12-byte entries), read from sharp's copy of the block.
 */
async function exifTags(b: Buffer): Promise<number[] | null> {
  const exif = (await sharp(b).metadata()).exif;
  if (!exif) return null;
  const tiff = exif.subarray(0, 6).toString('latin1') === 'Exif\0\0' ? exif.subarray(6) : exif;
  const le = tiff.toString('latin1', 0, 2) === 'II';
  const u16 = (o: number) => (le ? tiff.readUInt16LE(o) : tiff.readUInt16BE(o));
  const ifd = le ? tiff.readUInt32LE(4) : tiff.readUInt32BE(4);
  return Array.from({ length: u16(ifd) }, (_, i) => u16(ifd + 2 + i * 12));
}
const ORIENTATION = 0x0112;
const GPS_IFD = 0x8825;
const MAKE_TAG = 0x010f;

const upload = (buffer: Buffer, filename: string) =>
  scheduler.post(`/api/jobs/${jobId}/files`).set('X-CSRF-Token', scheduler.csrf).attach('file', buffer, { filename });
const stored = async (url: string) => Buffer.from(await (await fetch(url)).arrayBuffer());
const setKeep = (keepPhotoLocation: boolean) =>
  owner.put('/api/firm/settings').set('X-CSRF-Token', owner.csrf).send({ keepPhotoLocation });

describe('a photo upload, by default', () => {
  it('stores the original without GPS, make or model; the orientation tag, colour profile and pixels stay', async () => {
    const original = await photo('jpeg');
    // The photo made here really carries what is to be removed.
    expect(await exifTags(original)).toEqual(expect.arrayContaining([MAKE_TAG, GPS_IFD, ORIENTATION]));
    expect(hasText(original, DATUM)).toBe(true);

    const res = await upload(original, 'pit from the gate.jpg').expect(201);
    const kept = await stored(res.body.url);
    expect(hasText(kept, MAKE)).toBe(false);
    expect(hasText(kept, MODEL)).toBe(false);
    expect(hasText(kept, DATUM)).toBe(false);
    expect(await exifTags(kept)).toEqual([ORIENTATION]);
    const meta = await sharp(kept).metadata();
    expect([meta.format, meta.orientation, meta.width, meta.height]).toEqual(['jpeg', 6, 64, 48]);
    expect(meta.icc?.length).toBe((await sharp(original).metadata()).icc?.length);
    // Not re-encoded: the decoded pixels are the same, bit for bit.
    expect((await pixels(kept)).equals(await pixels(original))).toBe(true);
    expect(res.body.sizeBytes).toBe(kept.length);
    expect((await ctx.knex('job_files').where('id', res.body.id).first()).sizeBytes).toBe(kept.length);
  });

  it('does the same for a HEIF photo (the brand phones write), in place', async () => {
    const heif = await photo('avif');
    // Major brand "mif1": the plain HEIF brand (ISO/IEC 23008-12), so the upload is taken as image/heif.
    heif.write('mif1', 8, 'latin1');
    const res = await upload(heif, 'pit.heif').expect(201);
    expect(res.body.contentType).toBe('image/heif');
    const kept = await stored(res.body.url);
    expect(kept.length).toBe(heif.length);
    expect([hasText(kept, MAKE), hasText(kept, DATUM)]).toEqual([false, false]);
    expect(hasText(heif, DATUM)).toBe(true);
  });

  it('leaves a photo with nothing to remove byte for byte as it came', async () => {
    const plain = await sharp({ create: { width: 32, height: 24, channels: 3, background: '#2878a0' } })
      .jpeg()
      .toBuffer();
    const res = await upload(plain, 'plain.jpg').expect(201);
    expect((await stored(res.body.url)).equals(plain)).toBe(true);
  });
});

describe("the firm's photo location setting", () => {
  it('is off until the owner turns it on; then the original keeps its GPS; off again, it goes', async () => {
    expect((await owner.get('/api/firm/settings').expect(200)).body).toMatchObject({
      keepPhotoLocation: false,
      version: 0,
    });
    await scheduler
      .put('/api/firm/settings')
      .set('X-CSRF-Token', scheduler.csrf)
      .send({ keepPhotoLocation: true })
      .expect(403);

    const on = await setKeep(true).expect(200);
    // The switch needs no version and does not move the quantity figures' version.
    expect(on.body).toMatchObject({ keepPhotoLocation: true, version: 0 });
    const audit = await ctx.knex('audit_log').where({ entity: 'firm_settings' }).orderBy('id', 'desc').first();
    expect(audit.after).toMatchObject({ keepPhotoLocation: true });

    const original = await photo('jpeg');
    const kept = await stored((await upload(original, 'with place.jpg').expect(201)).body.url);
    expect(kept.equals(original)).toBe(true);
    expect(hasText(kept, DATUM)).toBe(true);
    expect(await exifTags(kept)).toEqual(expect.arrayContaining([GPS_IFD, MAKE_TAG]));

    await setKeep(false).expect(200);
    const cleaned = await stored((await upload(original, 'without place.jpg').expect(201)).body.url);
    expect(hasText(cleaned, DATUM)).toBe(false);
  });

  it('sits beside the quantity figures without touching them', async () => {
    const before = (await owner.get('/api/firm/settings').expect(200)).body;
    const saved = await owner
      .put('/api/firm/settings')
      .set('X-CSRF-Token', owner.csrf)
      .send({ version: before.version, quantities: { perimeterGapMm: 150 } })
      .expect(200);
    await setKeep(true).expect(200);
    const after = (await owner.get('/api/firm/settings').expect(200)).body;
    expect(after).toMatchObject({
      keepPhotoLocation: true,
      version: saved.body.version,
      overrides: { perimeterGapMm: 150 },
    });
    await setKeep(false).expect(200);
  });
});

describe('removing the metadata, format by format', () => {
  it.each(['png', 'webp'] as const)('%s: GPS, make and model go; orientation and pixels stay', async (format) => {
    const original = await photo(format);
    expect(await exifTags(original)).toEqual(expect.arrayContaining([MAKE_TAG, GPS_IFD]));
    const cleaned = stripPhotoMetadata(original, `image/${format}`)!;
    expect(hasText(cleaned, DATUM)).toBe(false);
    expect(hasText(cleaned, MAKE)).toBe(false);
    expect(await exifTags(cleaned)).toEqual([ORIENTATION]);
    expect((await sharp(cleaned).metadata()).orientation).toBe(6);
    expect((await pixels(cleaned)).equals(await pixels(original))).toBe(true);
  });

  it('progressive JPEG: every scan is kept', async () => {
    const original = await photo('jpeg', { progressive: true });
    const cleaned = stripPhotoMetadata(original, 'image/jpeg')!;
    expect(await exifTags(cleaned)).toEqual([ORIENTATION]);
    expect((await pixels(cleaned)).equals(await pixels(original))).toBe(true);
  });

  it('JPEG: a second picture or trailer after the end of the image goes too', async () => {
    const original = Buffer.concat([await photo('jpeg'), Buffer.from(`trailer from ${MAKE}`, 'latin1')]);
    const cleaned = stripPhotoMetadata(original, 'image/jpeg')!;
    expect(hasText(cleaned, MAKE)).toBe(false);
    expect(cleaned.subarray(-2).equals(Buffer.from([0xff, 0xd9]))).toBe(true);
  });

  it('HEIF (here in its AV1 form, the same item layout): the EXIF item is blanked in place, same size', async () => {
    const original = await photo('avif');
    expect(hasText(original, DATUM)).toBe(true);
    const cleaned = stripPhotoMetadata(original, 'image/heif')!;
    expect(cleaned.length).toBe(original.length);
    expect(hasText(cleaned, DATUM)).toBe(false);
    expect(hasText(cleaned, MAKE)).toBe(false);
    expect(await exifTags(cleaned)).toEqual([ORIENTATION]);
    expect((await pixels(cleaned)).equals(await pixels(original))).toBe(true);
  });

  it('a file whose layout cannot be followed is not passed through with its metadata', async () => {
    const original = await photo('jpeg');
    expect(stripPhotoMetadata(original.subarray(0, original.length - 40), 'image/jpeg')).toBeNull();
    expect(stripPhotoMetadata(Buffer.from('not a png at all'), 'image/png')).toBeNull();
  });
});
