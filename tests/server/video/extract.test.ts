import { execFile } from 'node:child_process';
import { promisify } from 'node:util';
import { copyFile, mkdir, mkdtemp, readdir, rm, stat, truncate, writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { extractFrames, framePath, probeClip, probeFrameSet, VideoError } from '../../../server/video/index';
import { imageInfo } from '../../../server/video/probe';
import { makeBadFiles, type BadFiles } from '../../../server/video/synth';
import { ffmpegPath } from '../../../server/video/tools';
import { CLIP_SPECS, testClip } from '../../support/clips/index';

const execFileAsync = promisify(execFile);
let dir: string;
let bad: BadFiles;

beforeAll(async () => {
  dir = await mkdtemp(join(tmpdir(), 'arcwright-extract-'));
  bad = await makeBadFiles(join(dir, 'bad'));
});

afterAll(async () => {
  await rm(dir, { recursive: true, force: true });
});

async function videoError(p: Promise<unknown>): Promise<VideoError> {
  const err = await p.then(
    () => null,
    (e: unknown) => e,
  );
  expect(err).toBeInstanceOf(VideoError);
  return err as VideoError;
}

/** Gray level of one pixel of a JPEG, decoded by ffmpeg. */
async function grayAt(jpeg: string, x: number, y: number): Promise<number> {
  const { stdout } = await execFileAsync(
    ffmpegPath(),
    ['-v', 'error', '-i', jpeg, '-vf', `format=gray,crop=1:1:${Math.floor(x)}:${Math.floor(y)}`, '-f', 'rawvideo', '-'],
    { encoding: 'buffer' },
  );
  expect(stdout.length).toBe(1);
  return stdout[0]!;
}

describe('extractFrames', () => {
  it('writes one JPEG per frame, numbered from 0, and a strip when the clip is a video', async () => {
    const clip = await testClip('lowRate', CLIP_SPECS.lowRate);
    const probe = await probeClip(clip.videoPath);
    const out = join(dir, 'low');
    const result = await extractFrames(probe, out);
    const names = (await readdir(out)).sort();
    expect(result.frameCount).toBe(78);
    expect(names.filter((n) => n.startsWith('frame-'))).toHaveLength(78);
    expect(names[0]).toBe('frame-000000.jpg');
    expect(names).toContain('frame-000077.jpg');
    expect(names).toContain('strip.jpg');
    expect(result).toMatchObject({ width: 320, height: 240, sourceWidth: 320, sourceHeight: 240, scale: 1, frameRate: 30, stripTiles: 12 });
    expect(await imageInfo(framePath(result, 40))).toEqual({ format: 'jpeg', width: 320, height: 240 });
    // Twelve thumbnails of 90 px height side by side: 12 × 120 px wide.
    expect(await imageInfo(result.stripPath)).toEqual({ format: 'jpeg', width: 1440, height: 90 });
    expect(result.stripFrames).toEqual([0, 6, 12, 18, 24, 30, 36, 42, 48, 54, 60, 66]);
  });

  it('reports progress that rises to exactly 100 when extraction succeeds', async () => {
    const clip = await testClip('slowMotion', CLIP_SPECS.slowMotion);
    const probe = await probeClip(clip.videoPath);
    const seen: number[] = [];
    await extractFrames(probe, join(dir, 'progress'), { onProgress: (p) => seen.push(p) });
    expect(seen[0]).toBe(0);
    expect(seen[seen.length - 1]).toBe(100);
    expect(seen.filter((p) => p === 100)).toHaveLength(1);
    for (let i = 1; i < seen.length; i++) expect(seen[i]!).toBeGreaterThan(seen[i - 1]!);
  });

  it('scales frames down to maxSide and reports the scale when the clip is larger', async () => {
    const clip = await testClip('flat60', CLIP_SPECS.flat60);
    const probe = await probeClip(clip.videoPath);
    const result = await extractFrames(probe, join(dir, 'scaled'), { maxSide: 320 });
    expect(result).toMatchObject({ width: 320, height: 180, sourceWidth: 640, sourceHeight: 360, scale: 0.5 });
    expect(await imageInfo(framePath(result, 0))).toMatchObject({ width: 320, height: 180 });
  });

  it('turns frames upright when the clip carries a rotation', async () => {
    const clip = await testClip('rotated', CLIP_SPECS.rotated);
    const probe = await probeClip(clip.videoPath);
    const result = await extractFrames(probe, join(dir, 'rotated'));
    expect([result.width, result.height]).toEqual([360, 480]);
    expect(await imageInfo(framePath(result, 20))).toMatchObject({ width: 360, height: 480 });
    // The white ball is where the truth (in upright pixels) says it is.
    const at = clip.truth.frames[20]!;
    expect(await grayAt(framePath(result, 20), at.x, at.y)).toBeGreaterThan(190);
  });

  it('converts an uploaded set of PNG frames to numbered JPEGs', async () => {
    const probe = await probeFrameSet(bad.goodFrames, 25);
    const result = await extractFrames(probe, join(dir, 'set'));
    expect(result.frameCount).toBe(3);
    expect((await readdir(join(dir, 'set'))).sort()).toEqual(['frame-000000.jpg', 'frame-000001.jpg', 'frame-000002.jpg', 'strip.jpg']);
    // The numbered links made for ffmpeg are gone too.
    expect((await readdir(dir)).filter((n) => n.startsWith('.'))).toEqual([]);
  });

  it('leaves nothing behind when the clip turns out to be damaged', async () => {
    const clip = await testClip('flat60', CLIP_SPECS.flat60);
    const copy = join(dir, 'damaged.mp4');
    await copyFile(clip.videoPath, copy);
    const probe = await probeClip(copy);
    // Cut after probing, as a file replaced under a running job would be.
    await truncate(copy, Math.floor((await stat(copy)).size * 0.5));
    const parent = join(dir, 'damaged-job');
    await mkdir(parent);
    const err = await videoError(extractFrames(probe, join(parent, 'frames')));
    expect(['VIDEO_TRUNCATED', 'VIDEO_DECODE_FAILED']).toContain(err.code);
    expect(err.message).toMatch(/upload it again|Upload the whole file again/);
    expect(await readdir(parent)).toEqual([]);
  });

  it('leaves nothing behind and says so when it is cancelled', async () => {
    const clip = await testClip('slowMotion', CLIP_SPECS.slowMotion);
    const probe = await probeClip(clip.videoPath);
    const parent = join(dir, 'cancel-job');
    await mkdir(parent);
    const controller = new AbortController();
    const err = await videoError(
      extractFrames(probe, join(parent, 'frames'), {
        signal: controller.signal,
        onProgress: (p) => {
          if (p > 0) controller.abort();
        },
      }),
    );
    expect(err.code).toBe('VIDEO_CANCELLED');
    expect(err.message).toMatch(/cancelled; nothing it wrote was kept/);
    expect(await readdir(parent)).toEqual([]);
  });

  it('refuses a folder that already holds files', async () => {
    const clip = await testClip('lowRate', CLIP_SPECS.lowRate);
    const probe = await probeClip(clip.videoPath);
    const out = join(dir, 'occupied');
    await mkdir(out);
    await writeFile(join(out, 'keep.txt'), 'coach notes');
    const err = await videoError(extractFrames(probe, out));
    expect(err.code).toBe('VIDEO_OUTPUT_EXISTS');
    expect(await readdir(out)).toEqual(['keep.txt']);
  });
});
