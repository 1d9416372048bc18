/**
 * Storage of uploaded clips and their frames behind one interface: the services never see whether
 * the bytes sit on the local disk or in another store.
 *
 * Keys are relative, slash-separated paths (`clubs/3/clips/17/frames/frame-000001.jpg`). Work that
 * needs real files (ffmpeg, ffprobe) happens in a local work folder from `workDir()`; the results are
 * moved in with `importDir()` / `importFile()` (a rename on local disk).
 */
import { createReadStream, createWriteStream } from 'node:fs';
import { mkdir, mkdtemp, readdir, rename, rm, stat, cp } from 'node:fs/promises';
import { dirname, join, relative, resolve, sep } from 'node:path';
import type { Readable } from 'node:stream';
import { pipeline } from 'node:stream/promises';
import { config } from '../config';

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
   * The one local folder that holds uploads received in parts (resumable uploads) until they are complete.
   * It outlives a restart of the process, unlike a work folder, so that a client can resume; on the same
   * file system as the work folders, so a finished upload moves out by a rename.
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

/**
 * Local-disk storage under one root folder (`STORAGE_DIR`). Work folders live in `<root>/.work` and resumable uploads
 * in progress in `<root>/.partial-uploads`, on the same file system, so moves are renames.
 */
export class LocalDiskStorage implements Storage {
  readonly root: string;

  constructor(root: string) {
    this.root = resolve(root);
  }

  private pathOf(key: string): string {
    const path = join(this.root, ...checkKey(key).split('/'));
    if (!path.startsWith(this.root + sep)) throw new Error(`Storage key "${key}" leaves the storage folder.`);
    return path;
  }

  async put(key: string, body: Readable): Promise<StoredObject> {
    const path = this.pathOf(key);
    await mkdir(dirname(path), { recursive: true });
    const temp = `${path}.part-${process.pid}-${Date.now()}`;
    try {
      await pipeline(body, createWriteStream(temp));
      await rename(temp, path);
    } catch (err) {
      await rm(temp, { force: true });
      throw err;
    }
    return { key, sizeBytes: (await stat(path)).size };
  }

  async importFile(key: string, localPath: string): Promise<StoredObject> {
    const path = this.pathOf(key);
    await mkdir(dirname(path), { recursive: true });
    await moveFile(localPath, path);
    return { key, sizeBytes: (await stat(path)).size };
  }

  async importDir(prefix: string, localDir: string): Promise<number> {
    const target = this.pathOf(prefix);
    let count = 0;
    const walk = async (dir: string): Promise<void> => {
      for (const entry of await readdir(dir, { withFileTypes: true })) {
        const from = join(dir, entry.name);
        if (entry.isDirectory()) await walk(from);
        else if (entry.isFile()) {
          const to = join(target, relative(localDir, from));
          await mkdir(dirname(to), { recursive: true });
          await moveFile(from, to);
          count++;
        }
      }
    };
    await walk(localDir);
    await rm(localDir, { recursive: true, force: true });
    return count;
  }

  async get(key: string): Promise<Readable | null> {
    const found = await this.stat(key);
    if (!found) return null;
    return createReadStream(this.pathOf(key));
  }

  async stat(key: string): Promise<StoredObject | null> {
    try {
      const info = await stat(this.pathOf(key));
      return info.isFile() ? { key, sizeBytes: info.size } : null;
    } catch (err) {
      if ((err as NodeJS.ErrnoException).code === 'ENOENT') return null;
      throw err;
    }
  }

  async localPath(key: string): Promise<{ path: string; release: () => Promise<void> } | null> {
    const found = await this.stat(key);
    if (!found) return null;
    return { path: this.pathOf(key), release: async () => {} };
  }

  async list(prefix: string): Promise<string[]> {
    const base = this.pathOf(prefix);
    const keys: string[] = [];
    const walk = async (dir: string): Promise<void> => {
      let entries;
      try {
        entries = await readdir(dir, { withFileTypes: true });
      } catch (err) {
        if ((err as NodeJS.ErrnoException).code === 'ENOENT' || (err as NodeJS.ErrnoException).code === 'ENOTDIR') return;
        throw err;
      }
      for (const entry of entries) {
        const path = join(dir, entry.name);
        if (entry.isDirectory()) await walk(path);
        else if (entry.isFile()) keys.push(relative(this.root, path).split(sep).join('/'));
      }
    };
    await walk(base);
    return keys.sort();
  }

  async removePrefix(prefix: string): Promise<void> {
    await rm(this.pathOf(prefix), { recursive: true, force: true });
  }

  workRoot(): string {
    return join(this.root, '.work');
  }

  async workDir(purpose: string): Promise<string> {
    const base = this.workRoot();
    await mkdir(base, { recursive: true });
    return mkdtemp(join(base, `${purpose.replace(/[^a-z0-9-]/gi, '-')}-`));
  }

  async partialUploadsDir(): Promise<string> {
    const dir = join(this.root, '.partial-uploads');
    await mkdir(dir, { recursive: true });
    return dir;
  }
}

/** Renames, falling back to copy + remove across file systems. */
async function moveFile(from: string, to: string): Promise<void> {
  try {
    await rename(from, to);
  } catch (err) {
    if ((err as NodeJS.ErrnoException).code !== 'EXDEV') throw err;
    await cp(from, to);
    await rm(from, { force: true });
  }
}

let current: Storage | null = null;

/** The configured storage (local disk under `STORAGE_DIR`). */
export function storage(): Storage {
  if (!current) current = new LocalDiskStorage(config.storage.dir);
  return current;
}

/** Replaces the storage (tests point it at a temporary folder). */
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
