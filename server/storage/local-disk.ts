/** Storage on the local disk under one folder (`STORAGE_DRIVER=local`, the default). */
import { createReadStream, createWriteStream } from 'node:fs';
import { mkdir, readdir, rename, rm, stat, cp } from 'node:fs/promises';
import { dirname, join, relative, resolve, sep } from 'node:path';
import type { Readable } from 'node:stream';
import { pipeline } from 'node:stream/promises';
import { makeWorkDir, partialUploadsFolder, workFolderRoot } from './scratch';
import { checkKey, type Storage, type StoredObject } from './types';

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
    return workFolderRoot(this.root);
  }

  workDir(purpose: string): Promise<string> {
    return makeWorkDir(this.root, purpose);
  }

  partialUploadsDir(): Promise<string> {
    return partialUploadsFolder(this.root);
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
