import { mkdir, mkdtemp, readdir, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { extractFrames, followBall, probeClip, probeFrameSet, VideoError, type FollowResult } from '../../../server/video/index';
import { ffmpegPath, runTool } from '../../../server/video/tools';
import type { FlightClipSpec, FlightTruth, RenderedClip } from '../../../server/video/synth';
import { CLIP_SPECS, testClip } from '../../support/clips/index';

let dir: string;

beforeAll(async () => {
  dir = await mkdtemp(join(tmpdir(), 'arcwright-follow-'));
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

/**
 * How well the follower did: the median distance of followed centres from the true ones,
 * and the share of frames followed from the click to the last frame in which the whole ball is in
 * the picture and in the air.
 */
function score(result: FollowResult, truth: FlightTruth, startFrame: number): { medianPx: number; followedShare: number } {
  const errors = result.points.map((p) => Math.hypot(p.x - truth.frames[p.frame]!.x, p.y - truth.frames[p.frame]!.y)).sort((a, b) => a - b);
  const last = Math.max(...truth.frames.filter((f) => f.frame >= startFrame && f.visible && f.airborne).map((f) => f.frame));
  const followed = new Set(result.points.map((p) => p.frame));
  let count = 0;
  for (let f = startFrame; f <= last; f++) if (followed.has(f)) count++;
  return { medianPx: errors[errors.length >> 1]!, followedShare: count / (last - startFrame + 1) };
}

/** A click two frames after launch, off the true centre by (1.5, −1) px as a hand would be. */
function click(truth: FlightTruth): { frame: number; x: number; y: number } {
  const f = truth.frames[truth.launchFrame + 2]!;
  return { frame: f.frame, x: f.x + 1.5, y: f.y - 1 };
}

const cases: Array<[string, keyof typeof CLIP_SPECS]> = [
  ['320×240 at 30 fps, landing in the picture, past a walking player', 'lowRate'],
  ['640×360 at 60 fps, a fast flat throw leaving the picture', 'flat60'],
  ['480×270 filmed at 120 fps and stored at 30 (slow motion)', 'slowMotion'],
  ['400×300 at 50 fps with a 3 px ball and no motion blur', 'smallBall'],
  ['360×480 upright, stored turned with a rotation tag', 'rotated'],
];

describe('followBall', () => {
  for (const [what, name] of cases) {
    it(`keeps the median error within 1.5 px and follows ≥ 95 % of frames when the clip is ${what}`, async () => {
      const clip = await testClip(name, CLIP_SPECS[name] as FlightClipSpec);
      const start = click(clip.truth);
      const result = await followBall(clip.videoPath, start, { captureFps: clip.truth.captureFps });
      const { medianPx, followedShare } = score(result, clip.truth, start.frame);
      expect(result.points[0]!.frame).toBe(start.frame);
      expect(medianPx).toBeLessThanOrEqual(1.5);
      expect(followedShare).toBeGreaterThanOrEqual(0.95);
      for (const p of result.points) {
        expect(p.confidence).toBeGreaterThanOrEqual(0);
        expect(p.confidence).toBeLessThanOrEqual(1);
      }
    });
  }

  it('waits for the kick and then follows when the ball is clicked at rest before it', async () => {
    const clip = await testClip('flat60', CLIP_SPECS.flat60);
    const before = clip.truth.frames[clip.truth.launchFrame - 4]!;
    const result = await followBall(clip.videoPath, { frame: before.frame, x: before.x, y: before.y }, { captureFps: 60 });
    const { medianPx, followedShare } = score(result, clip.truth, clip.truth.launchFrame);
    expect(result.points[0]!.frame).toBe(before.frame);
    expect(medianPx).toBeLessThanOrEqual(1.5);
    expect(followedShare).toBeGreaterThanOrEqual(0.95);
  });

  it('follows an uploaded set of PNG frames', async () => {
    const clip = await testClip('smallBall', CLIP_SPECS.smallBall);
    const pngDir = join(dir, 'png-set');
    await mkdir(pngDir);
    const res = await runTool(ffmpegPath(), ['-v', 'error', '-i', clip.videoPath, '-frames:v', '50', '-start_number', '0', join(pngDir, 'shot_%d.png')]);
    expect(res.code).toBe(0);
    const names = await readdir(pngDir);
    const probe = await probeFrameSet(names.map((n) => join(pngDir, n)), 50);
    expect(probe.files[10]).toBe(join(pngDir, 'shot_10.png'));
    const start = click(clip.truth);
    const result = await followBall(probe, start);
    expect(result.captureFps).toBe(50);
    const { medianPx } = score(result, clip.truth, start.frame);
    expect(medianPx).toBeLessThanOrEqual(1.5);
    expect(result.points[result.points.length - 1]!.frame).toBe(49);
  });

  it('stops with "landed" at the landing when the ball comes down inside the picture', async () => {
    const clip = await testClip('lowRate', CLIP_SPECS.lowRate);
    const result = await followBall(clip.videoPath, click(clip.truth), { captureFps: 30 });
    expect(result.stoppedBecause).toBe('landed');
    const last = result.points[result.points.length - 1]!.frame;
    expect(Math.abs(last - clip.truth.landingFrame!)).toBeLessThanOrEqual(1);
  });

  it('stops with "left-frame" when the ball leaves through the side of the picture', async () => {
    const clip = await testClip('flat60', CLIP_SPECS.flat60);
    const result = await followBall(clip.videoPath, click(clip.truth), { captureFps: 60 });
    expect(result.stoppedBecause).toBe('left-frame');
    const lastInside = Math.max(...clip.truth.frames.filter((f) => f.x < 640).map((f) => f.frame));
    expect(result.points[result.points.length - 1]!.frame).toBeLessThanOrEqual(lastInside);
  });

  it('stops with "end-of-clip" when the clip ends with the ball still in the air', async () => {
    const clip = await testClip('slowMotion', CLIP_SPECS.slowMotion);
    const result = await followBall(clip.videoPath, click(clip.truth), { captureFps: 120 });
    expect(result.stoppedBecause).toBe('end-of-clip');
    expect(result.points[result.points.length - 1]!.frame).toBe(143);
  });

  it('gives times at the capture rate, not the playback rate, for a slow-motion clip', async () => {
    const clip = await testClip('slowMotion', CLIP_SPECS.slowMotion);
    const result = await followBall(clip.videoPath, click(clip.truth), { captureFps: 120 });
    for (const p of result.points) expect(p.t).toBeCloseTo(p.frame / 120, 12);
    const playback = await followBall(clip.videoPath, click(clip.truth));
    expect(playback.captureFps).toBe(30);
    expect(playback.points[0]!.t).toBeCloseTo(playback.points[0]!.frame / 30, 12);
  });

  it('resumes from a point in mid-flight and goes on from there', async () => {
    const clip = await testClip('flat60', CLIP_SPECS.flat60);
    const mid = clip.truth.frames[45]!;
    const result = await followBall(clip.videoPath, { frame: 45, x: mid.x, y: mid.y, radius: 6 }, { captureFps: 60 });
    expect(result.points[0]!.frame).toBe(45);
    const { medianPx, followedShare } = score(result, clip.truth, 45);
    expect(medianPx).toBeLessThanOrEqual(1.5);
    expect(followedShare).toBeGreaterThanOrEqual(0.95);
  });

  it('numbers frames the same whether ffmpeg seeks to the start or decodes from the first frame', async () => {
    const clip = await testClip('flat60', CLIP_SPECS.flat60);
    const start = clip.truth.frames[70]!;
    const from = { frame: 70, x: start.x, y: start.y };
    const seeking = await followBall(clip.videoPath, from, { captureFps: 60, seekAfterS: 0 });
    const decoding = await followBall(clip.videoPath, from, { captureFps: 60, seekAfterS: Infinity });
    expect(seeking.points.length).toBeGreaterThan(10);
    expect(seeking.points).toEqual(decoding.points);
  });

  it('maps positions back to clip pixels when it follows scaled extracted frames', async () => {
    const clip = await testClip('flat60', CLIP_SPECS.flat60);
    const frames = await extractFrames(await probeClip(clip.videoPath), join(dir, 'flat60-half'), { maxSide: 320 });
    const start = click(clip.truth);
    const result = await followBall(frames, start, { captureFps: 60 });
    const { medianPx, followedShare } = score(result, clip.truth, start.frame);
    expect(medianPx).toBeLessThanOrEqual(1.5);
    expect(followedShare).toBeGreaterThanOrEqual(0.95);
  });

  it('follows a folder of frames at the rate it is given', async () => {
    const clip: RenderedClip = await testClip('smallBall', CLIP_SPECS.smallBall);
    await extractFrames(await probeClip(clip.videoPath), join(dir, 'small-frames'));
    const start = click(clip.truth);
    const result = await followBall(join(dir, 'small-frames'), start, { captureFps: 50 });
    expect(result.points[1]!.t).toBeCloseTo(result.points[1]!.frame / 50, 12);
    expect(score(result, clip.truth, start.frame).medianPx).toBeLessThanOrEqual(1.5);
  });

  it('asks for the capture rate when the source is a folder of frames', async () => {
    const err = await videoError(followBall(dir, { frame: 0, x: 1, y: 1 }));
    expect(err.code).toBe('VIDEO_BAD_REQUEST');
    expect(err.message).toMatch(/folder of frames: state their capture rate/);
  });

  it('refuses a start point outside the picture', async () => {
    const clip = await testClip('lowRate', CLIP_SPECS.lowRate);
    const err = await videoError(followBall(clip.videoPath, { frame: 10, x: 320, y: 50 }));
    expect(err.code).toBe('VIDEO_BAD_REQUEST');
    expect(err.message).toContain('The start point (320, 50) is outside the picture, which is 320×240 pixels');
  });

  it('refuses a start frame outside the clip', async () => {
    const clip = await testClip('lowRate', CLIP_SPECS.lowRate);
    const err = await videoError(followBall(clip.videoPath, { frame: 78, x: 10, y: 10 }));
    expect(err.code).toBe('VIDEO_BAD_REQUEST');
    expect(err.message).toContain('Start frame 78 is outside the clip: its frames are numbered 0 to 77');
  });

  it('stops ffmpeg and rejects with VIDEO_CANCELLED when aborted', async () => {
    const clip = await testClip('slowMotion', CLIP_SPECS.slowMotion);
    const controller = new AbortController();
    const err = await videoError(
      followBall(clip.videoPath, click(clip.truth), {
        signal: controller.signal,
        onProgress: ({ framesDone }) => {
          if (framesDone === 5) controller.abort();
        },
      }),
    );
    expect(err.code).toBe('VIDEO_CANCELLED');
  });
});
