import { describe, expect, it } from 'vitest';
import {
  airFromConditions, fitFlight, fittedPath, generateTrack, isPhysicsError, type FitOptions, type FitResult, type SyntheticTrackSpec,
} from '../../../shared/physics/index';

// Recovery of the release from tracks that start a few frames after it: flights generated with a known
// release by shared/physics/synthetic.ts (seeded), the first frames cut off, fitted back with the release given.
const air = airFromConditions({ airTemperatureK: 288.15, airPressurePa: 101325, relativeHumidityPct: 50 });
const FPS = 60;
const kick: SyntheticTrackSpec = {
  launch: { speed: 26, angleDeg: 32, height: 0 }, ball: 'football-5', air, aero: { model: 'drag', cd: 0.25 }, fps: FPS, noise: 0.01, seed: 11,
};
const putt: SyntheticTrackSpec = {
  launch: { speed: 13, angleDeg: 38, height: 2.1 }, ball: 'shot-men', air, aero: { model: 'drag', cd: 0.47 }, fps: FPS, noise: 0.005, seed: 12,
};

/** The generated track with its first `late` samples cut off: the trace starts after the release. */
function lateTrack(spec: SyntheticTrackSpec, late: number) {
  const full = generateTrack(spec);
  return { truth: full.truth, track: { t: full.t.slice(late), x: full.x.slice(late), y: full.y.slice(late) } };
}

function fitLate(spec: SyntheticTrackSpec, late: number, options: FitOptions): { fit: FitResult; truth: ReturnType<typeof generateTrack>['truth'] } {
  const { truth, track } = lateTrack(spec, late);
  return { truth, fit: fitFlight(track, { ball: spec.ball, air: spec.air, model: 'drag', frameRate: FPS, ...options }) };
}

function thrown(fn: () => unknown): { code: string; message: string } {
  try {
    fn();
  } catch (e) {
    if (isPhysicsError(e)) return { code: e.code, message: e.message };
    throw e;
  }
  throw new Error('expected a PhysicsError');
}

