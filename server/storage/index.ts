/**
 * Storage of uploaded clips and their frames behind one interface (`types.ts`): the services never see
 * whether the bytes sit on the local disk (`local-disk.ts`) or in an S3-compatible bucket (`s3.ts`).
 * `STORAGE_DRIVER` chooses; the local disk is the default.
 */
import { config } from '../config';
import { LocalDiskStorage } from './local-disk';
import { DiskPartialUploads, type PartialUploads } from './partial-uploads';
import { BucketPartialUploads } from './partial-uploads-s3';
import { S3Storage } from './s3';
import type { Storage } from './types';

export { checkKey, type Storage, type StoredObject } from './types';
export { LocalDiskStorage } from './local-disk';
export { S3Storage, type S3StorageOptions } from './s3';
export { DiskPartialUploads, type PartialUploads } from './partial-uploads';
export { BucketPartialUploads, PARTIAL_PREFIX } from './partial-uploads-s3';

let current: Storage | null = null;

/** The storage the configuration names: an S3-compatible bucket, or the local disk under `STORAGE_DIR`. */
export function createConfiguredStorage(): Storage {
  const { driver, dir, s3 } = config.storage;
  if (driver === 's3') return new S3Storage({ ...s3, scratchDir: dir });
  return new LocalDiskStorage(dir);
}

/** The configured storage. */
export function storage(): Storage {
  if (!current) current = createConfiguredStorage();
  return current;
}

/** Start-up work of the configured storage: with `S3_CREATE_BUCKET=1`, the bucket is created when missing. */
export async function prepareStorage(): Promise<void> {
  const current = storage();
  if (current instanceof S3Storage && config.storage.s3.createBucket) await current.ensureBucket();
}

const partials = new WeakMap<Storage, Promise<PartialUploads>>();

/**
 * Where the current storage keeps resumable uploads in progress: the bucket with the S3 driver (so that any web
 * process can take an upload's next part), else its local partial-uploads folder. It follows `setStorage`.
 */
export function partialUploads(): Promise<PartialUploads> {
  const current = storage();
  let area = partials.get(current);
  if (!area) {
    const expiryMs = () => config.uploads.resumableExpiryMs;
    area = current instanceof S3Storage ? Promise.resolve(new BucketPartialUploads(current, expiryMs)) : current.partialUploadsDir().then((dir) => new DiskPartialUploads(dir, expiryMs));
    // A failed start (a folder that cannot be made) is tried again on the next call.
    area.catch(() => partials.delete(current));
    partials.set(current, area);
  }
  return area;
}

/** Replaces the storage (tests point it at a temporary folder or a bucket of their own). */
export function setStorage(next: Storage): void {
  current = next;
}

/** Where a clip's files live. */
export const clipKeys = {
  prefix: (clubId: number, clipId: number) => `clubs/${clubId}/clips/${clipId}`,
  /** The video file (`source/video.<ext>`) or the uploaded frames (`source/frame-000000.png`, ...). */
  source: (clubId: number, clipId: number) => `clubs/${clubId}/clips/${clipId}/source`,
  /** Extracted frames for tracing (`frame-000000.jpg`, ...) and the thumbnail strip (`strip.jpg`), written by the clip.process job. */
  frames: (clubId: number, clipId: number) => `clubs/${clubId}/clips/${clipId}/frames`,
};
