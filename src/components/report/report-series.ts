/**
 * The numbers behind the report's charts, from a stored fit and the flight's traced points, in SI: the fitted
 * flight and the no-air parabola with the same launch (in the track's own coordinates, so the traced points sit
 * on them), the apex and landing marks, the speed components over time, and each point's residual.
 */
import { fittedPath, simulateFlight, type FitResult } from '../../../shared/physics';

export interface TracedPoint {
  frame: number;
  tS: number;
  xM: number | null;
  yM: number | null;
}

export type XY = [number, number];

export interface TrajectorySeries {
  traced: XY[];
  fitted: XY[];
  vacuum: XY[];
  apex: XY;
  landing: XY;
  /** Carry from the release, m (the landing mark's x counts from the calibration origin). */
  carry: number;
}

export interface SpeedSample {
  /** Time since the release, s. */
  t: number;
  vx: number;
  vy: number;
  speed: number;
}

export interface Residual {
  frame: number;
  /** Time since the release, s. */
  t: number;
  /** Point minus fitted flight, along x and y, m. */
  dx: number;
  dy: number;
  distance: number;
}

/** Samples of the drawn curves; fine enough that the line looks smooth at report sizes. */
export const CURVE_POINTS = 201;
/** Samples of the dense path the residuals interpolate: at 2000 steps the linear interpolation error is below 0.1 mm for ball flights. */
const RESIDUAL_PATH_POINTS = 2001;

/** Launch position in the track's coordinates: the fit's `launch.x` is already in them, the flight runs along `direction`. */
function along(r: FitResult, s: number): number {
  return r.launch.x + r.track.direction * s;
}

export function trajectorySeries(r: FitResult, points: readonly TracedPoint[]): TrajectorySeries {
  const traced: XY[] = [];
  for (const p of points) if (p.xM !== null && p.yM !== null) traced.push([p.xM, p.yM]);
  const path = fittedPath(r, CURVE_POINTS);
  const fitted: XY[] = path.x.map((x, i) => [x, path.y[i]]);
  const vac = simulateFlight(r.setup.launch, undefined, undefined, { model: 'vacuum' }, { gravity: r.setup.gravity, pathPoints: CURVE_POINTS });
  const vp = vac.path ?? { x: [], y: [] };
  const vacuum: XY[] = vp.x.map((s, i) => [along(r, s), vp.y[i]]);
  return {
    traced,
    fitted,
    vacuum,
    apex: [along(r, r.flight.apexX), r.flight.apexHeight],
    landing: [along(r, r.flight.carry), 0],
    carry: r.flight.carry,
  };
}

/** Ground-frame velocity along the flight (vx), up (vy) and its size, from the release to the landing. */
export function speedSeries(r: FitResult, samples = CURVE_POINTS): SpeedSample[] {
  const { launch, ball, air, aero, windSpeed, gravity } = r.setup;
  const flight = simulateFlight(launch, ball ?? undefined, air, aero, { windSpeed, gravity, pathPoints: samples });
  const p = flight.path;
  if (!p) return [];
  return p.t.map((t, i) => ({ t, vx: p.vx[i], vy: p.vy[i], speed: Math.hypot(p.vx[i], p.vy[i]) }));
}

/**
 * Each calibrated point's offset from the fitted flight at the same moment. The fitted path is sampled densely
 * and interpolated linearly in time; points outside the fitted span (before the release or after the landing)
 * have no residual.
 */
export function residualSeries(r: FitResult, points: readonly TracedPoint[]): Residual[] {
  const path = fittedPath(r, RESIDUAL_PATH_POINTS);
  const n = path.t.length;
  const t0 = path.t[0];
  const dt = (path.t[n - 1] - t0) / (n - 1);
  const out: Residual[] = [];
  for (const p of points) {
    if (p.xM === null || p.yM === null || !(dt > 0)) continue;
    const u = (p.tS - t0) / dt;
    // Note: a tiny tolerance keeps the release point itself, whose time may differ from t0 by float noise.
    if (u < -1e-9 || u > n - 1 + 1e-9) continue;
    const i = Math.min(Math.max(Math.floor(u), 0), n - 2);
    const w = Math.min(Math.max(u - i, 0), 1);
    const x = path.x[i] + w * (path.x[i + 1] - path.x[i]);
    const y = path.y[i] + w * (path.y[i + 1] - path.y[i]);
    const dx = p.xM - x;
    const dy = p.yM - y;
    out.push({ frame: p.frame, t: p.tS - r.track.t0, dx, dy, distance: Math.hypot(dx, dy) });
  }
  return out;
}
