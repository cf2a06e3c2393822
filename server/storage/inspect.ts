import { fileTypeFromBuffer } from 'file-type';
import sharp from 'sharp';
import { FILE_TYPES, type FileContentType } from '../../shared/schemas/files.ts';
import { HttpError } from '../errors.ts';

/** Width of photo thumbnails, px. */
export const THUMBNAIL_WIDTH = 320;

export interface InspectedFile { name: string; contentType: FileContentType; ext: string; isPhoto: boolean }

const EXTENSIONS: Record<string, FileContentType[]> = {
  jpg: ['image/jpeg'], jpeg: ['image/jpeg'], png: ['image/png'], webp: ['image/webp'],
  heic: ['image/heic', 'image/heif'], heif: ['image/heif', 'image/heic'], pdf: ['application/pdf'],
};

const badName = (detail: string) => new HttpError(400, 'bad-file-name', 'The file name is not accepted', detail, { errors: [{ field: 'file', message: detail }] });

/**
 * A display name the product will keep: no folders, no "..", no control characters. A name that
 * tries to point somewhere is refused rather than quietly changed, so the sender sees why.
 * @example checkFileName('pit photo.jpg') // 'pit photo.jpg'
 */
export function checkFileName(raw: string): string {
  const name = raw.normalize('NFC').trim();
  if (!name) throw badName('The file has no name.');
  if (/[/\\]/.test(name) || name.includes('..')) {
    throw badName('A file name may not contain a folder path or "..".');
  }
  // eslint-disable-next-line no-control-regex
  if (/[\u0000-\u001f\u007f]/.test(name)) throw badName('A file name may not contain control characters.');
  if (name.startsWith('.')) throw badName('A file name may not start with a dot.');
  if (name.length > 200) throw badName('A file name may be at most 200 characters.');
  return name;
}

/**
 * What a file really is, from its first bytes (magic numbers), never from its name; and the name's
 * extension, if it has one, must agree.
 */
export async function inspectFile(buffer: Buffer, rawName: string): Promise<InspectedFile> {
  const name = checkFileName(rawName);
  if (buffer.length === 0) throw new HttpError(400, 'empty-file', 'The file is empty', 'The file has no content.', { errors: [{ field: 'file', message: 'is empty' }] });
  const detected = await fileTypeFromBuffer(buffer);
  const contentType = detected?.mime as FileContentType | undefined;
  if (!contentType || !(contentType in FILE_TYPES)) {
    throw new HttpError(415, 'unsupported-file-type', 'This kind of file is not accepted',
      'Upload a photo (JPEG, PNG, WebP or HEIC) or a PDF.', { errors: [{ field: 'file', message: 'is not a JPEG, PNG, WebP, HEIC or PDF file' }] });
  }
  const dot = name.lastIndexOf('.');
  const ext = dot > 0 ? name.slice(dot + 1).toLowerCase() : '';
  if (ext && !(EXTENSIONS[ext] ?? []).includes(contentType)) {
    throw new HttpError(415, 'file-type-mismatch', 'The file is not what its name says',
      `The name ends in .${ext} but the content is ${contentType}.`, { errors: [{ field: 'file', message: `content is ${contentType}, not .${ext}` }] });
  }
  return { name, contentType, ext: FILE_TYPES[contentType].ext, isPhoto: FILE_TYPES[contentType].photo };
}

/**
 * A small JPEG of a photo, upright (EXIF orientation applied) and without its metadata (no location).
 * HEIC photos are kept without a thumbnail where the image library cannot decode them.
 */
export async function thumbnailOf(buffer: Buffer, contentType: FileContentType): Promise<Buffer | null> {
  try {
    return await sharp(buffer, { failOn: 'error' }).rotate().resize({ width: THUMBNAIL_WIDTH, withoutEnlargement: true }).jpeg({ quality: 75 }).toBuffer();
  } catch {
    if (contentType === 'image/heic' || contentType === 'image/heif') return null;
    throw new HttpError(400, 'unreadable-image', 'The photo could not be read', 'The file looks like a photo but is damaged or incomplete.', { errors: [{ field: 'file', message: 'could not be read as an image' }] });
  }
}
