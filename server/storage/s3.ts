/**
 * Storage in an S3-compatible bucket (`STORAGE_DRIVER=s3`), on `@aws-sdk/client-s3`.
 *
 * Objects are written with `@aws-sdk/lib-storage`'s `Upload`: a small body goes up in one request, a large one
 * in parts (`partSizeBytes`, `queueSize` parts in flight), so at most `partSizeBytes * queueSize` of a file is in
 * memory at once, whatever its size. Reads stream the object's body. Tools that need a path (ffmpeg) get the
 * object downloaded into a private folder of the local scratch root, removed by `release`. Work folders also live
 * in that local scratch root; resumable uploads in progress wait in the bucket (`partial-uploads-s3.ts`).
 */
import { createReadStream, createWriteStream } from 'node:fs';
import { readdir, rm } from 'node:fs/promises';
import { basename, join, relative, resolve, sep } from 'node:path';
import { PassThrough, Readable } from 'node:stream';
import { pipeline } from 'node:stream/promises';
import {
  CreateBucketCommand,
  DeleteObjectsCommand,
  HeadBucketCommand,
  GetObjectCommand,
  HeadObjectCommand,
  ListObjectsCommand,
  S3Client,
  S3ServiceException,
  type S3ClientConfig,
} from '@aws-sdk/client-s3';
import { Upload } from '@aws-sdk/lib-storage';
import { makeWorkDir, partialUploadsFolder, workFolderRoot } from './scratch';
import { checkKey, type Storage, type StoredObject } from './types';

export interface S3StorageOptions {
  bucket: string;
  /** Local folder for work folders, downloads for tools and uploads received in parts. */
  scratchDir: string;
  /** Endpoint of an S3-compatible server (`http://127.0.0.1:9000`); empty for the provider's default. */
  endpoint?: string;
  region: string;
  accessKeyId?: string;
  secretAccessKey?: string;
  /** `https://host/bucket/key` instead of `https://bucket.host/key` (most self-hosted servers need it). */
  forcePathStyle: boolean;
  /** Size of one part of a multipart upload (5 MiB is S3's minimum). */
  partSizeBytes?: number;
  /** Parts of one upload sent at the same time. */
  queueSize?: number;
}

const MIN_PART_BYTES = 5 * 1024 * 1024;
/** DeleteObjects takes at most 1000 keys per request. */
const DELETE_BATCH = 1000;
/** Files of a folder uploaded at the same time by `importDir`. */
const IMPORT_CONCURRENCY = 8;

function isMissing(err: unknown): boolean {
  if (err instanceof S3ServiceException) {
    return err.name === 'NotFound' || err.name === 'NoSuchKey' || err.$metadata?.httpStatusCode === 404;
  }
  return false;
}

export class S3Storage implements Storage {
  readonly bucket: string;
  readonly client: S3Client;
  /** The client's settings (endpoint, region, credentials, path style), for other clients of the same bucket. */
  readonly clientConfig: S3ClientConfig;
  /** Size of one part of a multipart upload. */
  readonly partSizeBytes: number;
  private readonly scratch: string;
  private readonly queueSize: number;

  constructor(options: S3StorageOptions) {
    this.bucket = options.bucket;
    this.scratch = resolve(options.scratchDir);
    this.partSizeBytes = Math.max(MIN_PART_BYTES, options.partSizeBytes ?? 8 * 1024 * 1024);
    this.queueSize = Math.max(1, options.queueSize ?? 4);
    const clientConfig: S3ClientConfig = {
      region: options.region,
      forcePathStyle: options.forcePathStyle,
      // Note: checksums only where the API requires them; several S3-compatible servers reject the newer
      // default trailing checksums of streamed uploads.
      requestChecksumCalculation: 'WHEN_REQUIRED',
      responseChecksumValidation: 'WHEN_REQUIRED',
    };
    if (options.endpoint) clientConfig.endpoint = options.endpoint;
    // Without keys the SDK's default chain applies (environment, instance or task role).
    if (options.accessKeyId && options.secretAccessKey) {
      clientConfig.credentials = { accessKeyId: options.accessKeyId, secretAccessKey: options.secretAccessKey };
    }
    this.clientConfig = clientConfig;
    this.client = new S3Client(clientConfig);
  }

  /** Creates the bucket when it is missing (a self-hosted server started empty); never lists or changes one that exists. */
  async ensureBucket(): Promise<void> {
    try {
      await this.client.send(new HeadBucketCommand({ Bucket: this.bucket }));
    } catch (err) {
      if (!isMissing(err)) throw err;
      await this.client.send(new CreateBucketCommand({ Bucket: this.bucket }));
    }
  }

