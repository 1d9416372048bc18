/**
 * The contract every storage implementation keeps (local disk, S3-compatible object storage).
 *
 * Keys are relative, slash-separated paths (`clubs/3/clips/17/frames/frame-000001.jpg`). Work that
 * needs real files (ffmpeg, ffprobe) happens in a local work folder from `workDir()`; the results are
 * moved in with `importDir()` / `importFile()` (a rename on local disk, a streamed upload to a bucket).
 */
import type { Readable } from 'node:stream';

export interface StoredObject {
  key: string;
  sizeBytes: number;
}

export interface Storage {
  /** Writes a stream under `key` (replacing any object there). */
  put(key: string, body: Readable): Promise<StoredObject>;
  /** Moves a local file in under `key`; the local file is gone afterwards. */
  importFile(key: string, localPath: string): Promise<StoredObject>;
  /** Moves every file of a local folder in under `prefix` (keeping relative paths); the folder is gone afterwards. */
  importDir(prefix: string, localDir: string): Promise<number>;
  /** A readable stream of the object, or null when there is none. */
  get(key: string): Promise<Readable | null>;
  /** Size of the object, or null when there is none. */
  stat(key: string): Promise<StoredObject | null>;
  /**
   * A local file path holding the object, for tools that need a path (ffmpeg). The local disk answers its own path;
   * an object store would download to a temporary file and remove it when `release` is called.
   */
  localPath(key: string): Promise<{ path: string; release: () => Promise<void> } | null>;
  /** Keys under a prefix, sorted. */
  list(prefix: string): Promise<string[]>;
  /** Removes every object under a prefix (no error when there is none). */
  removePrefix(prefix: string): Promise<void>;
  /** A fresh private local folder for uploads and work in progress; the caller removes it. */
  workDir(purpose: string): Promise<string>;
  /**
   * The one local folder that holds uploads received in parts (resumable uploads) on the local disk until they are
   * complete. It outlives a restart of the process, unlike a work folder, so that a client can resume; on the same
   * file system as the work folders, so a finished upload moves out by a rename. (With the S3 driver the uploads
   * wait in the bucket instead: `partialUploads()` in `index.ts`.)
   */
  partialUploadsDir(): Promise<string>;
  /** The local folder holding every `workDir()` (for the sweep of folders left by a killed process). */
  workRoot(): string;
}

/** Refuses keys that could escape the storage root (absolute paths, `..`, backslashes, empty parts). */
export function checkKey(key: string): string {
  const clean = key.replace(/\/+$/, '');
  if (clean === '' || clean.startsWith('/') || clean.includes('\\') || clean.split('/').some((part) => part === '' || part === '.' || part === '..')) {
    throw new Error(`Storage key "${key}" is not a clean relative path.`);
  }
  return clean;
}
