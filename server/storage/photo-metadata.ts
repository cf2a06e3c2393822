import { crc32 } from 'node:zlib';
import type { FileContentType } from '../../shared/schemas/files.ts';

/*
 * Removing where a photo was taken, and with what, from the photo itself, without touching a pixel.
 *
 * A phone writes the place (EXIF GPS, XMP, IPTC), the camera's make, model and serial number, and
 * sometimes a second image with its own EXIF, into the file. Re-encoding would drop all of that but
 * would also lose quality on every upload, so each format's metadata blocks are cut out instead and
 * the compressed image data is copied byte for byte. The EXIF Orientation tag is the one thing kept
 * (written back in a minimal EXIF block), so a photo taken on its side still shows upright; colour
 * profiles (ICC) are kept too, as they carry nothing about the place or the camera.
 *
 * Formats: JPEG (ITU-T T.81 segments), PNG (ISO/IEC 15948 chunks), WebP (RIFF chunks, Google's
 * container specification) and HEIC/HEIF (ISO/IEC 23008-12 items, blanked in place).
 */

const ORIENTATION_TAG = 0x0112;
const EXIF_HEADER = Buffer.from('Exif\0\0', 'latin1');

/** The EXIF Orientation (1–8) in a TIFF block ("II*\0" or "MM\0*"), or null when there is none. */
export function tiffOrientation(tiff: Buffer): number | null {
  if (tiff.length < 8) return null;
  const order = tiff.toString('latin1', 0, 2);
  if (order !== 'II' && order !== 'MM') return null;
  const le = order === 'II';
  const u16 = (o: number) => (le ? tiff.readUInt16LE(o) : tiff.readUInt16BE(o));
  const u32 = (o: number) => (le ? tiff.readUInt32LE(o) : tiff.readUInt32BE(o));
  if (u16(2) !== 42) return null;
  const ifd = u32(4);
  if (ifd + 2 > tiff.length) return null;
  const count = u16(ifd);
  for (let i = 0; i < count; i++) {
    const entry = ifd + 2 + i * 12;
    if (entry + 12 > tiff.length) break;
    if (u16(entry) === ORIENTATION_TAG) {
      const value = u16(entry + 8);
      return value >= 1 && value <= 8 ? value : null;
    }
  }
  return null;
}

/** A big-endian TIFF block holding only the Orientation tag (26 bytes). */
export function orientationTiff(orientation: number): Buffer {
  const b = Buffer.alloc(26);
  b.write('MM', 0, 'latin1');
  b.writeUInt16BE(42, 2);
  b.writeUInt32BE(8, 4); // IFD0 follows the header
  b.writeUInt16BE(1, 8); // one entry
  b.writeUInt16BE(ORIENTATION_TAG, 10);
  b.writeUInt16BE(3, 12); // SHORT
  b.writeUInt32BE(1, 14); // one value
  b.writeUInt16BE(orientation, 18); // value, left-justified in the 4-byte field
  b.writeUInt32BE(0, 22); // no next IFD
  return b;
}

/** The TIFF inside an EXIF payload, with or without the "Exif\0\0" prefix. */
const tiffOf = (payload: Buffer) => (payload.subarray(0, 6).equals(EXIF_HEADER) ? payload.subarray(6) : payload);

// ---------------------------------------------------------------- JPEG

// APPn segments kept: APP0 (JFIF), APP2 only as ICC_PROFILE, APP14 (Adobe colour transform).
function keepJpegApp(marker: number, payload: Buffer): boolean {
  if (marker === 0xe0 || marker === 0xee) return true;
  if (marker === 0xe2) return payload.subarray(0, 12).toString('latin1') === 'ICC_PROFILE\0';
  return false;
}

