/**
 * Resumable uploads waiting in the bucket (`STORAGE_DRIVER=s3`), on `@tus/s3-store`: an upload is an S3 multipart
 * upload of the object `partial-uploads/<id>`, beside its record `<id>.info` (written by the store), the tail of a
 * part too small to be a part yet `<id>.part` (the store's too), a copy of the file's first bytes `<id>.head`
 * (parts of an unfinished multipart upload cannot be read back, and the check of what the file is needs them)
 * and, once complete, its receipt `<id>.kept`. Nothing of an upload lives in one web process, so the next part
 * may go through any of them. The store keeps no cache of records between requests for the same reason: a record
 * another process removed must not live on here.
 */
import { ReadStream, createWriteStream } from 'node:fs';
import { open } from 'node:fs/promises';
import type { Readable } from 'node:stream';
import { pipeline } from 'node:stream/promises';
import {
  AbortMultipartUploadCommand,
  DeleteObjectsCommand,
  GetObjectCommand,
  HeadObjectCommand,
  ListMultipartUploadsCommand,
  ListObjectsCommand,
  PutObjectCommand,
  S3ServiceException,
} from '@aws-sdk/client-s3';
import { S3Store, type MetadataValue } from '@tus/s3-store';
import type { KvStore, Upload } from '@tus/server';
import { RECEIPT_SUFFIX, UPLOAD_ID, expirySince, uploadIdsIn, type PartialUploads } from './partial-uploads';
import type { S3Storage } from './s3';

/** The folder of the bucket holding resumable uploads in progress. */
export const PARTIAL_PREFIX = 'partial-uploads/';
/** Bytes of the start of a file kept readable in `<id>.head` (as many as the check of what a file is reads). */
const HEAD_COPY_BYTES = 4096;
const HEAD_SUFFIX = '.head';

/** Answers every record from the bucket (see the module's note). */
class NoRecordCache implements KvStore<MetadataValue> {
  async get(): Promise<undefined> {
    return undefined;
  }
  async set(): Promise<void> {}
  async delete(): Promise<void> {}
}

function isMissing(err: unknown): boolean {
  if (!(err instanceof S3ServiceException)) return false;
  return ['NoSuchKey', 'NotFound', 'NoSuchUpload', 'InvalidRange'].includes(err.name) || err.$metadata?.httpStatusCode === 404 || err.$metadata?.httpStatusCode === 416;
}

async function firstBytes(path: string, length: number): Promise<Buffer> {
  const handle = await open(path, 'r');
  try {
    const buf = Buffer.alloc(length);
    const { bytesRead } = await handle.read(buf, 0, length, 0);
    return buf.subarray(0, bytesRead);
  } finally {
    await handle.close();
  }
}

/** The S3 store with the app's expiry setting, and a readable copy of the start of the first part. */
class BucketUploadStore extends S3Store {
  constructor(
    options: ConstructorParameters<typeof S3Store>[0],
    private readonly expiryMs: () => number,
  ) {
    super(options);
  }

  getExpiration(): number {
    return this.expiryMs();
  }

  protected async uploadPart(metadata: MetadataValue, readStream: ReadStream | Readable | Buffer, partNumber: number): Promise<string> {
    // Part 1 always starts at byte 0 (the store sends parts in order, a part's tail waiting in `<id>.part`).
    if (partNumber === 1 && readStream instanceof ReadStream && typeof readStream.path === 'string') {
      const head = await firstBytes(readStream.path, HEAD_COPY_BYTES);
      await this.client.send(new PutObjectCommand({ Bucket: this.bucket, Key: `${metadata.file.id}${HEAD_SUFFIX}`, Body: head }));
    }
    return super.uploadPart(metadata, readStream, partNumber);
  }

  /** Removes an upload (the protocol's termination) with the objects the store's own removal leaves: the tail of a part and the copy of the start. */
  async remove(id: string): Promise<void> {
    await super.remove(id);
    await this.client.send(
      new DeleteObjectsCommand({ Bucket: this.bucket, Delete: { Objects: [{ Key: `${id}.part` }, { Key: `${id}${HEAD_SUFFIX}` }], Quiet: true } }),
    );
  }
}