describe('fitFlight release', () => {
  // Check bounds of the issue: launch speed within 1 %, angle within 0.5°, carry within 1 % of the true release.
  it('traces a kick from the ground back to the ground when the trace starts 6 frames late', () => {
    const { fit: f, truth } = fitLate(kick, 6, { release: { height: 0 } });
    expect(Math.abs(f.launch.speed - 26) / 26).toBeLessThan(0.01);
    expect(Math.abs(f.launch.angleDeg - 32)).toBeLessThan(0.5);
    expect(Math.abs(f.flight.carry - truth.carry) / truth.carry).toBeLessThan(0.01);
    expect(Math.abs(f.flight.flightTime - truth.flightTime) / truth.flightTime).toBeLessThan(0.01);
    expect(f.launch.height).toBeCloseTo(0, 9);
    expect(f.release.mode).toBe('height');
    // 6 frames at 60 fps: the first kept sample is 0.1 s after the release.
    expect(f.release.backTime).toBeCloseTo(0.1, 2);
    expect(f.release.backFrames).toBeCloseTo(6, 0);
    expect(f.release.time).toBeCloseTo(0, 2);
    expect(f.warnings.map((w) => w.code)).toContain('RELEASE_EXTRAPOLATED');
  });

  it('reads 11 % or more low without the release on the same track, as the trace starts late', () => {
    const { fit: f, truth } = fitLate(kick, 6, {});
    expect(f.release.mode).toBe('first-point');
    expect(f.launch.speed).toBeLessThan(26 * 0.95);
    expect(f.flight.carry).toBeLessThan(truth.carry * 0.95);
  });

  it('traces a throw back to a known release height of 2.1 m', () => {
    const { fit: f, truth } = fitLate(putt, 5, { release: { height: 2.1 } });
    expect(Math.abs(f.launch.speed - 13) / 13).toBeLessThan(0.01);
    expect(Math.abs(f.launch.angleDeg - 38)).toBeLessThan(0.5);
    expect(Math.abs(f.flight.carry - truth.carry) / truth.carry).toBeLessThan(0.01);
    expect(f.launch.height).toBeCloseTo(2.1, 9);
    expect(f.launch.heightError).toBeCloseTo(0, 9);
  });

  it('traces back to a marked release time, leaving out a ball at rest before it', () => {
    const { truth, track } = lateTrack(kick, 4);
    // The follower started from the ball lying still on the ground for three frames before the kick.
    const rest = { t: [-3 / FPS, -2 / FPS, -1 / FPS], x: [0.004, -0.003, 0.001], y: [0.11, 0.109, 0.111] };
    const withRest = { t: [...rest.t, ...track.t], x: [...rest.x, ...track.x], y: [...rest.y, ...track.y] };
    const f = fitFlight(withRest, { ball: 'football-5', air, model: 'drag', frameRate: FPS, release: { time: 0 } });
    expect(f.release).toMatchObject({ mode: 'time', droppedPoints: 3 });
    expect(f.release.backTime).toBeCloseTo(4 / FPS, 12);
    expect(f.release.backTimeError).toBe(0);
    expect(Math.abs(f.launch.speed - 26) / 26).toBeLessThan(0.01);
    expect(Math.abs(f.launch.angleDeg - 32)).toBeLessThan(0.5);
    expect(Math.abs(f.flight.carry - truth.carry) / truth.carry).toBeLessThan(0.01);
    within(f.launch.height, 0, f.launch.heightError);
    // The fitted path starts at the release, in the track's clock.
    const path = fittedPath(f, 11);
    expect(path.t[0]).toBeCloseTo(0, 12);
    expect(path.y[0]).toBeCloseTo(f.launch.height, 12);
  });

  it('gives the same fit with the release at the first sample as without a release (property)', () => {
    const { track } = lateTrack(kick, 0);
    const plain = fitFlight(track, { ball: 'football-5', air, model: 'drag' });
    const marked = fitFlight(track, { ball: 'football-5', air, model: 'drag', release: { time: track.t[0] } });
    expect(marked.launch.speed).toBe(plain.launch.speed);
    expect(marked.flight.carry).toBe(plain.flight.carry);
    expect(marked.launch.speedError).toBe(plain.launch.speedError);
    expect(marked.warnings.map((w) => w.code)).not.toContain('RELEASE_EXTRAPOLATED');
  });

  it('traces a no-air flight back exactly as the parabola does (closed form: v_y(t) = v_y0 − g t, Taylor, Classical Mechanics (2005) ch. 1–2)', () => {
    const spec: SyntheticTrackSpec = { launch: { speed: 15, angleDeg: 50, height: 1.2 }, aero: { model: 'vacuum' }, fps: FPS, seed: 3 };
    const { track } = lateTrack(spec, 9);
    const f = fitFlight(track, { model: 'vacuum', frameRate: FPS, release: { time: 0 }, air });
    expect(f.launch.speed).toBeCloseTo(15, 6);
    expect(f.launch.angleDeg).toBeCloseTo(50, 6);
    expect(f.launch.height).toBeCloseTo(1.2, 6);
  });

  it('warns past 3 frames of tracing back, and not within them', () => {
    expect(fitLate(kick, 2, { release: { time: 0 } }).fit.warnings.map((w) => w.code)).not.toContain('RELEASE_EXTRAPOLATED');
    const far = fitLate(kick, 5, { release: { time: 0 } }).fit.warnings.find((w) => w.code === 'RELEASE_EXTRAPOLATED');
    expect(far?.message).toMatch(/^The release lies 83\.3 ms \(5 frames\) before the first traced point, more than 3 frames/);
  });

  it('propagates the errors to the release: about 95 % of true values within 1.96 σ over 200 noisy kicks', () => {
    let speed = 0, angle = 0, carry = 0;
    const N = 200;
    for (let seed = 1; seed <= N; seed++) {
      const { fit: f, truth } = fitLate({ ...kick, noise: 0.02, seed: 1000 + seed }, 5, { release: { height: 0 } });
      if (Math.abs(f.launch.speed - 26) <= 1.96 * f.launch.speedError!) speed++;
      if (Math.abs(f.launch.angleDeg - 32) <= 1.96 * f.launch.angleDegError!) angle++;
      if (Math.abs(f.flight.carry - truth.carry) <= 1.96 * f.errors.carry!) carry++;
    }
    // Binomial spread of a 95 % share over 200 flights is ±1.5 %: 90–99 % allows three of it (common practice).
    for (const hits of [speed, angle, carry]) {
      expect(hits / N).toBeGreaterThan(0.9);
      expect(hits / N).toBeLessThan(0.99);
    }
  });
});

function within(value: number, truth: number, error: number | null, sigmas = 3): void {
  expect(error).not.toBeNull();
  expect(Math.abs(value - truth)).toBeLessThanOrEqual(sigmas * error! + 1e-12);
}

describe('fitFlight release refusals', () => {
  const { track } = lateTrack(kick, 3);
  const base: FitOptions = { ball: 'football-5', air, model: 'drag', frameRate: FPS };

  it('refuses a release after the last traced point', () => {
    const e = thrown(() => fitFlight(track, { ...base, release: { time: track.t.at(-1)! + 0.05 } }));
    expect(e.code).toBe('BAD_OPTION');
    expect(e.message).toMatch(/comes after the last traced point/);
  });

  it('refuses a release height below the ground or above 5 m', () => {
    expect(thrown(() => fitFlight(track, { ...base, release: { height: -0.1 } })).message).toMatch(/^A release height of -0.1 m is below the ground/);
    expect(thrown(() => fitFlight(track, { ...base, release: { height: 5.5 } })).message).toMatch(/^A release height of 5.5 m is above 5 m/);
  });

  it('refuses a release more than 1 s before the first traced point', () => {
    const e = thrown(() => fitFlight(track, { ...base, release: { time: -1.5 } }));
    expect(e.code).toBe('BAD_OPTION');
    expect(e.message).toMatch(/more than the 1 s the fit will trace back/);
  });

  it('refuses a release height above the first traced point of a rising ball', () => {
    const e = thrown(() => fitFlight(track, { ...base, release: { height: 3 } }));
    expect(e.code).toBe('FIT_FAILED');
    expect(e.message).toMatch(/already .* m below the release height of 3 m/);
  });

  it('refuses a release time that leaves too few points', () => {
    const e = thrown(() => fitFlight(track, { ...base, release: { time: track.t.at(-3)! } }));
    expect(e.code).toBe('TOO_FEW_POINTS');
    expect(e.message).toMatch(/^Only 3 traced points follow the release/);
  });
});
