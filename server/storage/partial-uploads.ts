/**
 * Where resumable uploads wait until their last byte is in, behind one interface: a folder of the local disk
 * (`.partial-uploads` under the storage root, `@tus/file-store`) or, with the S3 driver, the bucket itself
 * (`partial-uploads/` in it, `@tus/s3-store`: every part goes straight into an S3 multipart upload, so any web
 * process can take the next part of an upload another one started).
 *
 * Besides the bytes, each upload may have a receipt (`<id>.kept`, a small JSON document) saying what became of it
 * once it was complete, kept until it expires like the uploads.
 */
import { open, readFile, readdir, rename, rm, stat, writeFile } from 'node:fs/promises';
import { join } from 'node:path';
import { FileStore } from '@tus/file-store';
import type { DataStore, Upload } from '@tus/server';

/** Upload ids as the app names them in addresses: 16 random bytes in hex. */
export const UPLOAD_ID = /^[0-9a-f]{32}$/;
export const RECEIPT_SUFFIX = '.kept';

export interface PartialUploads {
  /** The protocol library's store of the bytes. */
  readonly store: DataStore;
  /** The id under which the store knows the upload whose address ends in `uploadId`. */
  storeId(uploadId: string): string;
  /** Up to `length` first bytes of an upload in progress; null when none can be read yet. */
  readHead(upload: Upload, length: number): Promise<Buffer | null>;
  /** Writes the bytes of a complete upload to a local file; the upload (bytes and record) is gone afterwards. */
  takeOut(upload: Upload, localPath: string): Promise<void>;
  /** Removes an upload's bytes and record, and its receipt with `receipt: true` (nothing happens for what is gone). */
  remove(uploadId: string, options?: { receipt?: boolean }): Promise<void>;
  readReceipt<T>(uploadId: string): Promise<T | null>;
  writeReceipt(uploadId: string, receipt: object): Promise<void>;
  /**
   * Removes what is older than `expiryMs`: unfinished uploads (from their creation), receipts (from their `keptAt`)
   * and leftovers of either (from their file or object time). Returns how many uploads went.
   */
  sweep(expiryMs: number): Promise<number>;
}

/** Upload ids named in a list of file or object names (`<id>`, `<id>.json`, `<id>.kept`, ...). */
export function uploadIdsIn(names: Iterable<string>): Set<string> {
  const ids = new Set<string>();
  for (const name of names) {
    const id = name.slice(0, 32);
    if (UPLOAD_ID.test(id)) ids.add(id);
  }
  return ids;
}

/** The time an upload's expiry counts from: its receipt's `keptAt`, else its creation, else NaN. */
export function expirySince(receipt: { keptAt?: string } | null, record: { creation_date?: string } | null): number {
  return Date.parse(receipt?.keptAt ?? record?.creation_date ?? '');
}

async function readJson<T>(path: string): Promise<T | null> {
  try {
    return JSON.parse(await readFile(path, 'utf8')) as T;
  } catch {
    return null;
  }
}

/** A file store whose expiry follows a setting read when it is asked (tests shorten it). */
class ExpiringFileStore extends FileStore {
  constructor(
    directory: string,
    private readonly expiryMs: () => number,
  ) {
    super({ directory });
  }

  getExpiration(): number {
    return this.expiryMs();
  }
}

/** Uploads in progress as files of one local folder: `<id>` (the bytes) and `<id>.json` (the record). */
export class DiskPartialUploads implements PartialUploads {
  readonly store: DataStore;

  constructor(
    readonly dir: string,
    expiryMs: () => number,
  ) {
    this.store = new ExpiringFileStore(dir, expiryMs);
  }

  storeId(uploadId: string): string {
    return uploadId;
  }

  async readHead(upload: Upload, length: number): Promise<Buffer | null> {
    const path = upload.storage?.path ?? join(this.dir, upload.id);
    let handle;
    try {
      handle = await open(path, 'r');
    } catch {
      return null;
    }
    try {
      const buf = Buffer.alloc(length);
      const { bytesRead } = await handle.read(buf, 0, length, 0);
      return bytesRead > 0 ? buf.subarray(0, bytesRead) : null;
    } finally {
      await handle.close();
    }
  }

  async takeOut(upload: Upload, localPath: string): Promise<void> {
    try {
      await rename(upload.storage?.path ?? join(this.dir, upload.id), localPath);
    } finally {
      await this.remove(upload.id);
    }
  }

  async remove(uploadId: string, options: { receipt?: boolean } = {}): Promise<void> {
    if (!UPLOAD_ID.test(uploadId)) return;
    const names = [uploadId, `${uploadId}.json`, ...(options.receipt ? [`${uploadId}${RECEIPT_SUFFIX}`] : [])];
    await Promise.all(names.map((name) => rm(join(this.dir, name), { force: true })));
  }

  readReceipt<T>(uploadId: string): Promise<T | null> {
    if (!UPLOAD_ID.test(uploadId)) return Promise.resolve(null);
    return readJson<T>(join(this.dir, `${uploadId}${RECEIPT_SUFFIX}`));
  }

  async writeReceipt(uploadId: string, receipt: object): Promise<void> {
    await writeFile(join(this.dir, `${uploadId}${RECEIPT_SUFFIX}`), JSON.stringify(receipt));
  }

  /** Note: FileStore's own deleteExpired lists only uploads whose bytes and record are both there, and stops at the first it cannot remove; hence this walk of the folder. */
  async sweep(expiryMs: number): Promise<number> {
    if (expiryMs <= 0) return 0;
    let removed = 0;
    for (const id of uploadIdsIn(await readdir(this.dir))) {
      const receipt = await this.readReceipt<{ keptAt?: string }>(id);
      const record = await readJson<{ creation_date?: string }>(join(this.dir, `${id}.json`));
      let since = expirySince(receipt, record);
      if (Number.isNaN(since)) {
        const names = [id, `${id}.json`, `${id}${RECEIPT_SUFFIX}`];
        const times = await Promise.all(names.map((name) => stat(join(this.dir, name)).then((info) => info.mtimeMs, () => Number.NaN)));
        since = Math.max(...times.filter((t) => !Number.isNaN(t)));
      }
      if (Date.now() > since + expiryMs) {
        await this.remove(id, { receipt: true });
        removed++;
      }
    }
    return removed;
  }
}
