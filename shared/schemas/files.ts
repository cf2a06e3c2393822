import { z } from 'zod';
import './messages.ts';

/** The kinds of file a job may hold, by what their content is (never by their name). */
export const FILE_TYPES = {
  'image/jpeg': { ext: 'jpg', photo: true },
  'image/png': { ext: 'png', photo: true },
  'image/webp': { ext: 'webp', photo: true },
  'image/heic': { ext: 'heic', photo: true },
  'image/heif': { ext: 'heif', photo: true },
  'application/pdf': { ext: 'pdf', photo: false },
} as const;
export type FileContentType = keyof typeof FILE_TYPES;

/** 10 MB, the largest file a job takes. */
export const MAX_FILE_BYTES = 10 * 1024 * 1024;

export const FileView = z.object({
  id: z.string(),
  jobId: z.string(),
  name: z.string(),
  contentType: z.string(),
  sizeBytes: z.number(),
  isPhoto: z.boolean(),
  createdAt: z.string(),
  uploadedBy: z.string().nullable(),
  /** Private links that stop working at `linksExpireAt`. */
  url: z.string(),
  thumbnailUrl: z.string().nullable(),
  linksExpireAt: z.string(),
});
export type FileView = z.infer<typeof FileView>;