export class BucketPartialUploads implements PartialUploads {
  readonly store: BucketUploadStore;

  constructor(
    private readonly bucket: S3Storage,
    expiryMs: () => number,
  ) {
    this.store = new BucketUploadStore(
      {
        s3ClientConfig: { ...bucket.clientConfig, bucket: bucket.bucket },
        partSize: bucket.partSizeBytes,
        // Expiry is the app's sweep (below), not object tags: several S3-compatible servers have no tagging.
        useTags: false,
        cache: new NoRecordCache(),
      },
      expiryMs,
    );
  }

  storeId(uploadId: string): string {
    return `${PARTIAL_PREFIX}${uploadId}`;
  }

  private async getObject(key: string, range?: string): Promise<Readable | null> {
    try {
      const answer = await this.bucket.client.send(new GetObjectCommand({ Bucket: this.bucket.bucket, Key: key, Range: range }));
      return (answer.Body as Readable | undefined) ?? null;
    } catch (err) {
      if (isMissing(err)) return null;
      throw err;
    }
  }

  private async getBytes(key: string, range?: string): Promise<Buffer | null> {
    const body = await this.getObject(key, range);
    if (!body) return null;
    const chunks: Buffer[] = [];
    for await (const chunk of body) chunks.push(chunk as Buffer);
    return Buffer.concat(chunks);
  }

  async readHead(upload: Upload, length: number): Promise<Buffer | null> {
    for (const key of [`${upload.id}${HEAD_SUFFIX}`, `${upload.id}.part`]) {
      const bytes = await this.getBytes(key, `bytes=0-${length - 1}`);
      if (bytes && bytes.length > 0) return bytes.subarray(0, length);
    }
    return null;
  }

  async takeOut(upload: Upload, localPath: string): Promise<void> {
    try {
      const body = await this.getObject(upload.id);
      if (!body) throw new Error(`The complete upload ${upload.id} is missing from bucket ${this.bucket.bucket}.`);
      await pipeline(body, createWriteStream(localPath));
    } finally {
      await this.remove(upload.id.slice(PARTIAL_PREFIX.length));
    }
  }

  /** The id of the S3 multipart upload behind an upload, from its record; null without a record. */
  private async multipartIdOf(uploadId: string): Promise<string | null> {
    try {
      const head = await this.bucket.client.send(new HeadObjectCommand({ Bucket: this.bucket.bucket, Key: `${this.storeId(uploadId)}.info` }));
      return head.Metadata?.['upload-id'] ?? null;
    } catch (err) {
      if (isMissing(err)) return null;
      throw err;
    }
  }

  private async abort(key: string, multipartId: string): Promise<void> {
    try {
      await this.bucket.client.send(new AbortMultipartUploadCommand({ Bucket: this.bucket.bucket, Key: key, UploadId: multipartId }));
    } catch (err) {
      // Completed or aborted already.
      if (!isMissing(err)) throw err;
    }
  }

  async remove(uploadId: string, options: { receipt?: boolean } = {}): Promise<void> {
    if (!UPLOAD_ID.test(uploadId)) return;
    const key = this.storeId(uploadId);
    const multipartId = await this.multipartIdOf(uploadId);
    if (multipartId) await this.abort(key, multipartId);
    const keys = [key, `${key}.info`, `${key}.part`, `${key}${HEAD_SUFFIX}`, ...(options.receipt ? [`${key}${RECEIPT_SUFFIX}`] : [])];
    const answer = await this.bucket.client.send(
      new DeleteObjectsCommand({ Bucket: this.bucket.bucket, Delete: { Objects: keys.map((Key) => ({ Key })), Quiet: true } }),
    );
    const failed = (answer.Errors ?? []).filter((e) => e.Code !== 'NoSuchKey');
    if (failed.length > 0) throw new Error(`Could not remove upload ${uploadId} from bucket ${this.bucket.bucket}: ${failed[0]?.Message ?? failed[0]?.Code}.`);
  }

