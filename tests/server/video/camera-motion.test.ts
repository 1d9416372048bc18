import { describe, expect, it } from 'vitest';
import { applyRigid, CameraTracker, composeRigid, fitRigid, invertRigid, type Rigid } from '../../../server/video/camera-motion';
import { openSource } from '../../../server/video/frame-stream';
import { followBall } from '../../../server/video/index';
import type { FlightClipSpec, TruthFrame } from '../../../server/video/synth';
import { CLIP_SPECS, testClip } from '../../support/clips/index';

/** The truth's frame → reference map (about the picture centre) as a rigid map of corner-based pixels. */
function trueMap(f: TruthFrame, width: number, height: number): Rigid {
  const cam = f.camera!;
  const c = Math.cos(cam.rotRad);
  const s = Math.sin(cam.rotRad);
  const cx = width / 2;
  const cy = height / 2;
  return { rotRad: cam.rotRad, tx: cx - (c * cx - s * cy) + cam.dx, ty: cy - (s * cx + c * cy) + cam.dy };
}

describe('rigid maps', () => {
  it('composes and inverts to the identity', () => {
    const m = { rotRad: 0.03, tx: 12, ty: -4 };
    const id = composeRigid(m, invertRigid(m));
    expect(id.rotRad).toBeCloseTo(0, 12);
    expect(id.tx).toBeCloseTo(0, 9);
    expect(id.ty).toBeCloseTo(0, 9);
  });

  it('fits the motion of the background and ignores a minority of patches that move on their own', () => {
    const m = { rotRad: 0.01, tx: 5, ty: -2 };
    const matches = [];
    for (let i = 0; i < 30; i++) {
      const x = 20 + (i % 6) * 70;
      const y = 20 + Math.floor(i / 6) * 50;
      const q = applyRigid(m, x, y);
      // A quarter of the patches sit on a player walking the other way.
      matches.push(i % 4 === 0 ? { x, y, u: q.x - 9, v: q.y + 3 } : { x, y, u: q.x, v: q.y });
    }
    const fit = fitRigid(matches);
    expect(fit.rotRad).toBeCloseTo(0.01, 6);
    expect(fit.tx).toBeCloseTo(5, 4);
    expect(fit.ty).toBeCloseTo(-2, 4);
  });
});

describe('CameraTracker', () => {
  it('maps the ball of a panning, rolling clip into the reference frame within 2 px median (matched against key frames)', async () => {
    const clip = await testClip('panning', CLIP_SPECS.panning as FlightClipSpec);
    const { width, height, frames } = clip.truth;
    const src = await openSource(clip.videoPath, undefined, 2);
    const tracker = new CameraTracker(width, height);
    const maps: Rigid[] = [];
    let weakest = Infinity;
    for await (const f of src.read(0, null)) {
      const t = frames[f.index]!;
      const { toRef, inliers } = tracker.push(f.data, [{ x: t.x, y: t.y, r: 8 }]);
      maps.push(toRef);
      weakest = Math.min(weakest, inliers);
    }
    await src.close();
    expect(maps).toHaveLength(frames.length);
    expect(weakest).toBeGreaterThanOrEqual(8);
    const errors = frames
      .filter((f) => f.visible)
      .map((f) => {
        const p = applyRigid(maps[f.frame]!, f.x, f.y);
        return Math.hypot(p.x - f.xRef!, p.y - f.yRef!);
      })
      .sort((a, b) => a - b);
    expect(errors.length).toBeGreaterThan(60);
    expect(errors[errors.length >> 1]!).toBeLessThanOrEqual(2);
    // The whole pan is found: the last frame's map agrees with the truth at the picture's corners.
    const last = frames[frames.length - 1]!;
    const truth = trueMap(last, width, height);
    for (const [x, y] of [[0, 0], [width, 0], [0, height], [width, height]] as const) {
      const a = applyRigid(maps[last.frame]!, x, y);
      const b = applyRigid(truth, x, y);
      expect(Math.hypot(a.x - b.x, a.y - b.y)).toBeLessThan(2);
    }
    expect(Math.abs(truth.tx)).toBeGreaterThan(300);
  });
});