function cleanJpeg(buf: Buffer): Buffer | null {
  if (buf.length < 4 || buf[0] !== 0xff || buf[1] !== 0xd8) return null;
  const kept: Buffer[] = [];
  let orientation: number | null = null;
  let removed = false;
  let sawScan = false;
  let sawEnd = false;
  let pos = 2;
  while (pos < buf.length) {
    if (buf[pos] !== 0xff) return null;
    const start = pos;
    while (buf[pos] === 0xff) pos++; // fill bytes before a marker
    const marker = buf[pos];
    if (marker === undefined) return null;
    pos++;
    if (marker === 0xd9) {
      sawEnd = true;
      break;
    }
    if ((marker >= 0xd0 && marker <= 0xd7) || marker === 0x01) {
      kept.push(buf.subarray(start, pos));
      continue;
    }
    if (pos + 2 > buf.length) return null;
    const end = pos + buf.readUInt16BE(pos);
    if (end > buf.length || end < pos + 2) return null;
    const payload = buf.subarray(pos + 2, end);
    if (marker === 0xda) {
      // A scan: its header, then entropy-coded data up to the next real marker (not FF00, not RSTn).
      let p = end;
      while (p + 1 < buf.length) {
        if (buf[p] === 0xff) {
          const next = buf[p + 1]!;
          if (next !== 0x00 && next !== 0xff && !(next >= 0xd0 && next <= 0xd7)) break;
        }
        p++;
      }
      kept.push(buf.subarray(start, p));
      sawScan = true;
      pos = p;
      continue;
    }
    const isApp = marker >= 0xe0 && marker <= 0xef;
    if (marker === 0xfe || (isApp && !keepJpegApp(marker, payload))) {
      if (marker === 0xe1 && payload.subarray(0, 6).equals(EXIF_HEADER))
        orientation ??= tiffOrientation(payload.subarray(6));
      removed = true;
    } else {
      kept.push(buf.subarray(start, end));
    }
    pos = end;
  }
  if (!sawScan || !sawEnd) return null;
  // Anything after the end of the image (a second picture, a maker's trailer) goes too.
  if (pos < buf.length) removed = true;
  if (!removed) return buf;
  const exif = orientation === null ? [] : [app1Exif(orientation)];
  // JFIF wants its APP0 first; the EXIF block follows it.
  const first = kept[0]?.[1] === 0xe0 ? [kept.shift()!] : [];
  return Buffer.concat([Buffer.from([0xff, 0xd8]), ...first, ...exif, ...kept, Buffer.from([0xff, 0xd9])]);
}

function app1Exif(orientation: number): Buffer {
  const body = Buffer.concat([EXIF_HEADER, orientationTiff(orientation)]);
  const head = Buffer.from([0xff, 0xe1, 0, 0]);
  head.writeUInt16BE(body.length + 2, 2);
  return Buffer.concat([head, body]);
}

// ---------------------------------------------------------------- PNG

const PNG_SIGNATURE = Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]);
// Text chunks hold XMP ("XML:com.adobe.xmp") and free-form notes; tIME is when it was last edited.
const PNG_DROPPED = new Set(['eXIf', 'tEXt', 'zTXt', 'iTXt', 'tIME']);

function pngChunk(type: string, data: Buffer): Buffer {
  const head = Buffer.alloc(8);
  head.writeUInt32BE(data.length, 0);
  head.write(type, 4, 'latin1');
  const crc = Buffer.alloc(4);
  crc.writeUInt32BE(crc32(Buffer.concat([head.subarray(4), data])), 0);
  return Buffer.concat([head, data, crc]);
}

function cleanPng(buf: Buffer): Buffer | null {
  if (buf.length < 8 || !buf.subarray(0, 8).equals(PNG_SIGNATURE)) return null;
  const kept: Buffer[] = [];
  let orientation: number | null = null;
  let removed = false;
  let exifAt = -1;
  let pos = 8;
  let sawEnd = false;
  while (pos + 12 <= buf.length) {
    const length = buf.readUInt32BE(pos);
    const type = buf.toString('latin1', pos + 4, pos + 8);
    const end = pos + 12 + length;
    if (end > buf.length) return null;
    if (PNG_DROPPED.has(type)) {
      if (type === 'eXIf') orientation ??= tiffOrientation(tiffOf(buf.subarray(pos + 8, pos + 8 + length)));
      removed = true;
    } else {
      if (type === 'IDAT' && exifAt < 0) exifAt = kept.length;
      kept.push(buf.subarray(pos, end));
    }
    pos = end;
    if (type === 'IEND') {
      sawEnd = true;
      break;
    }
  }
  if (!sawEnd) return null;
  if (pos < buf.length) removed = true;
  if (!removed) return buf;
  // eXIf goes before the image data (PNG third edition, 4.4.3).
  if (orientation !== null)
    kept.splice(exifAt < 0 ? kept.length - 1 : exifAt, 0, pngChunk('eXIf', orientationTiff(orientation)));
  return Buffer.concat([PNG_SIGNATURE, ...kept]);
}

// ---------------------------------------------------------------- WebP

const VP8X_EXIF = 0x08;
const VP8X_XMP = 0x04;

function riffChunk(fourcc: string, data: Buffer): Buffer {
  const head = Buffer.alloc(8);
  head.write(fourcc, 0, 'latin1');
  head.writeUInt32LE(data.length, 4);
  return Buffer.concat([head, data, data.length % 2 ? Buffer.alloc(1) : Buffer.alloc(0)]);
}

