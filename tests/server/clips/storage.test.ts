import { randomBytes } from 'node:crypto';
import { existsSync } from 'node:fs';
import { mkdtemp, mkdir, readdir, readFile, rm, writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { Readable } from 'node:stream';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { checkKey, LocalDiskStorage, S3Storage, type Storage } from '../../../server/storage';
import { startS3Fake, type S3Fake } from '../../support/s3';

async function bytes(stream: Readable | null): Promise<Buffer | null> {
  if (!stream) return null;
  const chunks: Buffer[] = [];
  for await (const c of stream) chunks.push(Buffer.from(c as Buffer));
  return Buffer.concat(chunks);
}

async function text(stream: Readable | null): Promise<string> {
  return (await bytes(stream))?.toString('utf8') ?? '<none>';
}

/** Entries left in a scratch root's work folder. */
async function workLeft(scratch: string): Promise<string[]> {
  return readdir(join(scratch, '.work')).catch(() => []);
}

interface Subject {
  storage: Storage;
  scratch: string;
}

/** The contract every storage keeps, run against each implementation. */
function storageContract(name: string, open: () => Promise<Subject>, close: () => Promise<void>): void {
  describe(`${name} (storage contract)`, () => {
    let storage: Storage;
    let scratch: string;

    beforeAll(async () => {
      ({ storage, scratch } = await open());
    });
    afterAll(close);

    it('puts, reads, sizes and lists objects under a prefix', async () => {
      expect(await storage.put('clubs/1/clips/2/source/video.mp4', Readable.from(['hello ', 'world']))).toEqual({ key: 'clubs/1/clips/2/source/video.mp4', sizeBytes: 11 });
      await storage.put('clubs/1/clips/2/frames/frame-000000.jpg', Readable.from(['x']));
      expect(await text(await storage.get('clubs/1/clips/2/source/video.mp4'))).toBe('hello world');
      expect(await storage.stat('clubs/1/clips/2/source/video.mp4')).toEqual({ key: 'clubs/1/clips/2/source/video.mp4', sizeBytes: 11 });
      expect(await storage.list('clubs/1/clips/2')).toEqual(['clubs/1/clips/2/frames/frame-000000.jpg', 'clubs/1/clips/2/source/video.mp4']);
      expect(await storage.list('clubs/1/clips/2/')).toEqual(['clubs/1/clips/2/frames/frame-000000.jpg', 'clubs/1/clips/2/source/video.mp4']);
    });

    it('answers null for an object that is not there and an empty list for an empty prefix', async () => {
      expect(await storage.get('clubs/1/clips/2/nothing')).toBeNull();
      expect(await storage.stat('clubs/1/clips/2/nothing')).toBeNull();
      expect(await storage.localPath('clubs/1/clips/2/nothing')).toBeNull();
      expect(await storage.list('clubs/9')).toEqual([]);
      // A prefix matches whole path parts only: clips/2 is not clips/20.
      await storage.put('clubs/1/clips/20/source/video.mp4', Readable.from(['y']));
      expect(await storage.list('clubs/1/clips/2')).not.toContain('clubs/1/clips/20/source/video.mp4');
    });

    it('replaces an object written again under the same key', async () => {
      await storage.put('clubs/1/clips/5/source/video.mp4', Readable.from(['first']));
      await storage.put('clubs/1/clips/5/source/video.mp4', Readable.from(['second, longer']));
      expect(await text(await storage.get('clubs/1/clips/5/source/video.mp4'))).toBe('second, longer');
      expect((await storage.stat('clubs/1/clips/5/source/video.mp4'))?.sizeBytes).toBe(14);
    });

    it('keeps a body larger than several upload parts byte for byte', async () => {
      const big = randomBytes(13 * 1024 * 1024 + 123);
      const parts = Array.from({ length: 14 }, (_, i) => big.subarray(i * 1024 * 1024, (i + 1) * 1024 * 1024));
      expect((await storage.put('clubs/1/clips/6/source/video.mp4', Readable.from(parts))).sizeBytes).toBe(big.length);
      const back = await bytes(await storage.get('clubs/1/clips/6/source/video.mp4'));
      expect(back?.length).toBe(big.length);
      expect(back?.equals(big)).toBe(true);
    });

    it('keeps no object when the body fails part-way', async () => {
      async function* failing() {
        yield Buffer.alloc(64 * 1024, 1);
        throw new Error('camera card removed');
      }
      await expect(storage.put('clubs/1/clips/9/source/video.mp4', Readable.from(failing()))).rejects.toThrow(/camera card removed/);
      expect(await storage.stat('clubs/1/clips/9/source/video.mp4')).toBeNull();
      expect(await storage.list('clubs/1/clips/9')).toEqual([]);
    });

    it('moves a local file in and removes the local copy', async () => {
      const work = await storage.workDir('upload');
      await writeFile(join(work, 'part-0'), 'clip bytes');
      expect(await storage.importFile('clubs/1/clips/7/source/video.mp4', join(work, 'part-0'))).toEqual({ key: 'clubs/1/clips/7/source/video.mp4', sizeBytes: 10 });
      expect(existsSync(join(work, 'part-0'))).toBe(false);
      await rm(work, { recursive: true, force: true });
      expect(await text(await storage.get('clubs/1/clips/7/source/video.mp4'))).toBe('clip bytes');
    });

    it('moves a work folder in and leaves no work folder behind', async () => {
      const work = await storage.workDir('extract');
      expect(work.startsWith(join(scratch, '.work'))).toBe(true);
      await mkdir(join(work, 'sub'), { recursive: true });
      await writeFile(join(work, 'a.jpg'), 'A');
      await writeFile(join(work, 'sub', 'b.jpg'), 'B');
      expect(await storage.importDir('clubs/1/clips/3/frames', work)).toBe(2);
      expect(await storage.list('clubs/1/clips/3')).toEqual(['clubs/1/clips/3/frames/a.jpg', 'clubs/1/clips/3/frames/sub/b.jpg']);
      expect(await workLeft(scratch)).toEqual([]);
      expect(await text(await storage.get('clubs/1/clips/3/frames/sub/b.jpg'))).toBe('B');
    });

    it('gives a local file of an object for tools and leaves nothing in scratch after release', async () => {
      const local = await storage.localPath('clubs/1/clips/3/frames/a.jpg');
      expect(local).not.toBeNull();
      expect(await readFile(local!.path, 'utf8')).toBe('A');
      await local!.release();
      expect(await workLeft(scratch)).toEqual([]);
      // The object itself stays.
      expect(await storage.stat('clubs/1/clips/3/frames/a.jpg')).not.toBeNull();
    });

    it('removes everything under a prefix and ignores a prefix that is not there', async () => {
      await storage.removePrefix('clubs/1/clips/3');
      expect(await storage.list('clubs/1/clips/3')).toEqual([]);
      await expect(storage.removePrefix('clubs/1/clips/404')).resolves.toBeUndefined();
      expect(await storage.list('clubs/1/clips/2')).toHaveLength(2);
    });

    it('removes a prefix holding more objects than one delete request takes', async () => {
      const work = await storage.workDir('many');
      await Promise.all(Array.from({ length: 1005 }, (_, i) => writeFile(join(work, `f-${String(i).padStart(4, '0')}.jpg`), 'z')));
      expect(await storage.importDir('clubs/1/clips/8/frames', work)).toBe(1005);
      expect(await storage.list('clubs/1/clips/8')).toHaveLength(1005);
      await storage.removePrefix('clubs/1/clips/8');
      expect(await storage.list('clubs/1/clips/8')).toEqual([]);
    }, 120_000);

    it('keeps the partial-uploads folder in the local scratch root, apart from the work folders', async () => {
      const dir = await storage.partialUploadsDir();
      expect(dir).toBe(join(scratch, '.partial-uploads'));
      expect(existsSync(dir)).toBe(true);
    });

    it('refuses keys that could leave the storage', async () => {
      await expect(storage.put('../escape', Readable.from(['x']))).rejects.toThrow(/not a clean relative path/);
      await expect(storage.get('a/../../b')).rejects.toThrow(/not a clean relative path/);
    });
  });
}

describe('checkKey', () => {
  it('refuses keys that could leave the storage folder', () => {
    for (const key of ['../etc/passwd', '/abs', 'a/../../b', 'a\\b', 'a//b', '']) expect(() => checkKey(key)).toThrow(/not a clean relative path/);
    expect(checkKey('clubs/1/')).toBe('clubs/1');
  });
});

let localRoot: string;
storageContract(
  'LocalDiskStorage',
  async () => {
    localRoot = await mkdtemp(join(tmpdir(), 'arcwright-store-'));
    return { storage: new LocalDiskStorage(localRoot), scratch: localRoot };
  },
  () => rm(localRoot, { recursive: true, force: true }),
);

let fake: S3Fake;
let s3Scratch: string;
storageContract(
  'S3Storage on a local S3 fake',
  async () => {
    fake = await startS3Fake();
    s3Scratch = await mkdtemp(join(tmpdir(), 'arcwright-s3-scratch-'));
    // The smallest part size S3 allows, so the large-body case goes up in several parts.
    return { storage: fake.storage(s3Scratch, { partSizeBytes: 5 * 1024 * 1024 }), scratch: s3Scratch };
  },
  async () => {
    await fake.stop();
    await rm(s3Scratch, { recursive: true, force: true });
  },
);

describe('S3Storage.ensureBucket', () => {
  it('creates a missing bucket once and leaves an existing one as it is', async () => {
    const own = await startS3Fake({ bucket: 'arcwright-present' });
    const scratch = await mkdtemp(join(tmpdir(), 'arcwright-s3-bucket-'));
    try {
      const fresh = new S3Storage({ bucket: 'arcwright-created', endpoint: own.endpoint, region: 'us-east-1', forcePathStyle: true, accessKeyId: 'S3RVER', secretAccessKey: 'S3RVER', scratchDir: scratch });
      await expect(fresh.put('a/b.txt', Readable.from(['x']))).rejects.toThrow();
      await fresh.ensureBucket();
      await fresh.put('a/b.txt', Readable.from(['kept']));
      await fresh.ensureBucket();
      expect(await text(await fresh.get('a/b.txt'))).toBe('kept');
    } finally {
      await own.stop();
      await rm(scratch, { recursive: true, force: true });
    }
  });
});
