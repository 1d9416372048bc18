/**
 * The release: where the ball left the foot or hand when the trace starts a few frames later.
 * The fitted flight is integrated backwards from the first traced sample to a given release time,
 * or to the moment it was at a given release height, and the parameters' covariance is carried
 * to the release state so that every figure reported from the release keeps its standard error.
 *
 * Method: the flight's equations with their variational equations ({@link flightRhs}) in reversed
 * time s = −t (dY/ds = −f(Y): the augmented system of an autonomous ODE reverses by a sign), so the
 * forward Dormand–Prince integrator serves; the height is located as an event on its dense output.
 * A release at a height moves the release time with the parameters: δs = S_y / v_y (implicit
 * function theorem on y(s) = H), and the state by S − f·δs. The release parameters'
 * covariance is Q C Qᵀ with Q = ∂(release state, aero) / ∂(first-sample state, aero) (delta method;
 * Seber & Wild, *Nonlinear Regression* (1989) §5.1).
 */
import { PhysicsError } from './errors';
import { acceleration, flightRhs, initialState, type MotionCoefficients, type SensitivityParam } from './flight';
import { integrate, type OdeRhs } from './integrator';

/** Where the release is: a time in the track's clock (s), or a height above the ground (m, 0…5). */
export type ReleaseSpec = { time: number } | { height: number };

/** The longest a release may lie before the first traced sample (s): beyond it the trace misses too much. */
export const RELEASE_MAX_BACK_S = 1;
/** Releases above this height (m) are refused: no throw or kick leaves the hand or foot higher. */
export const RELEASE_MAX_HEIGHT_M = 5;
/** Past this many frames before the first sample, the release is reported as extrapolated (`RELEASE_EXTRAPOLATED`). */
export const RELEASE_WARN_FRAMES = 3;
/** Without a frame rate, the same warning comes past this time (s): 3 frames at 60 fps. */
export const RELEASE_WARN_S = 0.05;

export interface ReleasePoint {
  /** Release state (m, m/s) in the fit's mirrored frame. */
  x: number; y: number; vx: number; vy: number;
  /** Covariance of (x, y, vₓ, v_y, aerodynamic parameters…) at the release, row-major; null without one. */
  cov: Float64Array | null;
  /** How long before the first traced sample the ball was released (s), and its standard error (0 when the time was given). */
  backTime: number;
  backTimeError: number | null;
}

/**
 * Checks a release height (m).
 * @throws PhysicsError `BAD_OPTION` below the ground or above {@link RELEASE_MAX_HEIGHT_M}.
 */
export function checkReleaseHeight(height: number): void {
  if (!Number.isFinite(height) || height < 0) {
    throw new PhysicsError('BAD_OPTION', `A release height of ${height} m is below the ground: give 0 for a ball on the ground or a tee, or the height of the hand at release in metres.`);
  }
  if (height > RELEASE_MAX_HEIGHT_M) {
    throw new PhysicsError('BAD_OPTION', `A release height of ${height} m is above ${RELEASE_MAX_HEIGHT_M} m, higher than any hand or foot releases a ball: give it in metres (a 2.1 m release is 2.1).`);
  }
}

/**
 * The fitted flight traced back from the first sample to the release.
 * @param c coefficients of the fitted flight (gravity m/s², wind m/s, κC_d …); @param kappa κ = ρA/(2m) (1/m).
 * @param names the fit's parameters: x₀, y₀ (m), vₓ₀, v_y₀ (m/s), then the aerodynamic ones (C_d, C_L or β).
 * @param p their fitted values at the first sample; @param cov their covariance (row-major) or null.
 * @param release a release time before the first sample (`backTime` s, ≥ 0), or a height (m).
 * @param noise the track's position noise (m): a first sample within 3 noise units of a release height is the release.
 * @param rtol integration tolerance (relative; m and m/s).
 * @returns the release state and its covariance, and how far back it lies.
 * @throws PhysicsError `FIT_FAILED` when the flight does not pass the release height within {@link RELEASE_MAX_BACK_S}.
 */
