/**
 * Photos made smaller on the phone before they are sent: a camera's 12–50 megapixel JPEG (3–15 MB)
 * takes minutes over a weak signal on site, and past 10 MB it is refused. Shrunk to at most
 * {@link SHRINK_LONG_SIDE} pixels on its long side it is a megabyte or two and still shows a pit's
 * depth, a base's finish or a cable run plainly (common practice, no source).
 *
 * The photo's EXIF block goes with it, its orientation set to upright (the pixels are turned already):
 * whether the location is kept stays the firm's choice, made by the server as for any upload.
 */

/** Longest side of a shrunk photo, px. */
export const SHRINK_LONG_SIDE = 2560;
/** Photos up to this size are sent as they are. */
export const SHRINK_ABOVE_BYTES = 2 * 1024 * 1024;
/** JPEG quality of a shrunk photo (0–1). */
const QUALITY = 0.85;

const EXIF_HEADER = [0x45, 0x78, 0x69, 0x66, 0x00, 0x00]; // "Exif\0\0"
const ORIENTATION_TAG = 0x0112;

/**
 * The EXIF segment (APP1, marker and length included) of a JPEG's header, copied, with its
 * Orientation set to 1; null when the JPEG has none, undefined when its header can't be followed.
 * @example exifUpright(jpegBytes) // Uint8Array [0xff, 0xe1, …] or null
 */
export function exifUpright(jpeg: Uint8Array): Uint8Array | null | undefined {
  if (jpeg[0] !== 0xff || jpeg[1] !== 0xd8) return undefined;
  let pos = 2;
  while (pos + 4 <= jpeg.length) {
    if (jpeg[pos] !== 0xff) return undefined;
    const marker = jpeg[pos + 1]!;
    // Start of scan or end of image: the header is over.
    if (marker === 0xda || marker === 0xd9) return null;
    const length = (jpeg[pos + 2]! << 8) | jpeg[pos + 3]!;
    const end = pos + 2 + length;
    if (length < 2 || end > jpeg.length) return undefined;
    if (marker === 0xe1 && EXIF_HEADER.every((b, i) => jpeg[pos + 4 + i] === b)) {
      const segment = jpeg.slice(pos, end);
      return setUpright(segment, 10) ? segment : undefined;
    }
    pos = end;
  }
  return undefined;
}

/** Sets the Orientation entry of IFD0 of the TIFF block at `tiff` to 1 (true when the block could be read). */
function setUpright(segment: Uint8Array, tiff: number): boolean {
  const view = new DataView(segment.buffer, segment.byteOffset, segment.byteLength);
  if (tiff + 8 > segment.length) return false;
  const order = view.getUint16(tiff);
  if (order !== 0x4949 && order !== 0x4d4d) return false; // "II" or "MM"
  const little = order === 0x4949;
  const ifd = tiff + view.getUint32(tiff + 4, little);
  if (ifd + 2 > segment.length) return false;
  const count = view.getUint16(ifd, little);
  if (ifd + 2 + count * 12 > segment.length) return false;
  for (let i = 0; i < count; i++) {
    const entry = ifd + 2 + i * 12;
    // A SHORT value sits in the first two bytes of the entry's value field (TIFF 6.0, section 2).
    if (view.getUint16(entry, little) === ORIENTATION_TAG) view.setUint16(entry + 8, 1, little);
  }
  return true;
}

/**
 * A JPEG with an EXIF segment put in after its JFIF header (or straight after the start, without one).
 * @example withExif(canvasJpeg, exifUpright(original)!)
 */
export function withExif(jpeg: Uint8Array, exif: Uint8Array): Uint8Array<ArrayBuffer> {
  let at = 2;
  if (jpeg[2] === 0xff && jpeg[3] === 0xe0) at = 4 + ((jpeg[4]! << 8) | jpeg[5]!);
  const out = new Uint8Array(jpeg.length + exif.length);
  out.set(jpeg.subarray(0, at), 0);
  out.set(exif, at);
  out.set(jpeg.subarray(at), at + exif.length);
  return out;
}

/**
 * The size a photo is drawn at: its long side at most {@link SHRINK_LONG_SIDE}, never enlarged.
 * @example shrunkSize(4000, 3000) // { width: 2560, height: 1920 }
 */
export function shrunkSize(width: number, height: number): { width: number; height: number } {
  const scale = Math.min(1, SHRINK_LONG_SIDE / Math.max(width, height));
  return { width: Math.max(1, Math.round(width * scale)), height: Math.max(1, Math.round(height * scale)) };
}

/**
 * A JPEG photo over {@link SHRINK_ABOVE_BYTES}, drawn upright at {@link shrunkSize} and encoded
 * again, with its EXIF; anything else, a photo the browser can't draw, one whose header can't be
 * followed (its location could not be carried over) or one that would not come out smaller, is
 * given back as it is, for the server to judge.
 * @example const ready = await shrinkPhoto(file) // a File of a megabyte or two, or `file`
 */
export async function shrinkPhoto(file: File): Promise<File> {
  if (file.type !== 'image/jpeg' || file.size <= SHRINK_ABOVE_BYTES || typeof createImageBitmap !== 'function')
    return file;
  const original = new Uint8Array(await file.arrayBuffer());
  const exif = exifUpright(original);
  if (exif === undefined) return file;
  let bitmap: ImageBitmap;
  try {
    bitmap = await createImageBitmap(file, { imageOrientation: 'from-image' });
  } catch {
    return file;
  }
  try {
    const size = shrunkSize(bitmap.width, bitmap.height);
    const canvas = document.createElement('canvas');
    canvas.width = size.width;
    canvas.height = size.height;
    const pen = canvas.getContext('2d');
    if (!pen) return file;
    pen.drawImage(bitmap, 0, 0, size.width, size.height);
    const blob = await new Promise<Blob | null>((resolve) => canvas.toBlob(resolve, 'image/jpeg', QUALITY));
    if (!blob) return file;
    const encoded = new Uint8Array(await blob.arrayBuffer());
    const bytes = exif === null ? encoded : withExif(encoded, exif);
    if (bytes.length >= file.size) return file;
    return new File([bytes], file.name, { type: 'image/jpeg', lastModified: file.lastModified });
  } finally {
    bitmap.close();
  }
}