  async readReceipt<T>(uploadId: string): Promise<T | null> {
    if (!UPLOAD_ID.test(uploadId)) return null;
    return this.readJson<T>(`${this.storeId(uploadId)}${RECEIPT_SUFFIX}`);
  }

  private async readJson<T>(key: string): Promise<T | null> {
    const bytes = await this.getBytes(key);
    if (!bytes) return null;
    try {
      return JSON.parse(bytes.toString('utf8')) as T;
    } catch {
      return null;
    }
  }

  async writeReceipt(uploadId: string, receipt: object): Promise<void> {
    await this.bucket.client.send(
      new PutObjectCommand({ Bucket: this.bucket.bucket, Key: `${this.storeId(uploadId)}${RECEIPT_SUFFIX}`, Body: JSON.stringify(receipt), ContentType: 'application/json' }),
    );
  }

  /** Objects under the prefix with their times (ListObjects v1 paged by the last key, as `S3Storage.list`). */
  private async objects(): Promise<{ name: string; modifiedMs: number }[]> {
    const out: { name: string; modifiedMs: number }[] = [];
    let marker: string | undefined;
    for (;;) {
      const page = await this.bucket.client.send(new ListObjectsCommand({ Bucket: this.bucket.bucket, Prefix: PARTIAL_PREFIX, Marker: marker }));
      const found = (page.Contents ?? []).filter((item) => typeof item.Key === 'string');
      for (const item of found) out.push({ name: item.Key!.slice(PARTIAL_PREFIX.length), modifiedMs: item.LastModified?.getTime() ?? Number.NaN });
      if (!page.IsTruncated || found.length === 0) break;
      marker = found.at(-1)!.Key;
    }
    return out;
  }

  /** Multipart uploads under the prefix, with the time each was started. */
  private async multipartUploads(): Promise<{ key: string; multipartId: string; startedMs: number }[]> {
    const out: { key: string; multipartId: string; startedMs: number }[] = [];
    let keyMarker: string | undefined;
    let uploadIdMarker: string | undefined;
    for (;;) {
      const page = await this.bucket.client.send(
        new ListMultipartUploadsCommand({ Bucket: this.bucket.bucket, Prefix: PARTIAL_PREFIX, KeyMarker: keyMarker, UploadIdMarker: uploadIdMarker }),
      );
      for (const item of page.Uploads ?? []) {
        if (item.Key && item.UploadId) out.push({ key: item.Key, multipartId: item.UploadId, startedMs: item.Initiated?.getTime() ?? Number.NaN });
      }
      if (!page.IsTruncated) break;
      keyMarker = page.NextKeyMarker;
      uploadIdMarker = page.NextUploadIdMarker;
    }
    return out;
  }

  async sweep(expiryMs: number): Promise<number> {
    if (expiryMs <= 0) return 0;
    const objects = await this.objects();
    const ids = uploadIdsIn(objects.map((o) => o.name));
    const expired = (since: number) => Date.now() > since + expiryMs;
    const live = new Set<string>();
    let removed = 0;
    for (const id of ids) {
      const receipt = await this.readReceipt<{ keptAt?: string }>(id);
      const record = receipt ? null : await this.readJson<{ creation_date?: string }>(`${this.storeId(id)}.info`);
      let since = expirySince(receipt, record);
      if (Number.isNaN(since)) since = Math.max(...objects.filter((o) => o.name.startsWith(id)).map((o) => o.modifiedMs));
      if (expired(since)) {
        await this.remove(id, { receipt: true });
        removed++;
      } else {
        live.add(id);
      }
    }
    // Multipart uploads whose record is gone (a process stopped between the two) are aborted by their start.
    for (const upload of await this.multipartUploads()) {
      const id = upload.key.slice(PARTIAL_PREFIX.length);
      if (live.has(id) || !expired(upload.startedMs)) continue;
      await this.abort(upload.key, upload.multipartId);
      if (!ids.has(id)) removed++;
    }
    return removed;
  }
}
