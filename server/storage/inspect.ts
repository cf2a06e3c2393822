import { fileTypeFromBuffer } from 'file-type';
import sharp from 'sharp';
import { FILE_TYPES, type FileContentType } from '../../shared/schemas/files.ts';
import { TEXT_MESSAGES, textProblem } from '../../shared/schemas/common.ts';
import { HttpError } from '../errors.ts';
import { stripPhotoMetadata } from './photo-metadata.ts';

/** Width of photo thumbnails, px. */
export const THUMBNAIL_WIDTH = 320;

export interface InspectedFile {
  name: string;
  contentType: FileContentType;
  ext: string;
  isPhoto: boolean;
}

const EXTENSIONS: Record<string, FileContentType[]> = {
  jpg: ['image/jpeg'],
  jpeg: ['image/jpeg'],
  png: ['image/png'],
  webp: ['image/webp'],
  heic: ['image/heic', 'image/heif'],
  heif: ['image/heif', 'image/heic'],
  pdf: ['application/pdf'],
};

const badName = (detail: string) =>
  new HttpError(400, 'bad-file-name', 'The file name is not accepted', detail, {
    errors: [{ field: 'file', message: detail }],
  });

/**
 * A display name the product will keep: no folders, no "..", no control characters, no
 * text-direction overrides (U+202A–U+202E, U+2066–U+2069). A name that tries to point somewhere or
 * to disguise itself is refused rather than quietly changed, so the sender sees why.
 * @example checkFileName('pit photo.jpg') // 'pit photo.jpg'
 */
export function checkFileName(raw: string): string {
  const normalized = raw.normalize('NFC');
  const name = normalized.trim();
  if (!name) throw badName('The file has no name.');
  if (/[/\\]/.test(name) || name.includes('..')) {
    throw badName('A file name may not contain a folder path or "..".');
  }
  // Control characters and bidirectional overrides (a name that shows as "gpj.exe" the other way
  // round), looked for before trimming so a trailing line break is refused too, never cleaned away.
  const problem = textProblem(normalized, 'one-line');
  if (problem === TEXT_MESSAGES.brokenCharacter) throw badName('A file name may not contain broken characters.');
  if (problem)
    throw badName('A file name may not contain line breaks, tabs, control characters or text-direction overrides.');
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
  if (buffer.length === 0)
    throw new HttpError(400, 'empty-file', 'The file is empty', 'The file has no content.', {
      errors: [{ field: 'file', message: 'is empty' }],
    });
  const detected = await fileTypeFromBuffer(buffer);
  const contentType = detected?.mime as FileContentType | undefined;
  if (!contentType || !(contentType in FILE_TYPES)) {
    throw new HttpError(
      415,
      'unsupported-file-type',
      'This kind of file is not accepted',
      'Upload a photo (JPEG, PNG, WebP or HEIC) or a PDF.',
      { errors: [{ field: 'file', message: 'is not a JPEG, PNG, WebP, HEIC or PDF file' }] },
    );
  }
  const dot = name.lastIndexOf('.');
  const ext = dot > 0 ? name.slice(dot + 1).toLowerCase() : '';
  if (ext && !(EXTENSIONS[ext] ?? []).includes(contentType)) {
    throw new HttpError(
      415,
      'file-type-mismatch',
      'The file is not what its name says',
      `The name ends in .${ext} but the content is ${contentType}.`,
      { errors: [{ field: 'file', message: `content is ${contentType}, not .${ext}` }] },
    );
  }
  return { name, contentType, ext: FILE_TYPES[contentType].ext, isPhoto: FILE_TYPES[contentType].photo };
}

/**
 * A small JPEG of a photo, upright (EXIF orientation applied) and without its metadata (no location).
 * HEIC photos are kept without a thumbnail where the image library cannot decode them.
 */
export async function thumbnailOf(buffer: Buffer, contentType: FileContentType): Promise<Buffer | null> {
  try {
    return await sharp(buffer, { failOn: 'error' })
      .rotate()
      .resize({ width: THUMBNAIL_WIDTH, withoutEnlargement: true })
      .jpeg({ quality: 75 })
      .toBuffer();
  } catch {
    if (contentType === 'image/heic' || contentType === 'image/heif') return null;
    throw new HttpError(
      400,
      'unreadable-image',
      'The photo could not be read',
      'The file looks like a photo but is damaged or incomplete.',
      { errors: [{ field: 'file', message: 'could not be read as an image' }] },
    );
  }
}

/**
 * The original as it is stored: without its location and camera details (EXIF, XMP, IPTC), the
 * orientation tag kept and the image data untouched, unless the firm keeps photo locations.
 * A photo whose layout cannot be followed is refused rather than stored with its location.
 */
export function storedOriginal(buffer: Buffer, info: InspectedFile, keepLocation: boolean): Buffer {
  if (!info.isPhoto || keepLocation) return buffer;
  const cleaned = stripPhotoMetadata(buffer, info.contentType);
  if (!cleaned) {
    throw new HttpError(
      400,
      'unreadable-image',
      'The photo could not be read',
      "The photo's layout could not be followed, so its location could not be removed.",
      { errors: [{ field: 'file', message: 'could not be read as an image' }] },
    );
  }
  return cleaned;
}
