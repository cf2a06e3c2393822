import { describe, expect, it } from 'vitest';
import sharp from 'sharp';
import { exifUpright, shrunkSize, withExif, SHRINK_LONG_SIDE } from '@/utils/photo-shrink';

/*
 * The byte work behind shrinking a photo on the phone, read back by libvips (through sharp), an
 * image library of its own: the EXIF block carried over to the smaller JPEG, upright.
 */

// Invented camera and place (a field near Otley), as EXIF rationals.
const CAMERA_AND_PLACE = {
  IFD0: { Make: 'Otterbrook', Model: 'Field Camera 2' },
  IFD3: { GPSLatitudeRef: 'N', GPSLatitude: '53/1 54/1 3/1', GPSLongitudeRef: 'W', GPSLongitude: '1/1 41/1 2/1' },
};

const plain = (width: number, height: number) =>
  sharp({ create: { width, height, channels: 3, background: { r: 40, g: 120, b: 160 } } });

describe('carrying a photo’s EXIF over to its smaller copy', () => {
  it('copies the block with its location, turned upright, into the smaller JPEG after its JFIF header', async () => {
    // sharp (libvips) writes its EXIF little-endian ("II").
    const taken = new Uint8Array(
      await plain(64, 48).jpeg().withExif(CAMERA_AND_PLACE).withMetadata({ orientation: 6 }).toBuffer(),
    );
    const exif = exifUpright(taken);
    expect(exif).toBeInstanceOf(Uint8Array);
    expect([exif![0], exif![1]]).toEqual([0xff, 0xe1]);
    const smaller = new Uint8Array(await plain(32, 24).jpeg().toBuffer());
    const joined = withExif(smaller, exif!);
    const read = await sharp(joined).metadata();
    expect(read.orientation).toBe(1);
    expect(read.width).toBe(32);
    // The camera and the position go with it, for the server to keep or take off as the firm chooses.
    const block = Buffer.from(read.exif!);
    expect(block.includes(Buffer.from('Otterbrook'))).toBe(true);
    expect(block.includes(Buffer.from([0x88, 0x25])) || block.includes(Buffer.from([0x25, 0x88]))).toBe(true); // GPS IFD pointer
    // The original is untouched, and the pixels are the smaller JPEG's own.
    expect((await sharp(taken).metadata()).orientation).toBe(6);
    expect(await sharp(joined).raw().toBuffer()).toEqual(await sharp(smaller).raw().toBuffer());
  });

  it('turns a big-endian ("MM") block upright too', async () => {
    // TIFF 6.0, section 2: "MM", 42, IFD0 at 8; one entry: Orientation (0x0112), SHORT, 1 value, 8.
    const tiff = [0x4d, 0x4d, 0x00, 0x2a, 0, 0, 0, 8, 0, 1, 0x01, 0x12, 0, 3, 0, 0, 0, 1, 0, 8, 0, 0, 0, 0, 0, 0, 0, 0];
    const payload = [0x45, 0x78, 0x69, 0x66, 0, 0, ...tiff];
    const app1 = new Uint8Array([0xff, 0xe1, 0, payload.length + 2, ...payload]);
    const taken = withExif(new Uint8Array(await plain(16, 8).jpeg().toBuffer()), app1);
    expect((await sharp(taken).metadata()).orientation).toBe(8);
    const upright = exifUpright(taken)!;
    expect(
      (await sharp(withExif(new Uint8Array(await plain(8, 16).jpeg().toBuffer()), upright)).metadata()).orientation,
    ).toBe(1);
  });

  it('says null for a JPEG without EXIF and undefined for bytes it cannot follow', async () => {
    expect(exifUpright(new Uint8Array(await plain(8, 8).jpeg().toBuffer()))).toBeNull();
    expect(exifUpright(new Uint8Array(await plain(8, 8).png().toBuffer()))).toBeUndefined();
    const cut = new Uint8Array(
      await plain(8, 8).jpeg().withExif(CAMERA_AND_PLACE).withMetadata({ orientation: 3 }).toBuffer(),
    ).slice(0, 30);
    expect(exifUpright(cut)).toBeUndefined();
  });

  it('draws the long side at most 2,560 px and never enlarges', () => {
    expect(SHRINK_LONG_SIDE).toBe(2560);
    expect(shrunkSize(4000, 3000)).toEqual({ width: 2560, height: 1920 });
    expect(shrunkSize(3000, 4000)).toEqual({ width: 1920, height: 2560 });
    expect(shrunkSize(8160, 6120)).toEqual({ width: 2560, height: 1920 });
    expect(shrunkSize(1200, 900)).toEqual({ width: 1200, height: 900 });
  });
});
