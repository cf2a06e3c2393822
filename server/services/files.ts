import { randomUUID } from 'node:crypto';
import type { Knex } from 'knex';
import type { FileView } from '../../shared/schemas/files.ts';
import { FILE_TYPES, type FileContentType } from '../../shared/schemas/files.ts';
import { Job } from '../models/index.ts';
import { FirmSettings, JobFile } from '../models/job-records.ts';
import { HttpError, NotFoundError } from '../errors.ts';
import type { ObjectStore } from '../storage/object-store.ts';
import { inspectFile, storedOriginal, thumbnailOf } from '../storage/inspect.ts';
import type { Actor } from './actor.ts';
import { findVisible, scoped } from './scope.ts';
import { recordChange } from './audit.ts';

/** Private links last ten minutes. */
export const LINK_SECONDS = 10 * 60;

export class StorageUnavailableError extends HttpError {
  constructor() {
    super(
      503,
      'storage-unavailable',
      'File storage is not available',
      'The file was not saved. Try again in a moment.',
    );
  }
}

export interface Upload {
  buffer: Buffer;
  originalName: string;
}

/** What {@link FilesService.keep} stores, for whom, and what else it writes with the row. */
export interface KeepFile {
  jobId: string;
  upload: Upload;
  /** The person who sent it (null from a link with no signed-in person). */
  uploadedBy: string | null;
  actor: Actor | null;
  /** Whose audit log the upload goes in, when not the actor's firm (a partner adding to an installer's job). */
  auditFirmId?: string;
  keepLocation: boolean;
  /** Only these types (checked from the content), with the sentence a refusal says. */
  accept?: readonly FileContentType[];
  acceptText?: string;
  also?: (trx: Knex.Transaction, file: JobFile) => Promise<void>;
}

/**
 * A job's photos and documents. The bytes go to object storage and a row to the database, both or
 * neither: if the row cannot be written the objects are removed again, and if storage fails no row
 * is written. A photo's original is stored without its location and camera details unless the
 * firm's settings keep them (see storedOriginal).
 */
export class FilesService {
  constructor(
    private readonly knex: Knex,
    private readonly store: ObjectStore,
    private readonly log: { error: (o: object, m: string) => void } = console,
  ) {}

  private async view(f: JobFile, now = new Date()): Promise<FileView> {
    const isPhoto = FILE_TYPES[f.contentType as FileContentType]?.photo ?? false;
    const [url, thumbnailUrl] = await Promise.all([
      this.store.presignGet(f.objectKey, {
        expiresInSeconds: LINK_SECONDS,
        downloadName: f.name,
        contentType: f.contentType,
      }),
      f.thumbnailKey
        ? this.store.presignGet(f.thumbnailKey, { expiresInSeconds: LINK_SECONDS, contentType: 'image/jpeg' })
        : Promise.resolve(null),
    ]);
    return {
      id: f.id,
      jobId: f.jobId,
      name: f.name,
      contentType: f.contentType,
      sizeBytes: f.sizeBytes,
      isPhoto,
      createdAt: f.createdAt.toISOString(),
      uploadedBy: f.uploadedBy,
      url,
      thumbnailUrl,
      linksExpireAt: new Date(now.getTime() + LINK_SECONDS * 1000).toISOString(),
    };
  }

  async list(actor: Actor, jobId: string): Promise<FileView[]> {
    await findVisible(Job, actor, jobId, undefined, 'job');
    const files = await scoped(JobFile, actor)
      .where('job_files.job_id', jobId)
      .orderBy('created_at', 'desc')
      .orderBy('id', 'desc');
    return Promise.all(files.map((f) => this.view(f)));
  }

  async upload(actor: Actor, jobId: string, upload: Upload): Promise<FileView> {
    const job = await findVisible(Job, actor, jobId, undefined, 'job');
    // The firm's own photos are the firm's call: by default a stored original carries no location.
    const keepLocation = (await scoped(FirmSettings, actor).first())?.keepPhotoLocation ?? false;
    return this.view(await this.keep({ jobId: String(job.id), upload, uploadedBy: actor.userId, actor, keepLocation }));
  }

  /**
   * The one upload path: inspects the content (type from its bytes, `accept` narrowing it), keeps
   * the object(s) and the row, both or neither; `also` runs in the row's transaction (a row that
   * points at the new file). Callers decide first who may add a file to the job.
   */
  async keep(input: KeepFile): Promise<JobFile> {
    const { upload } = input;
    const info = await inspectFile(upload.buffer, upload.originalName);
    if (input.accept && !input.accept.includes(info.contentType)) {
      throw new HttpError(
        415,
        'unsupported-file-type',
        'This kind of file is not accepted',
        input.acceptText ?? 'This file type is not accepted here.',
        { errors: [{ field: 'file', message: `is ${info.contentType}, not ${input.accept.join(' or ')}` }] },
      );
    }
    const thumbnail = info.isPhoto ? await thumbnailOf(upload.buffer, info.contentType) : null;
    const original = storedOriginal(upload.buffer, info, input.keepLocation);
    const base = `jobs/${input.jobId}/${randomUUID()}`;
    const objectKey = `${base}.${info.ext}`;
    const thumbnailKey = thumbnail ? `${base}-thumb.jpg` : null;
    const stored: string[] = [];
    try {
      await this.store.put(objectKey, original, info.contentType);
      stored.push(objectKey);
      if (thumbnail && thumbnailKey) {
        await this.store.put(thumbnailKey, thumbnail, 'image/jpeg');
        stored.push(thumbnailKey);
      }
    } catch (err) {
      await this.removeQuietly(stored);
      this.log.error({ err }, 'object storage refused an upload');
      throw new StorageUnavailableError();
    }
    try {
      return await this.knex.transaction(async (trx) => {
        const created = await JobFile.query(trx).insertAndFetch({
          jobId: input.jobId,
          objectKey,
          thumbnailKey,
          name: info.name,
          contentType: info.contentType,
          sizeBytes: original.length,
          uploadedBy: input.uploadedBy,
        } as Partial<JobFile>);
        await recordChange(
          trx,
          input.actor,
          'job_file',
          created.id,
          'create',
          null,
          { ...created },
          input.auditFirmId ?? input.actor?.firmId ?? null,
        );
        await input.also?.(trx, created);
        return created;
      });
    } catch (err) {
      await this.removeQuietly(stored);
      throw err;
    }
  }

  /** Removes the row and its objects together: if storage refuses, the row stays. */
  async remove(actor: Actor, id: string): Promise<void> {
    await this.knex.transaction(async (trx) => {
      const file = await scoped(JobFile, actor, trx).findById(id).forUpdate();
      if (!file) throw new NotFoundError('file');
      await JobFile.query(trx).deleteById(id);
      await recordChange(trx, actor, 'job_file', id, 'delete', { ...file }, null);
      try {
        for (const key of [file.objectKey, file.thumbnailKey]) if (key) await this.store.delete(key);
      } catch (err) {
        this.log.error({ err }, 'object storage refused a delete');
        throw new StorageUnavailableError();
      }
    });
  }

  private async removeQuietly(keys: string[]): Promise<void> {
    for (const key of keys) {
      try {
        await this.store.delete(key);
      } catch (err) {
        this.log.error({ err, key }, 'could not remove an object after a failed upload');
      }
    }
  }
}