  async put(key: string, body: Readable): Promise<StoredObject> {
    const clean = checkKey(key);
    let sizeBytes = 0;
    const counted = new PassThrough();
    counted.on('data', (chunk: Buffer) => {
      sizeBytes += chunk.length;
    });
    body.on('error', (err) => counted.destroy(err));
    body.pipe(counted);
    const upload = new Upload({
      client: this.client,
      params: { Bucket: this.bucket, Key: clean, Body: counted },
      partSize: this.partSizeBytes,
      queueSize: this.queueSize,
      // A failed multipart upload is aborted, so no parts stay behind in the bucket.
      leavePartsOnError: false,
    });
    try {
      await upload.done();
    } catch (err) {
      // The body may be a file stream that the failed upload stopped reading: close it.
      body.destroy();
      throw err;
    }
    return { key: clean, sizeBytes };
  }

  async importFile(key: string, localPath: string): Promise<StoredObject> {
    const stored = await this.put(key, createReadStream(localPath));
    await rm(localPath, { force: true });
    return stored;
  }

  async importDir(prefix: string, localDir: string): Promise<number> {
    const target = checkKey(prefix);
    const files: string[] = [];
    const walk = async (dir: string): Promise<void> => {
      for (const entry of await readdir(dir, { withFileTypes: true })) {
        const path = join(dir, entry.name);
        if (entry.isDirectory()) await walk(path);
        else if (entry.isFile()) files.push(path);
      }
    };
    await walk(localDir);
    let next = 0;
    const lane = async (): Promise<void> => {
      while (next < files.length) {
        const path = files[next++]!;
        await this.importFile(`${target}/${relative(localDir, path).split(sep).join('/')}`, path);
      }
    };
    await Promise.all(Array.from({ length: Math.min(IMPORT_CONCURRENCY, files.length) }, lane));
    await rm(localDir, { recursive: true, force: true });
    return files.length;
  }

  async get(key: string): Promise<Readable | null> {
    try {
      const answer = await this.client.send(new GetObjectCommand({ Bucket: this.bucket, Key: checkKey(key) }));
      return answer.Body instanceof Readable ? answer.Body : null;
    } catch (err) {
      if (isMissing(err)) return null;
      throw err;
    }
  }

  async stat(key: string): Promise<StoredObject | null> {
    const clean = checkKey(key);
    try {
      const head = await this.client.send(new HeadObjectCommand({ Bucket: this.bucket, Key: clean }));
      return { key: clean, sizeBytes: head.ContentLength ?? 0 };
    } catch (err) {
      if (isMissing(err)) return null;
      throw err;
    }
  }

  async localPath(key: string): Promise<{ path: string; release: () => Promise<void> } | null> {
    const body = await this.get(key);
    if (!body) return null;
    const dir = await this.workDir('fetch');
    const path = join(dir, basename(checkKey(key)));
    const release = () => rm(dir, { recursive: true, force: true });
    try {
      await pipeline(body, createWriteStream(path));
    } catch (err) {
      await release();
      throw err;
    }
    return { path, release };
  }

  async list(prefix: string): Promise<string[]> {
    const base = `${checkKey(prefix)}/`;
    const keys: string[] = [];
    // Note: ListObjects (v1) paged by the last key seen, which every S3-compatible server answers alike; the
    // continuation tokens of v2 are opaque and some servers cannot make them (the test fake among them).
    let marker: string | undefined;
    for (;;) {
      const page = await this.client.send(new ListObjectsCommand({ Bucket: this.bucket, Prefix: base, Marker: marker }));
      const found = (page.Contents ?? []).map((item) => item.Key).filter((key): key is string => typeof key === 'string');
      keys.push(...found);
      if (!page.IsTruncated || found.length === 0) break;
      marker = found.at(-1);
    }
    return keys.sort();
  }

  async removePrefix(prefix: string): Promise<void> {
    const keys = await this.list(prefix);
    for (let i = 0; i < keys.length; i += DELETE_BATCH) {
      const batch = keys.slice(i, i + DELETE_BATCH);
      const answer = await this.client.send(
        new DeleteObjectsCommand({ Bucket: this.bucket, Delete: { Objects: batch.map((Key) => ({ Key })), Quiet: true } }),
      );
      const failed = (answer.Errors ?? []).filter((e) => e.Code !== 'NoSuchKey');
      if (failed.length > 0) throw new Error(`Could not delete ${failed.length} object(s) under "${prefix}" from bucket ${this.bucket}: ${failed[0]?.Message ?? failed[0]?.Code}.`);
    }
  }

  workRoot(): string {
    return workFolderRoot(this.scratch);
  }

  workDir(purpose: string): Promise<string> {
    return makeWorkDir(this.scratch, purpose);
  }

  partialUploadsDir(): Promise<string> {
    return partialUploadsFolder(this.scratch);
  }
}
