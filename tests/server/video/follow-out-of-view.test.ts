import { describe, expect, it } from 'vitest';
import { followBall, type FollowResult } from '../../../server/video/index';
import { fitBallistic } from '../../../server/video/ballistic';
import { fitMotion, predictAt } from '../../../server/video/motion';
import type { FlightClipSpec, FlightTruth } from '../../../server/video/synth';
import { CLIP_SPECS, testClip } from '../../support/clips/index';

/**
 * How well the follower did over the frames in which the whole ball can be seen: the median
 * distance of its centres from the true ones there, the share of those frames (from the click to
 * the last one in the air) that have a point, and the frames with a point where none of the ball
 * can be seen.
 */
function score(result: FollowResult, truth: FlightTruth, startFrame: number) {
  const seen = truth.frames.filter((f) => f.frame >= startFrame && f.visible && f.airborne);
  const byFrame = new Map(result.points.map((p) => [p.frame, p]));
  const errors = seen
    .filter((f) => byFrame.has(f.frame))
    .map((f) => Math.hypot(byFrame.get(f.frame)!.x - f.x, byFrame.get(f.frame)!.y - f.y))
    .sort((a, b) => a - b);
  return {
    medianPx: errors[errors.length >> 1]!,
    followedShare: errors.length / seen.length,
    pointsOutOfView: result.points.filter((p) => truth.frames[p.frame]!.outOfView).map((p) => p.frame),
  };
}

function click(truth: FlightTruth): { frame: number; x: number; y: number } {
  const f = truth.frames[truth.launchFrame + 2]!;
  return { frame: f.frame, x: f.x + 1.5, y: f.y - 1 };
}

/** First and last frame of the runs in which none of the ball can be seen, while it is in the air. */
function hiddenRuns(truth: FlightTruth): Array<[number, number]> {
  const runs: Array<[number, number]> = [];
  for (const f of truth.frames) {
    if (!f.outOfView || !f.airborne) continue;
    const run = runs[runs.length - 1];
    if (run && run[1] === f.frame - 1) run[1] = f.frame;
    else runs.push([f.frame, f.frame]);
  }
  return runs;
}

/**
 * Follows one of the clips from a click just after launch and checks the targets over the frames
 * in which the ball can be seen: median error ≤ 1.5 px, ≥ 95 % of them followed, no point where
 * none of it can be seen.
 */
async function followWithinTargets(name: 'topExit' | 'occluded' | 'sideExit') {
  const clip = await testClip(name, CLIP_SPECS[name] as FlightClipSpec);
  const start = click(clip.truth);
  const result = await followBall(clip.videoPath, start, { captureFps: clip.truth.captureFps });
  const { medianPx, followedShare, pointsOutOfView } = score(result, clip.truth, start.frame);
  expect(medianPx).toBeLessThanOrEqual(1.5);
  expect(followedShare).toBeGreaterThanOrEqual(0.95);
  expect(pointsOutOfView).toEqual([]);
  return { truth: clip.truth, result, start, run: hiddenRuns(clip.truth)[0] };
}

describe('followBall when the ball goes out of view', () => {
  it('waits while a high punt is over the top of the picture, picks it up on its way down and follows it to the landing', async () => {
    const { truth, result, run } = await followWithinTargets('topExit');
    expect(run![1] - run![0]).toBeGreaterThan(60);
    expect(result.stoppedBecause).toBe('landed');
    expect(Math.abs(result.points[result.points.length - 1]!.frame - truth.landingFrame!)).toBeLessThanOrEqual(1);
    // The frames over the top are reported as one stretch out of view that covers the hidden run.
    const gap = result.outOfView.find((g) => g.fromFrame <= run![0] && g.toFrame >= run![1]);
    expect(gap).toBeDefined();
  });

  it('carries on behind a person walking across the ball and picks it up on the other side', async () => {
    const { result, run } = await followWithinTargets('occluded');
    expect(run![1] - run![0]).toBeGreaterThanOrEqual(3);
    expect(result.points.some((p) => p.frame > run![1] + 20)).toBe(true);
  });

  it('ends the track at the last sighting when the ball leaves a side and its path never brings it back', async () => {
    const { truth, result, start } = await followWithinTargets('sideExit');
    expect(result.stoppedBecause).toBe('left-frame');
    const lastSeen = Math.max(...truth.frames.filter((f) => !f.outOfView).map((f) => f.frame));
    const last = result.points[result.points.length - 1]!.frame;
    expect(last).toBeLessThanOrEqual(lastSeen);
    expect(last).toBeGreaterThanOrEqual(lastSeen - 3);
    // It stops soon after the ball has gone, rather than waiting out the longest coast.
    expect(result.framesExamined).toBeLessThan(last - start.frame + 10);
  });
});