function cleanWebp(buf: Buffer): Buffer | null {
  if (buf.length < 12 || buf.toString('latin1', 0, 4) !== 'RIFF' || buf.toString('latin1', 8, 12) !== 'WEBP')
    return null;
  const riffEnd = Math.min(buf.length, 8 + buf.readUInt32LE(4));
  const kept: Buffer[] = [];
  let orientation: number | null = null;
  let removed = riffEnd < buf.length;
  let pos = 12;
  while (pos + 8 <= riffEnd) {
    const fourcc = buf.toString('latin1', pos, pos + 4);
    const size = buf.readUInt32LE(pos + 4);
    const end = pos + 8 + size + (size % 2);
    if (pos + 8 + size > riffEnd) return null;
    if (fourcc === 'EXIF' || fourcc === 'XMP ') {
      if (fourcc === 'EXIF') orientation ??= tiffOrientation(tiffOf(buf.subarray(pos + 8, pos + 8 + size)));
      removed = true;
    } else {
      kept.push(Buffer.from(buf.subarray(pos, Math.min(end, riffEnd))));
    }
    pos = end;
  }
  if (!removed) return buf;
  const vp8x = kept[0]?.toString('latin1', 0, 4) === 'VP8X' ? kept[0] : null;
  if (vp8x) {
    vp8x[8] = (vp8x[8]! & ~(VP8X_EXIF | VP8X_XMP)) | (orientation !== null ? VP8X_EXIF : 0);
    // EXIF comes after the image data (WebP container specification, "Extended file format").
    if (orientation !== null) kept.push(riffChunk('EXIF', orientationTiff(orientation)));
  }
  const body = Buffer.concat([Buffer.from('WEBP', 'latin1'), ...kept]);
  const head = Buffer.alloc(8);
  head.write('RIFF', 0, 'latin1');
  head.writeUInt32LE(body.length, 4);
  return Buffer.concat([head, body]);
}

// ---------------------------------------------------------------- HEIC / HEIF

interface Box {
  type: string;
  start: number;
  body: number;
  end: number;
}

function boxes(buf: Buffer, from: number, to: number): Box[] | null {
  const out: Box[] = [];
  let pos = from;
  while (pos + 8 <= to) {
    let size = buf.readUInt32BE(pos);
    const type = buf.toString('latin1', pos + 4, pos + 8);
    let body = pos + 8;
    if (size === 1) {
      if (pos + 16 > to) return null;
      size = Number(buf.readBigUInt64BE(pos + 8));
      body = pos + 16;
    } else if (size === 0) {
      size = to - pos;
    }
    if (size < body - pos || pos + size > to) return null;
    out.push({ type, start: pos, body, end: pos + size });
    pos += size;
  }
  return out;
}

/** Reads an unsigned big-endian integer of 0, 4 or 8 bytes (the sizes iloc allows). */
function readSized(buf: Buffer, at: number, bytes: number): number {
  if (bytes === 0) return 0;
  if (bytes === 4) return buf.readUInt32BE(at);
  if (bytes === 8) return Number(buf.readBigUInt64BE(at));
  throw new RangeError(`unsupported field size ${bytes}`);
}

interface Extent {
  offset: number;
  length: number;
}

/** Item id → type (and MIME type for 'mime' items), from iinf. */
function itemTypes(buf: Buffer, iinf: Box): Map<number, string> {
  const types = new Map<number, string>();
  const version = buf[iinf.body]!;
  const first = iinf.body + 4 + (version === 0 ? 2 : 4);
  for (const infe of boxes(buf, first, iinf.end) ?? []) {
    if (infe.type !== 'infe') continue;
    const v = buf[infe.body]!;
    if (v < 2) continue; // versions 0 and 1 predate item types; HEIF writers use 2 or 3
    let p = infe.body + 4;
    const id = v === 2 ? buf.readUInt16BE(p) : buf.readUInt32BE(p);
    p += (v === 2 ? 2 : 4) + 2; // id, protection index
    const type = buf.toString('latin1', p, p + 4);
    p += 4;
    if (type === 'mime') {
      const nameEnd = buf.indexOf(0, p);
      const typeEnd = nameEnd < 0 ? -1 : buf.indexOf(0, nameEnd + 1);
      const contentType =
        nameEnd < 0 ? '' : buf.toString('latin1', nameEnd + 1, typeEnd < 0 || typeEnd > infe.end ? infe.end : typeEnd);
      types.set(id, `mime:${contentType}`);
    } else {
      types.set(id, type);
    }
  }
  return types;
}

