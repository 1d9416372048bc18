import { mkdtemp, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { probeClip } from '../../../server/video/index';
import { renderFlightClip } from '../../../server/video/synth';

let dir: string;

beforeAll(async () => {
  dir = await mkdtemp(join(tmpdir(), 'arcwright-synth-'));
});

afterAll(async () => {
  await rm(dir, { recursive: true, force: true });
});

describe('renderFlightClip', () => {
  it('puts the true centres on the no-air parabola when drag is zero (closed form; Taylor, Classical Mechanics, 2005, ch. 1–2)', async () => {
    const g = 9.80665;
    const spec = { width: 160, height: 120, captureFps: 25, durationS: 1, ballRadiusPx: 3, dragPerMetre: 0, speedMps: 10, angleDeg: 60, launchHeightM: 1, launchTimeS: 0.2, pxPerMetre: 8, launchXPx: 10, groundYPx: 100 };
    const { truth, videoPath } = await renderFlightClip(join(dir, 'parabola.mp4'), spec);
    for (const f of truth.frames.filter((fr) => fr.airborne)) {
      const t = f.t - 0.2;
      const x = 10 + 8 * 10 * Math.cos(Math.PI / 3) * t;
      const y = 100 - 8 * (1 + 10 * Math.sin(Math.PI / 3) * t - 0.5 * g * t * t);
      // RK4 is exact to rounding for a quadratic; the tolerance covers the sampling interpolation.
      expect(Math.abs(f.x - x)).toBeLessThan(1e-6);
      expect(Math.abs(f.y - y)).toBeLessThan(1e-6);
    }
    const probe = await probeClip(videoPath);
    expect([probe.width, probe.height, probe.frameCount, probe.frameRate]).toEqual([160, 120, 25, 25]);
  });

  it('lands earlier and shorter with drag than without it (common practice)', async () => {
    const base = { width: 160, height: 120, captureFps: 30, durationS: 3, ballRadiusPx: 3, speedMps: 14, angleDeg: 45, launchTimeS: 0, clutter: false, pxPerMetre: 4 };
    const still = await renderFlightClip(join(dir, 'no-air.mp4'), { ...base, dragPerMetre: 0 });
    const air = await renderFlightClip(join(dir, 'air.mp4'), { ...base, dragPerMetre: 0.02 });
    expect(air.truth.landingFrame!).toBeLessThan(still.truth.landingFrame!);
    const restX = (frames: typeof air.truth.frames): number => frames[frames.length - 1]!.x;
    expect(restX(air.truth.frames)).toBeLessThan(restX(still.truth.frames));
  });
});
