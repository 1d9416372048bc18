/**
 * Test clips for the video tests, rendered by server/video/synth.ts and cached in
 * `.data/test-clips/` (git-ignored). The cache key covers the clip's spec and the generator's own
 * source, so a change to the generator renders fresh clips instead of reusing stale truth.
 */
import { createHash } from 'node:crypto';
import { existsSync, readFileSync } from 'node:fs';
import { mkdir, readdir, rm } from 'node:fs/promises';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { readTruth, renderFlightClip, type FlightClipSpec, type RenderedClip } from '../../../server/video/synth';

const here = dirname(fileURLToPath(import.meta.url));
const root = resolve(here, '../../..');
export const TEST_CLIP_DIR = join(root, '.data', 'test-clips');
const generatorSource = readFileSync(join(root, 'server/video/synth.ts'), 'utf8');

/** Renders (or reuses) a clip for `spec`; `name` only makes the file easy to recognise. */
export async function testClip(name: string, spec: FlightClipSpec): Promise<RenderedClip> {
  const key = createHash('sha1').update(JSON.stringify(spec)).update(generatorSource).digest('hex').slice(0, 12);
  const videoPath = join(TEST_CLIP_DIR, `${name}-${key}.mp4`);
  const truthPath = `${videoPath}.truth.json`;
  if (existsSync(videoPath) && existsSync(truthPath)) return { videoPath, truthPath, truth: await readTruth(truthPath) };
  await mkdir(TEST_CLIP_DIR, { recursive: true });
  // Clips of an older spec or generator under the same name are stale: remove them.
  for (const file of await readdir(TEST_CLIP_DIR)) {
    if (file.startsWith(`${name}-`) && !file.startsWith(`${name}-${key}.`)) await rm(join(TEST_CLIP_DIR, file), { force: true });
  }
  return renderFlightClip(videoPath, spec);
}

/** Clips at several sizes and frame rates, each with a flight the follower must keep. */
export const CLIP_SPECS = {
  /** Small and slow to film: 30 fps, the ball lands inside the picture. */
  lowRate: { width: 320, height: 240, captureFps: 30, durationS: 2.6, ballRadiusPx: 4, seed: 3 },
  /** 60 fps, a fast flat throw that leaves through the right edge. */
  flat60: { width: 640, height: 360, captureFps: 60, durationS: 1.9, ballRadiusPx: 6, speedMps: 30, angleDeg: 18, seed: 5 },
  /** Slow motion: filmed at 120 fps, stored to play back at 30. */
  slowMotion: { width: 480, height: 270, captureFps: 120, playbackFps: 30, durationS: 1.2, ballRadiusPx: 5, speedMps: 16, angleDeg: 40, seed: 7 },
  /** A small ball, no motion blur, 50 fps. */
  smallBall: { width: 400, height: 300, captureFps: 50, durationS: 2, ballRadiusPx: 3, exposure: 0, speedMps: 15, angleDeg: 50, seed: 11 },
  /** A phone held upright: stored turned and tagged with a 90° rotation. */
  rotated: { width: 360, height: 480, captureFps: 30, durationS: 1.2, ballRadiusPx: 5, pxPerMetre: 16, speedMps: 13, angleDeg: 55, rotationDeg: 90, seed: 13 },
  /** A high punt: it leaves through the top of the picture around its apex, comes back and lands. */
  topExit: { width: 640, height: 360, captureFps: 60, durationS: 4.4, ballRadiusPx: 5, pxPerMetre: 20, launchXPx: 40, speedMps: 22, angleDeg: 72, seed: 17 },
  /** A long throw that leaves through the right edge while still in the air and never comes back. */
  sideExit: { width: 480, height: 270, captureFps: 60, durationS: 2.6, ballRadiusPx: 5, speedMps: 24, angleDeg: 35, seed: 19 },
  /** A variable frame rate: frames filmed up to 4 ms off the 60 fps beat, each stamped with its own time. */
  variableRate: { width: 480, height: 270, captureFps: 60, durationS: 1.8, ballRadiusPx: 5, speedMps: 16, angleDeg: 45, seed: 29, timestampJitterS: 0.004 },
  /** A camera turned to follow a long kick: a pan of most of a picture width, a little tilt and a 2° roll. */
  panning: { width: 480, height: 270, captureFps: 60, durationS: 2.4, ballRadiusPx: 5, launchXPx: 100, speedMps: 24, angleDeg: 38, seed: 31, pan: { panPx: 400, tiltPx: -30, rollDeg: 2 } },
  /**
   * A still camera turned 30° from square to the plane of flight, with a rectangle of white bars 8 m × 3 m
   * standing in that plane (for the four-point plane calibration); the far side is on the left.
   */
  tilted: { width: 640, height: 360, captureFps: 60, durationS: 2.6, ballRadiusPx: 6, pxPerMetre: 24, launchXPx: 40, speedMps: 16, angleDeg: 40, seed: 37, tilt: { yawDeg: 30, rectangle: { fromXM: 2, widthM: 8, heightM: 3 } } },
  /** A person walks across in front of the ball early in its flight and hides it for a few frames. */
  occluded: { width: 480, height: 270, captureFps: 50, durationS: 2.2, ballRadiusPx: 5, speedMps: 15, angleDeg: 40, seed: 23, occluder: { atS: 0.65, widthPx: 30 } },
} satisfies Record<string, FlightClipSpec>;