describe('followBall with a moving camera', () => {
  it('follows the ball of a panning clip in each frame and gives the track in the start frame\'s pixels within 2 px median', async () => {
    const clip = await testClip('panning', CLIP_SPECS.panning as FlightClipSpec);
    const { width, height, frames } = clip.truth;
    const start = frames[clip.truth.launchFrame + 2]!;
    const result = await followBall(clip.videoPath, { frame: start.frame, x: start.x + 1.5, y: start.y - 1 }, { captureFps: 60, camera: 'moving' });
    // The truth's reference is frame 0; the follower's is the start frame.
    const toStart = invertRigid(trueMap(start, width, height));
    const seen = frames.filter((f) => f.frame >= start.frame && f.visible && f.airborne);
    const byFrame = new Map(result.points.map((p) => [p.frame, p]));
    const own: number[] = [];
    const ref: number[] = [];
    for (const f of seen) {
      const p = byFrame.get(f.frame);
      if (!p) continue;
      own.push(Math.hypot(p.x - f.x, p.y - f.y));
      const r = applyRigid(toStart, f.xRef!, f.yRef!);
      ref.push(Math.hypot(p.xRef - r.x, p.yRef - r.y));
    }
    const median = (v: number[]): number => [...v].sort((a, b) => a - b)[v.length >> 1]!;
    expect(own.length / seen.length).toBeGreaterThanOrEqual(0.95);
    expect(median(own)).toBeLessThanOrEqual(1.5);
    expect(median(ref)).toBeLessThanOrEqual(2);
    expect(result.camera).not.toBeNull();
    const lastMap = result.camera![result.camera!.length - 1]!;
    expect(lastMap.tx).toBeGreaterThan(300);
  });
});

describe('followBall with a reference frame of its own', () => {
  it('gives the track and the maps in the pixels of a reference frame after the frames followed', async () => {
    const clip = await testClip('panning', CLIP_SPECS.panning as FlightClipSpec);
    const { width, height, frames } = clip.truth;
    const start = frames[clip.truth.launchFrame + 2]!;
    const refFrame = frames.length - 1;
    const result = await followBall(clip.videoPath, { frame: start.frame, x: start.x, y: start.y }, { captureFps: 60, camera: 'moving', endFrame: 60, referenceFrame: refFrame });
    expect(result.referenceFrame).toBe(refFrame);
    expect(result.points.at(-1)!.frame).toBeLessThanOrEqual(60);
    // The truth's reference is frame 0: carry it on into the last frame's pixels.
    const toRef = invertRigid(trueMap(frames[refFrame]!, width, height));
    const errors = result.points.map((p) => {
      const f = frames[p.frame]!;
      const r = applyRigid(toRef, f.xRef!, f.yRef!);
      return Math.hypot(p.xRef - r.x, p.yRef - r.y);
    });
    const median = (v: number[]): number => [...v].sort((a, b) => a - b)[v.length >> 1]!;
    expect(median(errors)).toBeLessThanOrEqual(2);
    // The camera was tracked on through the last frame, whose own map is the identity.
    const last = result.camera!.find((m) => m.frame === refFrame)!;
    expect(Math.hypot(last.tx, last.ty)).toBeLessThan(1e-6);
    expect(Math.abs(last.rotRad)).toBeLessThan(1e-9);
  });

  it('refuses a reference frame outside the clip', async () => {
    const clip = await testClip('panning', CLIP_SPECS.panning as FlightClipSpec);
    const start = clip.truth.frames[20]!;
    await expect(followBall(clip.videoPath, { frame: 20, x: start.x, y: start.y }, { camera: 'moving', referenceFrame: 5000 })).rejects.toMatchObject({
      code: 'VIDEO_BAD_REQUEST',
      message: expect.stringMatching(/^Reference frame 5000 is outside the clip: its frames are numbered 0 to \d+\.$/),
    });
  });
});