describe('followBall on a clip with a variable frame rate', () => {
  it('takes every time from the frame\'s own timestamp, not from frame / rate, and keeps its accuracy', async () => {
    const clip = await testClip('variableRate', CLIP_SPECS.variableRate as FlightClipSpec);
    const start = click(clip.truth);
    const result = await followBall(clip.videoPath, start, { captureFps: 60 });
    const { medianPx, followedShare } = score(result, clip.truth, start.frame);
    expect(medianPx).toBeLessThanOrEqual(1.5);
    expect(followedShare).toBeGreaterThanOrEqual(0.95);
    let offBeat = 0;
    for (const p of result.points) {
      expect(Math.abs(p.t - clip.truth.frames[p.frame]!.t)).toBeLessThan(2e-5);
      offBeat = Math.max(offBeat, Math.abs(p.t - p.frame / 60));
    }
    expect(offBeat).toBeGreaterThan(0.003);
  });

  it('scales the timestamps by playback over capture rate when the coach says the clip is slow motion', async () => {
    const clip = await testClip('variableRate', CLIP_SPECS.variableRate as FlightClipSpec);
    const start = click(clip.truth);
    const result = await followBall(clip.videoPath, start, { captureFps: 240 });
    for (const p of result.points.slice(0, 20)) expect(p.t).toBeCloseTo(clip.truth.frames[p.frame]!.t / 4, 4);
  });
});

describe('fitBallistic', () => {
  /** Points of a flight with quadratic drag, a = (0, g) − k|v|v, integrated finely (RK4, 50 steps per frame). */
  function dragFlight(frames: number, g: number, k: number): Array<{ frame: number; x: number; y: number; weight: number }> {
    let s = [20, 300, 6, -9];
    const out = [];
    const h = 1 / 50;
    for (let f = 0; f < frames; f++) {
      out.push({ frame: f, x: s[0]!, y: s[1]!, weight: 1 });
      for (let i = 0; i < 50; i++) {
        const d = (q: number[]): number[] => {
          const sp = Math.hypot(q[2]!, q[3]!);
          return [q[2]!, q[3]!, -k * sp * q[2]!, g - k * sp * q[3]!];
        };
        const k1 = d(s);
        const k2 = d(s.map((v, j) => v + (h / 2) * k1[j]!));
        const k3 = d(s.map((v, j) => v + (h / 2) * k2[j]!));
        const k4 = d(s.map((v, j) => v + h * k3[j]!));
        s = s.map((v, j) => v + (h / 6) * (k1[j]! + 2 * k2[j]! + 2 * k3[j]! + k4[j]!));
      }
    }
    return out;
  }

  it('predicts a dragged flight 60 frames ahead within 2 px, where a parabola through the same points misses by far more (Taylor, Classical Mechanics, 2005, §2.4; tolerance common practice)', () => {
    const all = dragFlight(130, 0.12, 0.004);
    const seen = all.slice(0, 70);
    const path = fitBallistic(seen)!;
    expect(path).not.toBeNull();
    const quad = fitMotion(seen, 12, 2);
    const target = all[129]!;
    const p = path.at(129);
    expect(Math.hypot(p.x - target.x, p.y - target.y)).toBeLessThan(2);
    const q = predictAt(quad, 129);
    expect(Math.hypot(q.x - target.x, q.y - target.y)).toBeGreaterThan(10);
    expect(path.g).toBeCloseTo(0.12, 2);
  });

  it('returns null for a track too short to fit', () => {
    expect(fitBallistic(dragFlight(4, 0.1, 0))).toBeNull();
  });
});