/** Item id → where its bytes are in the file, from iloc (file offsets, or inside idat). */
function itemExtents(buf: Buffer, iloc: Box, idat: Box | null): Map<number, Extent[]> | null {
  const out = new Map<number, Extent[]>();
  const version = buf[iloc.body]!;
  let p = iloc.body + 4;
  const sizes = buf.readUInt16BE(p);
  p += 2;
  const offsetSize = sizes >> 12;
  const lengthSize = (sizes >> 8) & 0xf;
  const baseOffsetSize = (sizes >> 4) & 0xf;
  const indexSize = version >= 1 ? sizes & 0xf : 0;
  const count = version < 2 ? buf.readUInt16BE(p) : buf.readUInt32BE(p);
  p += version < 2 ? 2 : 4;
  for (let i = 0; i < count; i++) {
    const id = version < 2 ? buf.readUInt16BE(p) : buf.readUInt32BE(p);
    p += version < 2 ? 2 : 4;
    let method = 0;
    if (version >= 1) {
      method = buf.readUInt16BE(p) & 0xf;
      p += 2;
    }
    p += 2; // data reference index
    const base = readSized(buf, p, baseOffsetSize);
    p += baseOffsetSize;
    const extentCount = buf.readUInt16BE(p);
    p += 2;
    const extents: Extent[] = [];
    for (let e = 0; e < extentCount; e++) {
      p += indexSize;
      const offset = readSized(buf, p, offsetSize);
      p += offsetSize;
      const length = readSized(buf, p, lengthSize);
      p += lengthSize;
      extents.push({ offset, length });
    }
    if (method === 2) {
      out.set(id, []);
      continue;
    } // built from other items: holds no bytes of its own
    if (method === 1 && idat === null) return null;
    const origin = method === 1 ? idat!.body : 0;
    // A length of 0 means "to the end" of the file or of idat (ISO/IEC 14496-12, 8.11.3).
    const limit = method === 1 ? idat!.end : buf.length;
    out.set(
      id,
      extents.map((x) => {
        const offset = origin + base + x.offset;
        return { offset, length: x.length === 0 ? limit - offset : x.length };
      }),
    );
  }
  if (p > iloc.end) return null;
  return out;
}

const EMPTY_XMP = '<x:xmpmeta xmlns:x="adobe:ns:meta/"/>';

function cleanHeif(original: Buffer): Buffer | null {
  const top = boxes(original, 0, original.length);
  const meta = top?.find((b) => b.type === 'meta');
  if (!top || top[0]?.type !== 'ftyp' || !meta) return null;
  try {
    const children = boxes(original, meta.body + 4, meta.end);
    const iinf = children?.find((b) => b.type === 'iinf');
    const iloc = children?.find((b) => b.type === 'iloc');
    if (!children || !iinf || !iloc) return null;
    const idat = children.find((b) => b.type === 'idat');
    const types = itemTypes(original, iinf);
    const extents = itemExtents(original, iloc, idat ?? null);
    if (!extents) return null;
    const buf = Buffer.from(original);
    let removed = false;
    for (const [id, type] of types) {
      const isExif = type === 'Exif';
      const isXmp = type === 'mime:application/rdf+xml';
      if (!isExif && !isXmp) continue;
      const parts = extents.get(id) ?? [];
      if (parts.some((x) => x.length < 0 || x.offset + x.length > buf.length)) return null;
      const payload = Buffer.concat(parts.map((x) => buf.subarray(x.offset, x.offset + x.length)));
      const blank = isXmp ? Buffer.alloc(payload.length, 0x20) : Buffer.alloc(payload.length);
      if (isXmp && payload.length >= EMPTY_XMP.length) blank.write(EMPTY_XMP, 0, 'latin1');
      if (isExif && payload.length >= 4) {
        // The payload starts with the offset of the TIFF header inside it (ISO/IEC 23008-12, A.2.1).
        const tiffAt = 4 + payload.readUInt32BE(0);
        const orientation = tiffAt < payload.length ? tiffOrientation(payload.subarray(tiffAt)) : null;
        if (orientation !== null && tiffAt + 26 <= payload.length) {
          payload.copy(blank, 0, 0, tiffAt);
          orientationTiff(orientation).copy(blank, tiffAt);
        }
      }
      // Same length, same place: every other offset in the file stays right.
      let at = 0;
      for (const x of parts) {
        blank.copy(buf, x.offset, at, at + x.length);
        at += x.length;
      }
      removed = true;
    }
    return removed ? buf : original;
  } catch {
    return null; // a box shorter than its fields say
  }
}

/**
 * The photo without its location, camera and editing metadata, orientation kept; pixels and
 * compressed data untouched. Returns the same buffer when there was nothing to remove, and null
 * when the file's structure cannot be followed (so it is not stored with its metadata).
 * @example stripPhotoMetadata(upload, 'image/jpeg') // the JPEG without GPS, make, model, XMP, IPTC
 */
export function stripPhotoMetadata(buffer: Buffer, contentType: FileContentType): Buffer | null {
  switch (contentType) {
    case 'image/jpeg':
      return cleanJpeg(buffer);
    case 'image/png':
      return cleanPng(buffer);
    case 'image/webp':
      return cleanWebp(buffer);
    case 'image/heic':
    case 'image/heif':
      return cleanHeif(buffer);
    default:
      return buffer;
  }
}