export function traceBackToRelease(
  c: MotionCoefficients, kappa: number, names: readonly string[], p: ArrayLike<number>, cov: Float64Array | null,
  release: { backTime: number } | { height: number }, noise: number, rtol: number,
): ReleasePoint {
  const np = names.length;
  const sens = names.slice(2) as SensitivityParam[];
  const dim = 4 + 4 * sens.length;
  const forward = flightRhs(c, kappa, sens);
  const backward: OdeRhs = (t, y, d) => {
    forward(-t, y, d);
    for (let i = 0; i < dim; i++) d[i] = -d[i];
  };
  const s0 = initialState(p[0], p[1], p[2], p[3], sens);
  let end: Float64Array = s0;
  let backTime = 0;
  let heightMode = false;
  if ('backTime' in release) {
    backTime = release.backTime;
    if (backTime > 0) end = integrate(backward, 0, s0, { tEnd: backTime, rtol, atol: rtol, errorDim: 4 }).y;
  } else {
    heightMode = true;
    const h = release.height;
    const gap = p[1] - h;
    if (gap < 0 && -gap > 3 * noise) {
      throw new PhysicsError('FIT_FAILED', `The first traced point is ${fmt(p[1])} m above the ground, already ${fmt(-gap)} m below the release height of ${fmt(h)} m: check the release height, and the calibration's ground (the level line or the ground reference).`);
    }
    if (gap > 0) {
      const res = integrate(backward, 0, s0, {
        tEnd: RELEASE_MAX_BACK_S, rtol, atol: rtol, errorDim: 4,
        events: [{ name: 'release', g: (_t, y) => y[1] - h, direction: -1, terminal: true }],
      });
      if (res.status !== 'event') {
        throw new PhysicsError('FIT_FAILED', `Traced back from the first point (${fmt(p[1])} m up), the fitted flight does not come down to the release height of ${fmt(h)} m within ${RELEASE_MAX_BACK_S} s: check the release height and the calibration's ground, or mark the release frame instead.`);
      }
      backTime = res.t;
      end = res.y;
    }
  }
  // Q: rows 0–3 the release state's derivatives by each parameter, the aerodynamic rows the identity.
  const q = new Float64Array(np * np);
  const col = (j: number, comp: number) => (j < 2 ? (j === comp ? 1 : 0) : end[4 + 4 * (j - 2) + comp]);
  const gradBack = new Float64Array(np);
  const [ax, ay] = acceleration(c, end[2], end[3]);
  const f = [end[2], end[3], ax, ay];
  for (let j = 0; j < np; j++) {
    const ds = heightMode && backTime > 0 ? col(j, 1) / end[3] : 0;
    gradBack[j] = ds;
    for (let comp = 0; comp < 4; comp++) q[comp * np + j] = col(j, comp) - f[comp] * ds;
  }
  for (let i = 4; i < np; i++) q[i * np + i] = 1;
  let relCov: Float64Array | null = null;
  let backTimeError: number | null = null;
  if (cov) {
    relCov = sandwich(q, cov, np);
    let v = 0;
    for (let a = 0; a < np; a++) for (let b = 0; b < np; b++) v += gradBack[a] * cov[a * np + b] * gradBack[b];
    backTimeError = Math.sqrt(Math.max(v, 0));
  }
  return { x: end[0], y: end[1], vx: end[2], vy: end[3], cov: relCov, backTime, backTimeError };
}

/** Q C Qᵀ for square row-major matrices of order n. */
function sandwich(q: Float64Array, c: Float64Array, n: number): Float64Array {
  const qc = new Float64Array(n * n);
  for (let i = 0; i < n; i++) for (let k = 0; k < n; k++) {
    const a = q[i * n + k];
    if (a === 0) continue;
    for (let j = 0; j < n; j++) qc[i * n + j] += a * c[k * n + j];
  }
  const out = new Float64Array(n * n);
  for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) {
    let s = 0;
    for (let k = 0; k < n; k++) s += qc[i * n + k] * q[j * n + k];
    out[i * n + j] = s;
  }
  return out;
}

function fmt(v: number): string {
  return Number(v.toPrecision(3)).toString();
}
