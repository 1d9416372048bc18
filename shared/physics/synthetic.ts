/**
 * Synthetic traced flights with known parameters, for recovery tests, fixtures, benchmarks and
 * demo data. Seeded, so every run gives the same samples.
 */
import type { Air } from './air';
import { resolveBall, type BallProps } from './balls';
import { STANDARD_GRAVITY } from './constants';
import { PhysicsError } from './errors';
import { motionCoefficients, samplePath, simulateFlight, type FlightAero, type FlightSummary, type Launch } from './flight';

/**
 * A seeded uniform generator on [0, 1): mulberry32 (T. Ettinger, public domain, 2017; common
 * practice for small reproducible test streams, not for statistics at scale).
 */
export function mulberry32(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

/** Standard normal deviates from a uniform generator (Box & Muller, Ann. Math. Stat. 29 (1958) 610). */
export function normalGenerator(uniform: () => number): () => number {
  let spare: number | null = null;
  return () => {
    if (spare !== null) { const s = spare; spare = null; return s; }
    let u = 0;
    while (u <= 1e-300) u = uniform();
    const r = Math.sqrt(-2 * Math.log(u)), th = 2 * Math.PI * uniform();
    spare = r * Math.sin(th);
    return r * Math.cos(th);
  };
}

export interface SyntheticTrackSpec {
  launch: Launch;
  ball?: BallProps | string;
  air?: Air;
  aero: FlightAero;
  windSpeed?: number;
  gravity?: number;
  /** Frames per second of the samples (capture rate). */
  fps: number;
  /** Last sample time after the release (s); default: the last frame before landing. */
  endTime?: number;
  /** Standard deviation of the position noise per coordinate (m); default 0. */
  noise?: number;
  /**
   * Frame-to-frame correlation of the noise, as a follower's errors are: each coordinate's error is an
   * AR(1) series e_i = φ·e_{i−1} + √(1 − φ²)·σ·z_i with this φ (0 ≤ φ < 1; default 0, independent), so
   * its standard deviation stays `noise` (Box & Jenkins, *Time Series Analysis* (1970) §3.2).
   */
  noiseCorrelation?: number;
  /** Points displaced by `size` (m) in a random direction, never the first two. */
  outliers?: { count: number; size: number };
  seed?: number;
  /** Time of the release in the track's clock (s); default 0. */
  t0?: number;
  /** x of the release (m); default 0. */
  x0?: number;
  /** −1 flies towards −x (a throw filmed the other way round). */
  direction?: 1 | -1;
  /** Multiply positions (1000 mimics millimetres entered as metres). */
  positionScale?: number;
  /** Multiply times (8 mimics a ×8 slow-motion clip timed at its playback rate). */
  timeScale?: number;
}

/**
 * Generate a traced flight: the exact flight sampled at `fps`, plus Gaussian noise and outliers.
 * @returns the track, the true flight summary, and the indices (0-based) of the outliers.
 */
export function generateTrack(spec: SyntheticTrackSpec): { t: number[]; x: number[]; y: number[]; truth: FlightSummary; outlierIndices: number[] } {
  if (!(spec.fps > 0)) throw new PhysicsError('BAD_OPTION', 'fps must be positive.');
  const gravity = spec.gravity ?? STANDARD_GRAVITY;
  const windSpeed = spec.windSpeed ?? 0;
  const ball = spec.ball === undefined ? undefined : resolveBall(spec.ball);
  const truth = simulateFlight(spec.launch, ball, spec.air, spec.aero, { windSpeed, gravity, rtol: 1e-12 });
  const end = Math.min(spec.endTime ?? Infinity, truth.flightTime);
  const count = Math.floor(end * spec.fps + 1e-9) + 1;
  const { c, kappa } = motionCoefficients(spec.aero, ball, spec.air, windSpeed, gravity);
  const th = (spec.launch.angleDeg * Math.PI) / 180;
  const dense = samplePath(c, kappa, 0, spec.launch.height, spec.launch.speed * Math.cos(th), spec.launch.speed * Math.sin(th),
    (count - 1) / spec.fps, Math.max(count, 2), 1e-12);
  const rand = mulberry32(spec.seed ?? 1);
  const normal = normalGenerator(rand);
  const noise = spec.noise ?? 0;
  const dir = spec.direction ?? 1;
  const ps = spec.positionScale ?? 1, ts = spec.timeScale ?? 1;
  const t: number[] = [], x: number[] = [], y: number[] = [];
  const phi = spec.noiseCorrelation ?? 0;
  if (!(phi >= 0 && phi < 1)) throw new PhysicsError('BAD_OPTION', `Noise correlation ${phi} is not between 0 and 1 (excluded).`);
  const innovation = Math.sqrt(1 - phi * phi);
  let ex = 0, ey = 0;
  for (let i = 0; i < count; i++) {
    // The first error is drawn from the stationary distribution; later ones follow the AR(1) recursion.
    const zx = normal(), zy = normal();
    ex = i === 0 ? zx : phi * ex + innovation * zx;
    ey = i === 0 ? zy : phi * ey + innovation * zy;
    t.push(((spec.t0 ?? 0) + dense.t[i]) * ts);
    x.push(((spec.x0 ?? 0) + dir * (dense.x[i] + noise * ex)) * ps);
    y.push((dense.y[i] + noise * ey) * ps);
  }
  const outlierIndices: number[] = [];
  if (spec.outliers && spec.outliers.count > 0 && count > 4) {
    while (outlierIndices.length < Math.min(spec.outliers.count, count - 2)) {
      const i = 2 + Math.floor(rand() * (count - 2));
      if (outlierIndices.includes(i)) continue;
      outlierIndices.push(i);
      const a = 2 * Math.PI * rand();
      x[i] += spec.outliers.size * Math.cos(a) * ps;
      y[i] += spec.outliers.size * Math.sin(a) * ps;
    }
    outlierIndices.sort((a, b) => a - b);
  }
  return { t, x, y, truth, outlierIndices };
}
