/**
 * A local S3 fake (s3rver) on 127.0.0.1 for the storage contract tests and the scale bench: a bucket kept in
 * a temporary folder, reached with path-style requests and any key pair (signatures are checked, with the
 * fake's own pair). It also answers the multipart-upload calls s3rver lacks (`s3-multipart.ts`).
 */
import { mkdtemp, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import S3rver from 's3rver';
import { S3Storage } from '../../server/storage';
import { fakeMultipartUploads, multipartCalls, type FakeMultipartUpload } from './s3-multipart';

/** The fake's fixed key pair (s3rver accepts only this one). */
export const S3_FAKE_KEYS = { accessKeyId: 'S3RVER', secretAccessKey: 'S3RVER' } as const;

export interface S3Fake {
  endpoint: string;
  port: number;
  bucket: string;
  /** The folder holding the fake's buckets. */
  directory: string;
  /** A storage on the fake's bucket, with its scratch folder under `scratchDir`. */
  storage(scratchDir: string, options?: { partSizeBytes?: number }): S3Storage;
  /** The multipart uploads in progress in the bucket. */
  multipartUploads(): Promise<FakeMultipartUpload[]>;
  stop(): Promise<void>;
}

/** Starts the fake on `port` (S3_FAKE_PORT, else a free port) with one empty bucket. */
export async function startS3Fake(options: { port?: number; bucket?: string } = {}): Promise<S3Fake> {
  const bucket = options.bucket ?? 'arcwright-test';
  const directory = await mkdtemp(join(tmpdir(), 'arcwright-s3-'));
  const server = new S3rver({
    address: '127.0.0.1',
    port: options.port ?? Number(process.env.S3_FAKE_PORT ?? 0),
    silent: true,
    directory,
    vhostBuckets: false,
    configureBuckets: [{ name: bucket }],
  });
  // First in line: ahead of s3rver's own routes, which refuse these calls.
  server.middleware.unshift(multipartCalls(directory));
  const { port } = await server.run();
  const endpoint = `http://127.0.0.1:${port}`;
  return {
    endpoint,
    port,
    bucket,
    directory,
    storage: (scratchDir, extra = {}) =>
      new S3Storage({ bucket, endpoint, region: 'us-east-1', forcePathStyle: true, scratchDir, ...S3_FAKE_KEYS, ...extra }),
    multipartUploads: () => fakeMultipartUploads(directory, bucket),
    async stop() {
      await server.close();
      await rm(directory, { recursive: true, force: true });
    },
  };
}
