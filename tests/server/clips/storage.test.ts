import { mkdtemp, mkdir, readdir, readFile, rm, writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { Readable } from 'node:stream';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { checkKey, LocalDiskStorage } from '../../../server/storage';

let root: string;
let storage: LocalDiskStorage;

beforeAll(async () => {
  root = await mkdtemp(join(tmpdir(), 'arcwright-store-'));
  storage = new LocalDiskStorage(root);
});

afterAll(async () => {
  await rm(root, { recursive: true, force: true });
});

async function text(stream: Readable | null): Promise<string> {
  if (!stream) return '<none>';
  const chunks: Buffer[] = [];
  for await (const c of stream) chunks.push(Buffer.from(c as Buffer));
  return Buffer.concat(chunks).toString('utf8');
}

describe('LocalDiskStorage', () => {
  it('puts, reads, sizes and lists objects under a prefix', async () => {
    await storage.put('clubs/1/clips/2/source/video.mp4', Readable.from(['hello ', 'world']));
    await storage.put('clubs/1/clips/2/frames/frame-000000.jpg', Readable.from(['x']));
    expect(await text(await storage.get('clubs/1/clips/2/source/video.mp4'))).toBe('hello world');
    expect(await storage.stat('clubs/1/clips/2/source/video.mp4')).toEqual({ key: 'clubs/1/clips/2/source/video.mp4', sizeBytes: 11 });
    expect(await storage.list('clubs/1/clips/2')).toEqual(['clubs/1/clips/2/frames/frame-000000.jpg', 'clubs/1/clips/2/source/video.mp4']);
    expect(await storage.get('clubs/1/clips/2/nothing')).toBeNull();
    expect(await storage.list('clubs/9')).toEqual([]);
  });

  it('moves a work folder in and leaves no work folder behind', async () => {
    const work = await storage.workDir('extract');
    await mkdir(join(work, 'sub'), { recursive: true });
    await writeFile(join(work, 'a.jpg'), 'A');
    await writeFile(join(work, 'sub', 'b.jpg'), 'B');
    expect(await storage.importDir('clubs/1/clips/3/frames', work)).toBe(2);
    expect(await storage.list('clubs/1/clips/3')).toEqual(['clubs/1/clips/3/frames/a.jpg', 'clubs/1/clips/3/frames/sub/b.jpg']);
    expect(await readdir(join(root, '.work'))).toEqual([]);
    expect(await readFile(join(root, 'clubs/1/clips/3/frames/sub/b.jpg'), 'utf8')).toBe('B');
  });

  it('removes everything under a prefix and ignores a prefix that is not there', async () => {
    await storage.removePrefix('clubs/1/clips/3');
    expect(await storage.list('clubs/1/clips/3')).toEqual([]);
    await expect(storage.removePrefix('clubs/1/clips/404')).resolves.toBeUndefined();
  });

  it('refuses keys that could leave the storage folder', () => {
    for (const key of ['../etc/passwd', '/abs', 'a/../../b', 'a\\b', 'a//b', '']) expect(() => checkKey(key)).toThrow(/not a clean relative path/);
    expect(checkKey('clubs/1/')).toBe('clubs/1');
  });
});
