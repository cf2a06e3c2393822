import { S3Client, PutObjectCommand, DeleteObjectCommand, GetObjectCommand } from '@aws-sdk/client-s3';
import { getSignedUrl } from '@aws-sdk/s3-request-presigner';
import type { Config } from '../config.ts';

// The SDK prints, once per process, that versions published after January 2027 will need Node 22.
// The locked version runs on this product's Node 20; moving to Node 22 is a planned upgrade, not a
// fault of a running installation. The SDK's own switch keeps the notice out of server and test logs.
process.env.AWS_SDK_JS_NODE_VERSION_SUPPORT_WARNING_DISABLED ??= 'true';

export interface PresignOptions {
  expiresInSeconds: number;
  downloadName?: string;
  contentType?: string;
}

/** Where job files' bytes live. The database holds only their keys. */
export interface ObjectStore {
  put(key: string, body: Buffer, contentType: string): Promise<void>;
  delete(key: string): Promise<void>;
  /** An object's bytes (the handover pack the mail worker attaches). */
  get(key: string): Promise<Buffer>;
  /** A private link to one object that stops working after `expiresInSeconds`. */
  presignGet(key: string, options: PresignOptions): Promise<string>;
  close(): void;
}

/** An RFC 6266 Content-Disposition that survives any name: ASCII fallback plus the UTF-8 form. */
export function contentDisposition(name: string, inline: boolean): string {
  const ascii = name.replace(/[^\x20-\x7e]/g, '_').replace(/["\\]/g, '_');
  return `${inline ? 'inline' : 'attachment'}; filename="${ascii}"; filename*=UTF-8''${encodeURIComponent(name)}`;
}

/** S3 (or an S3-compatible store: the local fake on loopback in development and tests). */
export class S3ObjectStore implements ObjectStore {
  private readonly client: S3Client;
  private readonly bucket: string;

  constructor(config: Pick<Config, 'S3_ENDPOINT' | 'S3_BUCKET' | 'S3_ACCESS_KEY_ID' | 'S3_SECRET_ACCESS_KEY'>) {
    this.bucket = config.S3_BUCKET;
    this.client = new S3Client({
      region: process.env.S3_REGION ?? 'us-east-1',
      ...(config.S3_ENDPOINT ? { endpoint: config.S3_ENDPOINT, forcePathStyle: true } : {}),
      ...(config.S3_ACCESS_KEY_ID && config.S3_SECRET_ACCESS_KEY
        ? { credentials: { accessKeyId: config.S3_ACCESS_KEY_ID, secretAccessKey: config.S3_SECRET_ACCESS_KEY } }
        : {}),
      // Checksums only where S3 requires them: S3-compatible stores differ in the newer ones.
      requestChecksumCalculation: 'WHEN_REQUIRED',
      responseChecksumValidation: 'WHEN_REQUIRED',
      maxAttempts: 2,
    });
  }

  async put(key: string, body: Buffer, contentType: string): Promise<void> {
    await this.client.send(
      new PutObjectCommand({
        Bucket: this.bucket,
        Key: key,
        Body: body,
        ContentType: contentType,
        ContentLength: body.length,
      }),
    );
  }

  async delete(key: string): Promise<void> {
    await this.client.send(new DeleteObjectCommand({ Bucket: this.bucket, Key: key }));
  }

  async get(key: string): Promise<Buffer> {
    const out = await this.client.send(new GetObjectCommand({ Bucket: this.bucket, Key: key }));
    if (!out.Body) throw new Error(`object ${key} has no body`);
    return Buffer.from(await out.Body.transformToByteArray());
  }

  async presignGet(key: string, options: PresignOptions): Promise<string> {
    return getSignedUrl(
      this.client,
      new GetObjectCommand({
        Bucket: this.bucket,
        Key: key,
        ...(options.downloadName ? { ResponseContentDisposition: contentDisposition(options.downloadName, true) } : {}),
        ...(options.contentType ? { ResponseContentType: options.contentType } : {}),
      }),
      { expiresIn: options.expiresInSeconds },
    );
  }

  close(): void {
    this.client.destroy();
  }
}
