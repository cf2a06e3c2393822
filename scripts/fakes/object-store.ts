import { mkdirSync, rmSync } from 'node:fs';
import path from 'node:path';
import S3rver from 's3rver';

export interface FakeObjectStore {
  endpoint: string;
  bucket: string;
  accessKeyId: string;
  secretAccessKey: string;
  stop(): Promise<void>;
}

/** s3rver's own fixed credentials: it accepts only these. */
const CREDENTIALS = { accessKeyId: 'S3RVER', secretAccessKey: 'S3RVER' };

/**
 * A local stand-in for S3 on 127.0.0.1 (s3rver, files on disk under `dataDir`), with the bucket made.
 * `fresh` empties it first, so each test run starts with no objects.
 */
export async function startFakeObjectStore(
  dataDir: string,
  port: number,
  bucket: string,
  fresh: boolean,
): Promise<FakeObjectStore> {
  const directory = path.join(dataDir, port === 0 ? `s3-test-${process.pid}` : `s3-${port}`);
  if (fresh) rmSync(directory, { recursive: true, force: true });
  mkdirSync(directory, { recursive: true });
  const server = new S3rver({
    address: '127.0.0.1',
    port,
    silent: true,
    directory,
    configureBuckets: [{ name: bucket }],
  });
  // Port 0 takes any free port (test runs): report the one actually bound.
  const bound = (await server.run()) as unknown as { port: number };
  return {
    endpoint: `http://127.0.0.1:${bound.port}`,
    bucket,
    ...CREDENTIALS,
    async stop() {
      await server.close();
      if (port === 0) rmSync(directory, { recursive: true, force: true });
    },
  };
}
