/**
 * Fit the equations of motion to a traced flight, and derive what the coach reads.
 *
 * Method: nonlinear least squares (Levenberg–Marquardt, {@link levenbergMarquardt}) over the launch
 * point, launch velocity and the air's coefficients (C_d; C_L; or β), the model integrated with its
 * variational equations so that each iteration costs one integration ({@link flightRhs}); a robust
 * soft-L1 loss on each point's distance from the model so that a few bad clicks do not drag the fit;
 * standard errors from the covariance s²(JᵀWJ)⁻¹ (Seber & Wild, *Nonlinear Regression* (1989)
 * §2.1, §5.2); a Gaussian prior on C_d from the ball's catalogue range when the track cannot
 * determine it; model choice between drag and drag-lift by the Bayesian information criterion
 * (Schwarz, Ann. Stat. 6 (1978) 461; "positive evidence" ΔBIC > 2 after Kass & Raftery, JASA 90
 * (1995) 773); and a scale check by a fit that lets gravity float.
 */
import { reynoldsNumber, dragRegime, standardAir, SMOOTH_SPHERE_CRISIS_RE, type Air, type DragRegime } from './air';
import { recogniseBall, resolveBall, type BallProps, type BallSpec } from './balls';
import { STANDARD_GRAVITY } from './constants';
import { PhysicsError, isPhysicsError, type FlightWarning } from './errors';
import {
  acceleration, dragFactor, flightRhs, flyToGround, initialState, summarize, summaryOf, samplePath, SIMULATE_DEFAULTS,
  type FlightAero, type FlightModel, type FlightSummary, type Launch, type MotionCoefficients, type SensitivityParam,
} from './flight';
import { integrate } from './integrator';
import { cholesky, choleskySolve, spdInverse, polyFit } from './linalg';
import { gaussNewtonStep, levenbergMarquardt, type LmOptions, type LmProblem, type LmResult, type LmStopReason, type RobustLoss } from './lm';
import {
  checkReleaseHeight, traceBackToRelease, RELEASE_MAX_BACK_S, RELEASE_WARN_FRAMES, RELEASE_WARN_S, type ReleasePoint, type ReleaseSpec,
} from './release';
import { checkTrack, MIN_POINTS, type Track } from './track';
import { withDefaults } from './options';

export type ModelChoice = 'auto' | FlightModel;

/** Options of {@link fitFlight}; defaults in {@link FIT_DEFAULTS}. */
export interface FitOptions {
  /** `auto` (default): drag, or drag-lift where the information criterion says lift is warranted. */
  model?: ModelChoice;
  /** The ball (catalogue id or mass/diameter); required by every model but `vacuum` and `linear`. */
  ball?: BallProps | string;
  /** The air; default ISO standard sea-level air, with an `AIR_ASSUMED` warning. */
  air?: Air;
  /** Wind along the flight (m/s), positive = tailwind, −60…60. */
  windSpeed?: number;
  /** Gravity (m/s²); default 9.80665. */
  gravity?: number;
  /** Robust loss on each point's distance (default `soft-l1`); `linear` is plain least squares. */
  loss?: RobustLoss;
  /** Cross-check the calibration with a gravity-free fit (default true). */
  scaleCheck?: boolean;
  /** Prior on C_d from the ball's range: `auto` (when the track cannot determine C_d), `always`, or `off`. */
  cdPrior?: 'auto' | 'always' | 'off';
  /** Accept a track that never rises (downward serve, spike): apex becomes the release. Default false. */
  allowDescending?: boolean;
  /** Tolerance of the integration inside the fit (default 1e-8: m and m/s, relative). */
  rtol?: number;
  /** Iteration limit per least-squares run (default 100). */
  maxIterations?: number;
  /**
   * The release, when the trace starts after it: `{ time }` in the track's clock (s; samples before it,
   * a ball at rest, are left out) or `{ height }` above the ground (m, 0…5: 0 for a ball on the
   * ground or a tee). Default: the first sample is the release.
   */
  release?: ReleaseSpec;
  /** Capture rate of the samples (frames/s, > 0), to count the frames between the release and the first sample. */
  frameRate?: number;
}

export const FIT_DEFAULTS = {
  model: 'auto' as ModelChoice,
  windSpeed: 0,
  gravity: STANDARD_GRAVITY,
  loss: 'soft-l1' as RobustLoss,
  scaleCheck: true,
  cdPrior: 'auto' as 'auto' | 'always' | 'off',
  allowDescending: false,
  rtol: 1e-8,
  maxIterations: 100,
} as const;

/**
 * Smallest position noise the fit assumes (m): sub-millimetre tracing is not credible from video,
 * and a floor keeps the information criterion and the robust scale sane on synthetic, noise-free tracks.
 */
export const NOISE_FLOOR_M = 1e-4;
/** The soft-L1 loss scale in units of the robust noise estimate: inliers keep weights ≳ 0.8. */
const LOSS_SCALE_SIGMAS = 2.5;
/** A point farther than this many noise units from the fit is reported as an outlier. */
const OUTLIER_SIGMAS = 4;
/** A coarse gravity estimate outside ×1/12…×12 of standard is a unit or timing error, whatever the ball. */
const COARSE_SCALE_BAND = 12;
/**
 * The landing is reported as extrapolated (`EXTRAPOLATED`) when more than this share of the carry lies
 * beyond the last traced point: below it the fitted model's error over the untraced part is small
 * beside the carry's own standard error on typical tracks (common practice).
 */
export const EXTRAPOLATED_CARRY_SHARE = 0.1;
/** Generic C_d range for a ball without one (smooth to rough spheres, common practice). */
const GENERIC_CD_RANGE = { min: 0.1, max: 0.6 };

export interface ScaleCheck {
  /** Fitted gravity / assumed gravity: 1.00 means the calibration agrees with gravity. */
  factor: number;
  /** One standard error of `factor`; null when the track cannot determine gravity. */
  error: number | null;
  status: 'agrees' | 'disagrees' | 'inconclusive';
}

/** The result of a fit. Lengths m, times s from the release, speeds m/s, angles degrees; errors one standard error. */
export interface FitResult {
  model: FlightModel;
  converged: boolean;
  stopReason: LmStopReason;
  /** Iterations over all least-squares runs of this fit. */
  iterations: number;
  evaluations: number;
  launch: Launch & { x: number; vx: number; vy: number; speedError: number | null; angleDegError: number | null; heightError: number | null };
  cd: number | null;
  cdError: number | null;
  cl: number | null;
  clError: number | null;
  /** β = b/m (1/s), linear model only. */
  dragRate: number | null;
  dragRateError: number | null;
  /** The fitted flight from the release to the ground (extrapolated past the track's end). */
  flight: FlightSummary;
  errors: { carry: number | null; apexHeight: number | null; apexTime: number | null; flightTime: number | null; landingSpeed: number | null; standardCarry: number | null };
  /** Air-relative speed at which drag balances weight (m/s). */
  terminalSpeed: number | null;
  /** Drag force / weight at launch. */
  dragToWeight: number | null;
  /** Reynolds number at launch (air-relative speed). */
  reynolds: number | null;
  regime: DragRegime | null;
  nearDragCrisis: boolean | null;
  /** The same launch with no air. */
  vacuum: { carry: number; apexHeight: number; flightTime: number };
  /** The same launch in still ISO standard sea-level air (m). */
  standardCarry: number;
  /** Root-mean-square distance of the points from the fitted flight (m). */
  rms: number;
  /** Robust estimate of the position noise per coordinate (m). */
  noise: number;
  points: number;
  /** 1-based numbers of points that the robust loss set aside. */
  outliers: number[];
  /** Time of the last sample after the release (s). */
  trackEnd: number;
  /** Whether more than {@link EXTRAPOLATED_CARRY_SHARE} of the carry lies beyond the last traced point. */
  extrapolated: boolean;
  /** Carry beyond the last traced point (m). */
  extrapolatedCarry: number;
  /**
   * The release the launch figures refer to: `first-point` (the first sample), or traced back to a
   * given `time` or `height`. `time` is in the input clock (s); `backTime` how long before the first
   * traced sample (s) and `backFrames` in frames when the frame rate is known.
   */
  release: {
    mode: 'first-point' | 'time' | 'height';
    time: number;
    backTime: number;
    backTimeError: number | null;
    backFrames: number | null;
    /** Samples before the release time (a ball at rest) left out of the fit. */
    droppedPoints: number;
  };
  /** Reynolds numbers over the fitted flight from the release to the ground (slowest and fastest air-relative speed). */
  reynoldsRange: { min: number; max: number } | null;
  /**
   * Point-to-point correlation φ of the track's errors (AR(1), 0 = independent) that the stated errors
   * allow for, and the number of independent points the track is worth, n(1 − φ)/(1 + φ).
   */
  noiseCorrelation: { phi: number; effectivePoints: number };
  scaleCheck: ScaleCheck | null;
  /** BIC of both models (lower is better); `drag` is null when the lift term was decisive (Wald z² − ln m > 27) and the drag fit was skipped. */
  modelSelection: { criterion: 'BIC'; drag: number | null; dragLift: number; chosen: FlightModel } | null;
  /**
   * The Gaussian prior on C_d (mean, σ) and whether it was used; `assumedBall` is the catalogue ball whose
   * range it comes from when the ball was given by mass and diameter alone (null otherwise).
   */
  cdPrior: { mean: number; sd: number; used: boolean; source: string; assumedBall: { id: string; name: string } | null } | null;
  warnings: FlightWarning[];
  /** Everything the planner needs to fly this launch again. */
  setup: { launch: Launch; aero: FlightAero; ball: BallProps | null; air: Air; windSpeed: number; gravity: number };
  /** Time of the release in the input clock (s; the first sample unless a release was given), and +1/−1 when the flight went towards −x and was mirrored. */
  track: { t0: number; direction: 1 | -1 };
  covariance: { params: string[]; matrix: number[][] } | null;
}

interface Prepared {
  tau: Float64Array;
  xs: Float64Array;
  ys: Float64Array;
  n: number;
  t0: number;
  direction: 1 | -1;
}

interface Config {
  model: FlightModel;
  freeG: boolean;
  prior: { mean: number; sd: number; noise: number } | null;
}

interface Run {
  config: Config;
  lm: LmResult;
  names: string[];
}

function paramNames(cfg: Config): string[] {
  const names = ['x0', 'y0', 'vx0', 'vy0'];
  if (cfg.model === 'linear') names.push('beta');
  if (cfg.model === 'drag' || cfg.model === 'drag-lift') names.push('cd');
  if (cfg.model === 'drag-lift') names.push('cl');
  if (cfg.freeG) names.push('g');
  return names;
}

function sensList(names: string[]): SensitivityParam[] {
  return names.slice(2) as SensitivityParam[];
}

function prepare(track: Track): Prepared {
  const { t, x, y } = checkTrack(track);
  const n = t.length;
  const t0 = t[0];
  const tau = new Float64Array(n);
  for (let i = 0; i < n; i++) tau[i] = t[i] - t0;
  const direction: 1 | -1 = x[n - 1] - x[0] < 0 ? -1 : 1;
  const xs = new Float64Array(n);
  for (let i = 0; i < n; i++) xs[i] = direction * x[i];
  return { tau, xs, ys: y, n, t0, direction };
}

function median(values: ArrayLike<number>): number {
  const s = Float64Array.from(values).sort();
  const m = s.length >> 1;
  return s.length % 2 ? s[m] : 0.5 * (s[m - 1] + s[m]);
}

/**
 * Robust noise per coordinate from point distances d: for isotropic Gaussian noise σ, d is
 * Rayleigh-distributed with median σ√(2 ln 2) ≈ 1.1774σ.
 */
function robustNoise(distances: ArrayLike<number>): number {
  return median(distances) / Math.sqrt(2 * Math.LN2);
}

interface InitialGuess { x0: number; y0: number; vx0: number; vy0: number; ax0: number; noise: number; gApparent: number }

/** Launch estimate from robust (iteratively reweighted, Cauchy weights) cubic fits of x(t) and y(t). */
function initialGuess(prep: Prepared): InitialGuess {
  const { tau, xs, ys, n } = prep;
  const degree = Math.min(3, n - 2);
  const w = new Float64Array(n).fill(1);
  const d = new Float64Array(n);
  let cx: Float64Array | null = null, cy: Float64Array | null = null;
  let noise = 0;
  for (let it = 0; it < 4; it++) {
    cx = polyFit(tau, xs, w, degree);
    cy = polyFit(tau, ys, w, degree);
    if (!cx || !cy) throw new PhysicsError('FIT_FAILED', 'The samples are degenerate (all at one time or place?): check the track.');
    for (let i = 0; i < n; i++) {
      let px = 0, py = 0;
      for (let k = degree; k >= 0; k--) { px = px * tau[i] + cx[k]; py = py * tau[i] + cy[k]; }
      d[i] = Math.hypot(xs[i] - px, ys[i] - py);
    }
    noise = Math.max(robustNoise(d), NOISE_FLOOR_M);
    const c = 2.5 * noise;
    for (let i = 0; i < n; i++) w[i] = 1 / (1 + (d[i] / c) ** 2);
  }
  const T = tau[n - 1];
  const vyAt = (s: number) => { let v = 0; for (let k = degree; k >= 1; k--) v = v * s + k * cy![k]; return v; };
  return {
    x0: cx![0], y0: cy![0], vx0: cx![1], vy0: cy![1], ax0: degree >= 2 ? 2 * cx![2] : 0, noise,
    gApparent: -(vyAt(T) - vyAt(0)) / T,
  };
}

const UNIT_HINTS: { factor: number; hint: string }[] = [
  { factor: 1000, hint: 'the positions look like millimetres: give them in metres' },
  { factor: 100, hint: 'the positions look like centimetres: give them in metres' },
  { factor: 39.37, hint: 'the positions look like inches: give them in metres' },
  { factor: 3.281, hint: 'the positions look like feet: give them in metres' },
  { factor: 1 / 4, hint: 'the times look stretched ×2: enter the capture frame rate of the slow-motion clip, not its playback rate' },
  { factor: 1 / 16, hint: 'the times look stretched ×4: enter the capture frame rate of the slow-motion clip, not its playback rate' },
  { factor: 1 / 64, hint: 'the times look stretched ×8: enter the capture frame rate of the slow-motion clip, not its playback rate' },
  { factor: 4, hint: 'the times look compressed ×2: check the frame rate' },
  { factor: 0.001, hint: 'the positions look like kilometres: give them in metres' },
];

function scaleHint(factor: number): string {
  for (const u of UNIT_HINTS) if (factor > u.factor / 1.15 && factor < u.factor * 1.15) return u.hint;
  return 'check the calibration (the two reference points and their distance, or the rectangle’s corners and size) and the frame rate';
}

function scaleError(factor: number, how: string, modelHint = ''): PhysicsError {
  if (factor > 0 && factor < 0.01) {
    return new PhysicsError('SCALE_SUSPECT', `The track hardly falls at all (${fmtNum(factor * 100, 2)} % of gravity, ${how}): check that y points up and the level line of the calibration, and that the points are one flight.`, { scaleFactor: factor });
  }
  return new PhysicsError('SCALE_SUSPECT',
    `The flight falls ${factor >= 1 ? `${fmtNum(factor)} times faster` : `${fmtNum(1 / factor)} times slower`} than gravity allows (${how}): ${scaleHint(factor)}${modelHint}.`,
    { scaleFactor: factor });
}

function fmtNum(v: number, digits = 3): string {
  return Number(v.toPrecision(digits)).toString();
}

function makeProblem(prep: Prepared, cfg: Config, base: MotionCoefficients, kappa: number, rtol: number): LmProblem {
  const names = paramNames(cfg);
  const np = names.length;
  const { tau, xs, ys, n } = prep;
  const nRes = 2 * n + (cfg.prior ? 1 : 0);
  const sens = sensList(names);
  const dim = 4 + 4 * sens.length;
  const out = new Float64Array(n * dim);
  const iDrag = names.indexOf(cfg.model === 'linear' ? 'beta' : 'cd');
  const iCl = names.indexOf('cl');
  const iG = names.indexOf('g');
  const tEnd = tau[n - 1];
  return {
    nParams: np,
    nResiduals: nRes,
    robustResiduals: 2 * n,
    groupSize: 2,
    evaluate(p, r, J) {
      const g = iG >= 0 ? p[iG] : base.g;
      if (cfg.model === 'vacuum') {
        for (let k = 0; k < n; k++) {
          const t = tau[k];
          r[2 * k] = p[0] + p[2] * t - xs[k];
          r[2 * k + 1] = p[1] + p[3] * t - 0.5 * g * t * t - ys[k];
          if (J) {
            const rx = 2 * k * np, ry = rx + np;
            for (let a = 0; a < np; a++) { J[rx + a] = 0; J[ry + a] = 0; }
            J[rx] = 1; J[rx + 2] = t;
            J[ry + 1] = 1; J[ry + 3] = t;
            if (iG >= 0) J[ry + iG] = -0.5 * t * t;
          }
        }
        return true;
      }
      const drag = iDrag >= 0 ? p[iDrag] : 0;
      const cl = iCl >= 0 ? p[iCl] : 0;
      // Refuse absurd trial points before integrating: they can only fail, slowly.
      if (!(Math.abs(drag) < 20 && Math.abs(cl) < 20 && Math.hypot(p[2], p[3]) < 1000 && g > 0)) return false;
      const c: MotionCoefficients = {
        model: cfg.model,
        k: cfg.model === 'linear' ? 0 : kappa * drag,
        kl: kappa * cl,
        beta: cfg.model === 'linear' ? drag : 0,
        g,
        wind: base.wind,
      };
      try {
        integrate(flightRhs(c, kappa, sens), 0, initialState(p[0], p[1], p[2], p[3], sens), {
          tEnd, rtol, atol: rtol, errorDim: 4, outputTimes: tau, output: out, maxSteps: 5000,
        });
      } catch (e) {
        if (isPhysicsError(e)) return false;
        throw e;
      }
      for (let k = 0; k < n; k++) {
        const o = k * dim;
        r[2 * k] = out[o] - xs[k];
        r[2 * k + 1] = out[o + 1] - ys[k];
        if (J) {
          const rx = 2 * k * np, ry = rx + np;
          J[rx] = 1; J[rx + 1] = 0;
          J[ry] = 0; J[ry + 1] = 1;
          for (let j = 0; j < sens.length; j++) {
            J[rx + 2 + j] = out[o + 4 + 4 * j];
            J[ry + 2 + j] = out[o + 5 + 4 * j];
          }
        }
      }
      if (cfg.prior) {
        const { mean, sd, noise } = cfg.prior;
        r[2 * n] = (noise * (p[iDrag] - mean)) / sd;
        if (J) {
          const row = 2 * n * np;
          for (let a = 0; a < np; a++) J[row + a] = 0;
          J[row + iDrag] = noise / sd;
        }
      }
      return true;
    },
  };
}

/** Point distances from the model and the robust noise of a run. */
function runNoise(run: Run, n: number): { d: Float64Array; noise: number } {
  const d = new Float64Array(n);
  for (let k = 0; k < n; k++) d[k] = Math.hypot(run.lm.r[2 * k], run.lm.r[2 * k + 1]);
  return { d, noise: Math.max(robustNoise(d), NOISE_FLOOR_M) };
}

/**
 * Covariance of the fitted parameters. With independent noise it is s²(JᵀWJ)⁻¹, s² = Σ wᵢrᵢ² / (Σ wᵢ − p)
 * (the weighted-least-squares estimate at the IRLS fixed point; Holland & Welsch 1977). A follower's
 * errors are correlated from frame to frame, which makes that too small: the errors of each coordinate
 * are taken as an AR(1) series with correlation φ from point to point ({@link residualCorrelation}), and
 * the covariance is the sandwich s²·A(JᵀΣ_φJ + P)A, A = (JᵀWJ + P)⁻¹, P the prior's precision in the
 * units of the data (generalised least squares theory, Seber & Wild, *Nonlinear Regression* (1989)
 * §2.1 and §6.2). With φ = 0 it is the plain covariance. Null when JᵀWJ is singular (a parameter the
 * track cannot determine). The model choice and the prior decide on the plain covariance (`correlated`
 * false: cheaper, and they compare fits of the same track); the reported errors use the correlated one.
 */
function covarianceOf(run: Run, n: number, correlated = false): { cov: Float64Array | null; s2: number; phi: number } {
  const np = run.names.length;
  let num = 0, wsum = 0;
  for (let k = 0; k < n; k++) {
    const w = run.lm.weights[k];
    num += w * (run.lm.r[2 * k] ** 2 + run.lm.r[2 * k + 1] ** 2);
    wsum += 2 * w;
  }
  const dof = wsum - np;
  let s2 = Math.max(dof > 0 ? num / dof : num, NOISE_FLOOR_M ** 2);
  const iCd = run.names.indexOf('cd');
  // The prior row entered the fit scaled by the noise estimate of the day; in the covariance it must
  // carry exactly its own precision 1/sd², whatever s² comes out: replace (noise/sd)² by s²/sd².
  const priorShift = (target: number) => (run.config.prior ? (target - run.config.prior.noise ** 2) / run.config.prior.sd ** 2 : 0);
  const h = Float64Array.from(run.lm.jtwj);
  if (run.config.prior) h[iCd * np + iCd] += priorShift(s2);
  let inv = spdInverse(h, np);
  if (!inv) return { cov: null, s2, phi: 0 };
  let phi = 0;
  // Note: the scale check's one-step run carries the chosen run's Jacobian, without the gravity column.
  const J = run.lm.J;
  if (correlated && J.length >= 2 * n * np && n >= 8) {
    const c = residualCorrelation(run, n, inv, np);
    phi = c.phi;
    if (phi > 0) {
      // Few effective points leave σ itself uncertain: scale it so that 1.96 stated errors still hold 95 %.
      const nu = Math.max(3, 2 * n * ((1 - phi) / (1 + phi)) - np);
      s2 = Math.max(c.s2, NOISE_FLOOR_M ** 2) * (studentT975(nu) / Z975) ** 2;
      const hc = Float64Array.from(run.lm.jtwj);
      if (run.config.prior) hc[iCd * np + iCd] += priorShift(s2);
      const a = spdInverse(hc, np);
      if (!a) return { cov: null, s2, phi };
      // Meat: JᵀΣ_φJ over the data rows, plus the prior's precision as it stands in hc.
      const meat = Float64Array.from(correlatedGram(J, run.lm.weights, n, np, phi));
      if (run.config.prior) meat[iCd * np + iCd] += hc[iCd * np + iCd] - dataGramEntry(J, run.lm.weights, n, np, iCd);
      inv = sandwich(a, meat, np);
    }
  }
  for (let i = 0; i < inv.length; i++) inv[i] *= s2;
  for (let i = 0; i < np; i++) if (!(inv[i * np + i] >= 0) || !Number.isFinite(inv[i * np + i])) return { cov: null, s2, phi };
  return { cov: inv, s2, phi };
}

/** The normal distribution's 97.5 % point. */
const Z975 = 1.959963984540054;

/**
 * Student's t 97.5 % point for ν degrees of freedom (ν ≥ 3) by the Cornish–Fisher expansion to ν⁻³
 * (Abramowitz & Stegun, *Handbook of Mathematical Functions* (1964) 26.7.5; within 2e-3 of the tables at ν = 3).
 */
function studentT975(nu: number): number {
  const z = Z975, z2 = z * z;
  const g1 = (z2 + 1) * z / 4;
  const g2 = ((5 * z2 + 16) * z2 + 3) * z / 96;
  const g3 = (((3 * z2 + 19) * z2 + 17) * z2 - 15) * z / 384;
  return z + g1 / nu + g2 / (nu * nu) + g3 / (nu * nu * nu);
}

/** Σ_φ·X for the rows of one coordinate (every other row from `c`) of X (2n × np): AR(1) Toeplitz φ^|k−m| by two sweeps. */
function ar1Times(x: Float64Array, n: number, np: number, phi: number, out: Float64Array): void {
  const f = new Float64Array(np), b = new Float64Array(np);
  for (let c = 0; c < 2; c++) {
    f.fill(0); b.fill(0);
    for (let k = 0; k < n; k++) {
      const row = (2 * k + c) * np;
      for (let a = 0; a < np; a++) { f[a] = x[row + a] + phi * f[a]; out[row + a] = f[a]; }
    }
    for (let k = n - 1; k >= 0; k--) {
      const row = (2 * k + c) * np;
      // out = forward + backward − diagonal (counted twice).
      for (let a = 0; a < np; a++) { b[a] = x[row + a] + phi * b[a]; out[row + a] += b[a] - x[row + a]; }
    }
  }
}

/** Rows of the data Jacobian scaled by √wᵢ (2n × np). */
function weightedRows(J: Float64Array, w: Float64Array, n: number, np: number): Float64Array {
  const jw = new Float64Array(2 * n * np);
  for (let k = 0; k < n; k++) {
    const s = Math.sqrt(w[k]);
    for (let c = 0; c < 2; c++) for (let a = 0; a < np; a++) jw[(2 * k + c) * np + a] = s * J[(2 * k + c) * np + a];
  }
  return jw;
}

/** XᵀY for 2n × np matrices. */
function gram(x: Float64Array, y: Float64Array, rows: number, np: number): Float64Array {
  const out = new Float64Array(np * np);
  for (let i = 0; i < rows; i++) for (let a = 0; a < np; a++) {
    const xa = x[i * np + a];
    if (xa === 0) continue;
    for (let b = 0; b < np; b++) out[a * np + b] += xa * y[i * np + b];
  }
  return out;
}

/** JᵀW^½Σ_φW^½J over the data rows. */
function correlatedGram(J: Float64Array, w: Float64Array, n: number, np: number, phi: number): Float64Array {
  const jw = weightedRows(J, w, n, np);
  const g = new Float64Array(jw.length);
  ar1Times(jw, n, np, phi, g);
  return gram(jw, g, 2 * n, np);
}

/** (JᵀWJ)_{ii} over the data rows only. */
function dataGramEntry(J: Float64Array, w: Float64Array, n: number, np: number, i: number): number {
  let v = 0;
  for (let k = 0; k < n; k++) v += w[k] * (J[2 * k * np + i] ** 2 + J[(2 * k + 1) * np + i] ** 2);
  return v;
}

/** A·M·A for symmetric p × p matrices. */
function sandwich(a: Float64Array, m: Float64Array, np: number): Float64Array {
  const am = new Float64Array(np * np), out = new Float64Array(np * np);
  for (let i = 0; i < np; i++) for (let k = 0; k < np; k++) { const v = a[i * np + k]; for (let j = 0; j < np; j++) am[i * np + j] += v * m[k * np + j]; }
  for (let i = 0; i < np; i++) for (let k = 0; k < np; k++) { const v = am[i * np + k]; for (let j = 0; j < np; j++) out[i * np + j] += v * a[k * np + j]; }
  return out;
}

/**
 * The point-to-point correlation φ of the track's errors, from the residuals' lag-1 autocorrelation
 * corrected for what the fit absorbs: residuals are ê = Mε with M = I − H, H = JAJᵀ, so under AR(1)
 * errors E[Σ êᵢêᵢ₊₁] / E[Σ êᵢ²] = S(MΣ_φM) / tr(MΣ_φM) (S the lag-1 sum within each coordinate);
 * φ solves this equal to the observed ratio (regula falsi on 0…0.98; the ratio grows with φ). The
 * variance follows from E[Σ êᵢ²] = σ²(tr Σ_φ − tr(A·JᵀΣ_φJ)).
 * @param run the fit; @param n points; @param a (JᵀWJ + P)⁻¹ unscaled; @param np parameters.
 * @returns φ (0 when the residuals show no correlation beyond what the fit itself makes) and σ² (m²).
 */
function residualCorrelation(run: Run, n: number, a: Float64Array, np: number): { phi: number; s2: number } {
  const { r, weights: w } = run.lm;
  const jw = weightedRows(run.lm.J, w, n, np);
  let ee = 0, lag = 0;
  for (let k = 0; k < n; k++) for (let c = 0; c < 2; c++) {
    const e = Math.sqrt(w[k]) * r[2 * k + c];
    ee += e * e;
    if (k + 1 < n) lag += e * Math.sqrt(w[k + 1]) * r[2 * (k + 1) + c];
  }
  if (!(ee > 0)) return { phi: 0, s2: 0 };
  const observed = lag / ee;
  const g = new Float64Array(jw.length);
  // What does not depend on φ: JA (rows Jᵢ·A) and K = Σ (JA)ᵢᵀ(JA)ᵢ₊₁ over lag-1 pairs, so that
  // Σ Jᵢ·B·Jᵢ₊₁ with B = A·C·A is Σ C∘K, and each φ costs one Toeplitz product and one Gram matrix.
  const ja = new Float64Array(jw.length);
  for (let i = 0; i < 2 * n; i++) for (let x = 0; x < np; x++) {
    let v = 0;
    for (let y = 0; y < np; y++) v += jw[i * np + y] * a[y * np + x];
    ja[i * np + x] = v;
  }
  const kk = new Float64Array(np * np);
  let trSigma = 0, pairWeight = 0;
  for (let k = 0; k < n; k++) for (let cc = 0; cc < 2; cc++) {
    trSigma += w[k];
    if (k + 1 >= n) continue;
    pairWeight += Math.sqrt(w[k] * w[k + 1]);
    const i0 = (2 * k + cc) * np, i1 = (2 * (k + 1) + cc) * np;
    for (let x = 0; x < np; x++) for (let y = 0; y < np; y++) kk[x * np + y] += ja[i0 + x] * ja[i1 + y];
  }
  // Expected lag-1 ratio and the trace term for a given φ.
  const expected = (phi: number): { ratio: number; trace: number } => {
    ar1Times(jw, n, np, phi, g);
    const c = gram(jw, g, 2 * n, np);
    let trAC = 0, sHH = 0;
    for (let x = 0; x < np; x++) for (let y = 0; y < np; y++) { trAC += a[x * np + y] * c[y * np + x]; sHH += c[x * np + y] * kk[x * np + y]; }
    let sH = 0;
    for (let k = 0; k + 1 < n; k++) for (let cc = 0; cc < 2; cc++) {
      const i0 = (2 * k + cc) * np, i1 = (2 * (k + 1) + cc) * np;
      // Jᵢ·A·Gᵢ₊₁ + Gᵢ·A·Jᵢ₊₁ (A symmetric).
      for (let x = 0; x < np; x++) sH += ja[i0 + x] * g[i1 + x] + g[i0 + x] * ja[i1 + x];
    }
    return { ratio: (pairWeight * phi - sH + sHH) / (trSigma - trAC), trace: trSigma - trAC };
  };
  const at0 = expected(0);
  if (observed <= at0.ratio) return { phi: 0, s2: ee / Math.max(at0.trace, 1) };
  const PHI_MAX = 0.98;
  const atMax = expected(PHI_MAX);
  if (atMax.ratio <= observed) return { phi: PHI_MAX, s2: ee / Math.max(atMax.trace, 1) };
  // The root of ratio(φ) − observed by the Illinois variant of regula falsi (Dowell & Jarratt, BIT 11
  // (1971) 168): the ratio is smooth and nearly linear in φ, so a few evaluations bring φ within 1e-4,
  // far below what the track can tell, where bisection took 12.
  let lo = 0, fLo = at0.ratio - observed, hi = PHI_MAX, fHi = atMax.ratio - observed;
  let phi = lo, at = at0, side = 0;
  for (let it = 0; it < 30; it++) {
    const c = hi - (fHi * (hi - lo)) / (fHi - fLo);
    const ec = expected(c), fc = ec.ratio - observed;
    const moved = Math.abs(c - phi);
    phi = c; at = ec;
    if (fc === 0 || moved < 1e-5 || hi - lo < 1e-4) break;
    if (fc < 0) { lo = c; fLo = fc; if (side === -1) fHi *= 0.5; side = -1; } else { hi = c; fHi = fc; if (side === 1) fLo *= 0.5; side = 1; }
  }
  return { phi, s2: ee / Math.max(at.trace, 1) };
}

function stdErr(cov: Float64Array | null, np: number, i: number): number | null {
  if (!cov || i < 0) return null;
  return Math.sqrt(cov[i * np + i]);
}

/** σ of a derived quantity with gradient `grad` over the parameters: √(gᵀ C g) (delta method). */
function propagate(cov: Float64Array | null, grad: ArrayLike<number>): number | null {
  if (!cov) return null;
  const np = grad.length;
  let v = 0;
  for (let a = 0; a < np; a++) for (let b = 0; b < np; b++) v += grad[a] * cov[a * np + b] * grad[b];
  return v >= 0 && Number.isFinite(v) ? Math.sqrt(v) : null;
}

/** Bayesian information criterion of a run: m ln(RSS/m) + p ln m, RSS floored at the noise floor. */
function bic(run: Run, n: number): number {
  const m = 2 * n;
  const rss = Math.max(2 * run.lm.cost, m * NOISE_FLOOR_M ** 2);
  return m * Math.log(rss / m) + run.names.length * Math.log(m);
}

/** Options of one fit with the defaults merged in. */
type ResolvedFitOptions = typeof FIT_DEFAULTS & FitOptions;

/**
 * What the stages of one fit share: the checked track, the ball and the air, the starting point,
 * the warnings so far, and the running state of the least-squares runs.
 */
interface FitStage {
  o: ResolvedFitOptions;
  prep: Prepared;
  /** Number of traced points. */
  n: number;
  ball: BallProps | null;
  air: Air;
  /** κ = ρA/(2m) (1/m) of the ball in this air; 0 without a ball. */
  kappa: number;
  /** Gravity (m/s²) and wind (m/s) of the fit; the aerodynamic coefficients are parameters. */
  base: MotionCoefficients;
  init: InitialGuess;
  /** Whether the loss is robust (anything but `linear`). */
  robust: boolean;
  /**
   * The ball's C_d range, else that of the catalogue ball its mass and diameter match, else the
   * generic one, and its midpoint: the start and the prior's mean.
   */
  cdRange: { min: number; max: number };
  /** The catalogue ball recognised from a mass and diameter given without a C_d range. */
  assumedBall: BallSpec | null;
  cd0: number;
  /** x₀ (m), y₀ (m), vₓ₀ (m/s), v_y₀ (m/s) of the smoothing polynomials. */
  launch0: number[];
  warnings: FlightWarning[];
  /** Soft-L1 scale (m); each robust run leaves its settled scale here for the next run. */
  lossScale: number;
  /** Iterations and residual evaluations over all runs so far. */
  iterations: number;
  evaluations: number;
  /** Loss scale (m) re-estimated from residuals (m) during a robust run. */
  adaptScale: (r: Float64Array) => number;
}

/** The flight parameters of the chosen run with their standard errors, and what derives from them. */
interface FittedFlight {
  model: FlightModel;
  names: string[];
  /** Covariance of the parameters (row-major, `names` order); null when the track cannot determine one. */
  cov: Float64Array | null;
  /** Release point (m, mirrored frame) and velocity (m/s). */
  x0: number; y0: number; vx0: number; vy0: number;
  speed: number; speedError: number | null; angleDegError: number | null; heightError: number | null;
  cd: number | null; cdError: number | null;
  cl: number | null; clError: number | null;
  dragRate: number | null; dragRateError: number | null;
  flight: FlightSummary;
  errors: FitResult['errors'];
  standardCarry: number;
  vacuum: FitResult['vacuum'];
  terminalSpeed: number | null;
  dragToWeight: number | null;
  reynolds: number | null;
  regime: DragRegime | null;
  nearDragCrisis: boolean | null;
  rms: number;
  noise: number;
  outliers: number[];
  trackEnd: number;
  extrapolated: boolean;
  extrapolatedCarry: number;
  reynoldsRange: { min: number; max: number } | null;
  release: ReleasePoint;
}

/** A model with standard gravity and no prior on C_d. */
function plainConfig(model: FlightModel): Config {
  return { model, freeG: false, prior: null };
}

/**
 * Loss scale from residuals: {@link LOSS_SCALE_SIGMAS} robust noise units, floored at {@link NOISE_FLOOR_M}.
 * @param r residuals (m), x and y of each point in turn; @param n number of points.
 * @returns the soft-L1 scale (m).
 */
function adaptedLossScale(r: Float64Array, n: number): number {
  const d = new Float64Array(n);
  for (let k = 0; k < n; k++) d[k] = Math.hypot(r[2 * k], r[2 * k + 1]);
  return LOSS_SCALE_SIGMAS * Math.max(robustNoise(d), NOISE_FLOOR_M);
}

/**
 * Staging: checks the options and the track, resolves the ball and the air, mirrors a flight that
 * goes towards −x, and takes the starting point from robust cubic fits of x(t) and y(t). Two cheap
 * checks refuse a track before any model runs: the secant estimate of gravity from the smoothed
 * track (drag can move it by a factor of a few for light balls on short tracks, and a ping-pong
 * ball with heavy topspin can look 8 g heavy, hence the band ×1/12…×12), and a ball that never rises.
 * @param track samples t (s), x (m), y (m); see {@link fitFlight}.
 * @param options see {@link FitOptions}: wind −60…60 m/s, gravity 0…30 m/s², rtol 1e-14…1e-4.
 * @returns the state the later stages share, with an `AIR_ASSUMED` warning when no air was given.
 * @throws PhysicsError `BAD_OPTION`, `MISSING_BALL`, `BAD_AIR`, the track's codes ({@link checkTrack}),
 *   `SCALE_SUSPECT`, `NEVER_RISES`, `FIT_FAILED` for degenerate samples.
 */
function stageFit(track: Track, options: FitOptions): FitStage {
  const o = withDefaults(FIT_DEFAULTS, options) as ResolvedFitOptions;
  if (!['auto', 'vacuum', 'linear', 'drag', 'drag-lift'].includes(o.model)) {
    throw new PhysicsError('BAD_OPTION', `Unknown model "${o.model}": use auto, vacuum, linear, drag or drag-lift.`);
  }
  if (!['linear', 'soft-l1', 'cauchy', 'huber'].includes(o.loss)) {
    throw new PhysicsError('BAD_OPTION', `Unknown loss "${o.loss}": use linear, soft-l1, cauchy or huber.`);
  }
  if (!(o.rtol >= 1e-14 && o.rtol <= 1e-4)) throw new PhysicsError('BAD_OPTION', `Integration tolerance ${o.rtol} is outside 1e-14…1e-4.`);
  const warnings: FlightWarning[] = [];
  const prep = prepare(track);
  const needsBall = o.model === 'auto' || o.model === 'drag' || o.model === 'drag-lift';
  if (needsBall && o.ball === undefined) {
    throw new PhysicsError('MISSING_BALL', 'Fitting drag needs the ball: choose a catalogue ball or give its mass (kg) and diameter (m).');
  }
  const ball = o.ball === undefined ? null : resolveBall(o.ball);
  let air = o.air;
  if (!air) {
    air = standardAir();
    if (o.model !== 'vacuum') {
      warnings.push({ code: 'AIR_ASSUMED', message: 'No air conditions given: standard sea-level air (1.225 kg/m³) was assumed. Enter the session\'s temperature, pressure or altitude for a fairer drag coefficient.' });
    }
  }
  if (!(air.densityKgM3 > 0) || !(air.viscosityPaS > 0)) throw new PhysicsError('BAD_AIR', 'The air needs a positive density and viscosity.');
  const kappa = ball ? dragFactor(ball, air) : 0;
  // Wind and gravity are refused with the same messages as the simulator's.
  if (!Number.isFinite(o.windSpeed) || Math.abs(o.windSpeed) > 60) throw new PhysicsError('BAD_OPTION', `Wind ${o.windSpeed} m/s is not a wind speed between −60 and 60 m/s.`);
  if (!Number.isFinite(o.gravity) || o.gravity <= 0 || o.gravity > 30) throw new PhysicsError('BAD_OPTION', `Gravity ${o.gravity} m/s² is not between 0 and 30 m/s².`);
  const base: MotionCoefficients = { model: 'drag', k: 0, kl: 0, beta: 0, g: o.gravity, wind: o.windSpeed };

  const init = initialGuess(prep);
  const n = prep.n;
  const gRatio = init.gApparent / o.gravity;
  if (gRatio > COARSE_SCALE_BAND || (gRatio > 0 && gRatio < 1 / COARSE_SCALE_BAND)) throw scaleError(gRatio, 'estimated from the smoothed track');
  const maxRise = Math.max(...Array.from(prep.ys).map((v) => v - prep.ys[0]));
  if (!o.allowDescending && init.vy0 <= 0 && maxRise <= 3 * init.noise) {
    throw new PhysicsError('NEVER_RISES', 'The ball never rises: no traced point is above the first one. Start the trace at the release frame; for a ball struck downward (serve, spike) allow descending flights.');
  }
  const assumedBall = ball && !ball.cdRange ? recogniseBall(ball.massKg, ball.diameterM) : null;
  const cdRange = ball?.cdRange ?? (assumedBall ? { min: assumedBall.cd.min, max: assumedBall.cd.max } : GENERIC_CD_RANGE);
  return {
    o, prep, n, ball, air, kappa, base, init,
    robust: o.loss !== 'linear',
    cdRange, assumedBall,
    cd0: 0.5 * (cdRange.min + cdRange.max),
    launch0: [init.x0, init.y0, init.vx0, init.vy0],
    warnings,
    lossScale: LOSS_SCALE_SIGMAS * init.noise,
    iterations: 0,
    evaluations: 0,
    adaptScale: (r) => adaptedLossScale(r, n),
  };
}

/**
 * One Levenberg–Marquardt run of a model configuration ({@link levenbergMarquardt}), counted in the stage.
 * @param s the fit's shared state; a robust run leaves its settled loss scale (m) there.
 * @param cfg model, free gravity, prior on C_d.
 * @param start parameters in {@link paramNames} order: x₀, y₀ (m), vₓ₀, v_y₀ (m/s), then β (1/s) or C_d, C_L, g (m/s²).
 * @param lmOptions overrides of the solver's options (loss, tolerances, scale adaptation).
 * @param rtol integration tolerance inside the model (relative; m and m/s); default the fit's.
 * @returns the run: configuration, solver result and parameter names.
 * @throws PhysicsError `FIT_FAILED` when the model cannot be integrated at the start.
 */
function runFit(s: FitStage, cfg: Config, start: number[], lmOptions: LmOptions = {}, rtol: number = s.o.rtol): Run {
  const problem = makeProblem(s.prep, cfg, s.base, s.kappa, rtol);
  let lm: LmResult;
  try {
    lm = levenbergMarquardt(problem, start, { loss: s.o.loss, lossScale: s.lossScale, maxIterations: s.o.maxIterations, ...lmOptions });
  } catch (e) {
    if (isPhysicsError(e)) throw e;
    throw new PhysicsError('FIT_FAILED', `The ${cfg.model} model could not be started from this track (the integration failed at the first guess). Check that the samples are one flight, in metres and seconds.`);
  }
  s.iterations += lm.iterations;
  s.evaluations += lm.evaluations;
  if (s.robust && (lmOptions.loss ?? s.o.loss) !== 'linear') s.lossScale = lm.lossScale;
  return { config: cfg, lm, names: paramNames(cfg) };
}

/**
 * A model fitted in two runs: plain least squares from the start, loosely converged (ftol 1e-4,
 * integration at rtol ≥ 1e-6, which saves half of its steps; only its end point is kept), then the fit's own loss from
 * there with its scale adapted on the way.
 * Note: a robust loss far from the solution has almost no curvature along the residuals and sends
 * the first steps wild (measured: v 22 → 84 m/s, C_d → −0.48); and a launch-only first run is
 * biased when the ball carries lift (measured: 27 evaluations per drag-lift fit instead of 13).
 * @param s the fit's shared state; @param cfg the model; @param start as in {@link runFit}.
 * @returns the second run.
 */
function stagedFit(s: FitStage, cfg: Config, start: number[]): Run {
  const stage = runFit(s, cfg, start, { loss: 'linear', ftol: 1e-4 }, Math.max(s.o.rtol, 1e-6));
  return runFit(s, cfg, Array.from(stage.lm.p), s.robust ? { adaptScale: s.adaptScale } : {});
}

/**
 * Start of the drag fit from the drag-lift fit: the minimum of the drag-lift fit's quadratic model
 * of the cost with C_L held at 0, p = p̂ + H_pp⁻¹H_pc·Ĉ_L (H its JᵀWJ, p the other parameters):
 * the drag fit then starts next to its own minimum instead of where the lift term had moved it.
 * @param dl the drag-lift run (parameters x₀, y₀, vₓ₀, v_y₀, C_d, C_L).
 * @returns x₀, y₀ (m), vₓ₀, v_y₀ (m/s), C_d; the drag-lift values themselves when H_pp is singular.
 */
function dragStartFrom(dl: Run): number[] {
  const p = Array.from(dl.lm.p).slice(0, 5);
  const np = dl.names.length, m = 5, iCl = dl.names.indexOf('cl');
  const h = dl.lm.jtwj;
  const hpp = new Float64Array(m * m), rhs = new Float64Array(m);
  for (let a = 0; a < m; a++) {
    for (let b = 0; b < m; b++) hpp[a * m + b] = h[a * np + b];
    rhs[a] = h[a * np + iCl] * dl.lm.p[iCl];
  }
  if (!cholesky(hpp, m)) return p;
  choleskySolve(hpp, m, rhs);
  return p.map((v, a) => v + rhs[a]);
}

/**
 * Model choice: fits the requested model, or for `auto` drag-lift and drag and keeps drag-lift only
 * on positive evidence, ΔBIC > 2 (Schwarz, Ann. Stat. 6 (1978) 461; Kass & Raftery, JASA 90 (1995) 773).
 * The Wald statistic z = C_L/σ(C_L) approximates the deviance gain of the lift term for nested
 * models, so ΔBIC ≈ z² − ln m (m = 2n residuals); beyond z² − ln m > 27 the drag fit cannot win and is skipped.
 * @param s the fit's shared state (start, ball's C_d range, wind (m/s) for the linear model's start).
 * @returns the chosen run, and the BIC of both models for `auto` (null otherwise).
 */
function chooseModel(s: FitStage): { chosen: Run; selection: FitResult['modelSelection'] } {
  const { o, init, n, launch0, cd0, robust } = s;
  if (o.model === 'vacuum') return { chosen: stagedFit(s, plainConfig('vacuum'), launch0), selection: null };
  if (o.model === 'linear') {
    const u0 = init.vx0 - o.windSpeed;
    const beta0 = u0 > 0 && init.ax0 < 0 ? Math.min(-init.ax0 / u0, 10) : 0.1;
    return { chosen: stagedFit(s, plainConfig('linear'), [...launch0, beta0]), selection: null };
  }
  if (o.model === 'drag') return { chosen: stagedFit(s, plainConfig('drag'), [...launch0, cd0]), selection: null };
  const dl = stagedFit(s, plainConfig('drag-lift'), [...launch0, cd0, 0]);
  if (o.model !== 'auto') return { chosen: dl, selection: null };
  const bDl = bic(dl, n);
  const { cov } = covarianceOf(dl, n);
  const iCl = dl.names.indexOf('cl');
  const sdCl = stdErr(cov, dl.names.length, iCl);
  const z = sdCl ? dl.lm.p[iCl] / sdCl : 0;
  if (dl.lm.converged && z * z > Math.log(2 * n) + 2 + 25) {
    return { chosen: dl, selection: { criterion: 'BIC', drag: null, dragLift: bDl, chosen: 'drag-lift' } };
  }
  let drag: Run;
  try {
    drag = runFit(s, plainConfig('drag'), dragStartFrom(dl), { adaptScale: robust ? s.adaptScale : undefined });
  } catch (e) {
    // The drag-lift fit wandered somewhere the drag model cannot start from: start afresh.
    if (!isPhysicsError(e)) throw e;
    drag = stagedFit(s, plainConfig('drag'), [...launch0, cd0]);
  }
  const bDrag = bic(drag, n);
  const chosen = dl.lm.converged && bDl < bDrag - 2 ? dl : drag;
  return { chosen, selection: { criterion: 'BIC', drag: bDrag, dragLift: bDl, chosen: chosen.config.model } };
}

/**
 * Model choice, second part: a Gaussian prior on C_d, mean the middle of the ball's range and
 * σ a quarter of its width, refitted in when the track alone determines C_d less well than that
 * (or always, or never, by `cdPrior`); adds `CD_PRIOR_USED` when it was used.
 * @param s the fit's shared state; @param chosen the run of {@link chooseModel}.
 * @returns the run to keep, and the prior (null for models without C_d).
 */
function applyCdPrior(s: FitStage, chosen: Run): { chosen: Run; cdPrior: FitResult['cdPrior'] } {
  if (chosen.config.model !== 'drag' && chosen.config.model !== 'drag-lift') return { chosen, cdPrior: null };
  const { cdRange, ball, n, assumedBall } = s;
  const mean = s.cd0, sd = (cdRange.max - cdRange.min) / 4;
  let source: string;
  if (ball?.cdRange) source = `the typical range ${cdRange.min}–${cdRange.max} for ${ball.name ?? 'this ball'}`;
  else if (ball && assumedBall) {
    source = `the typical range ${cdRange.min}–${cdRange.max} for ${assumedBall.name} (the ball was assumed to be one: its ${fmtNum(ball.massKg, 4)} kg and ${fmtNum(ball.diameterM, 4)} m lie within that ball's rulebook ranges; pick the ball, or give its C_d range, if it is another)`;
  } else source = `a generic ball range ${cdRange.min}–${cdRange.max} (the ball has no C_d range)`;
  const cdPrior = { mean, sd, used: false, source, assumedBall: assumedBall ? { id: assumedBall.id, name: assumedBall.name } : null };
  if (s.o.cdPrior === 'off') return { chosen, cdPrior };
  const { cov } = covarianceOf(chosen, n);
  const iCd = chosen.names.indexOf('cd');
  const sdData = stdErr(cov, chosen.names.length, iCd);
  if (s.o.cdPrior !== 'always' && sdData !== null && sdData <= sd) return { chosen, cdPrior };
  const { noise } = runNoise(chosen, n);
  const withPrior = runFit(s, { ...chosen.config, prior: { mean, sd, noise } }, Array.from(chosen.lm.p));
  cdPrior.used = true;
  s.warnings.push({
    code: 'CD_PRIOR_USED',
    message: `The track ${sdData === null ? 'cannot determine' : `determines C_d only to ±${fmtNum(sdData, 2)}`}: ${source} was used as a prior. Trace more of the flight (ideally to the landing) to measure it.`,
  });
  return { chosen: withPrior, cdPrior };
}

/** The coefficients of the equations of motion of a run's fitted values (its gravity and wind are the fit's). */
function coefficientsOf(s: FitStage, chosen: Run): MotionCoefficients {
  const p = chosen.lm.p;
  const at = (name: string) => { const i = chosen.names.indexOf(name); return i >= 0 ? p[i] : 0; };
  const model = chosen.config.model;
  return { model, k: s.kappa * at('cd'), kl: s.kappa * at('cl'), beta: at('beta'), g: s.o.gravity, wind: s.o.windSpeed };
}

/**
 * The release the launch figures refer to: the first sample, or the fitted flight traced back from
 * it to the given release time or height ({@link traceBackToRelease}), with the covariance carried along.
 * @param s the fit's shared state; @param chosen the kept run; @param cov its covariance (`names` order).
 * @returns the release state (m, m/s), its covariance and how far back it lies (s).
 * @throws PhysicsError `FIT_FAILED` when the release height cannot be reached, `BAD_OPTION` for a release
 *   more than {@link RELEASE_MAX_BACK_S} s before the first sample.
 */
function findRelease(s: FitStage, chosen: Run, cov: Float64Array | null): ReleasePoint {
  const p = chosen.lm.p;
  const spec = s.o.release;
  if (!spec) return { x: p[0], y: p[1], vx: p[2], vy: p[3], cov, backTime: 0, backTimeError: cov ? 0 : null };
  let target: { backTime: number } | { height: number };
  if ('time' in spec) {
    const backTime = Math.max(0, s.prep.t0 - spec.time);
    if (backTime > RELEASE_MAX_BACK_S) {
      throw new PhysicsError('BAD_OPTION', `The release is marked ${fmtNum(backTime)} s before the first traced point, more than the ${RELEASE_MAX_BACK_S} s the fit will trace back: trace the ball from nearer the release, or check the release frame.`);
    }
    target = { backTime };
  } else target = { height: spec.height };
  const release = traceBackToRelease(coefficientsOf(s, chosen), s.kappa, chosen.names, p, cov, target, s.init.noise, s.o.rtol);
  const warnAfter = s.o.frameRate ? RELEASE_WARN_FRAMES / s.o.frameRate : RELEASE_WARN_S;
  if (release.backTime > warnAfter + 1e-9) {
    const frames = s.o.frameRate ? ` (${fmtNum(release.backTime * s.o.frameRate, 2)} frames)` : '';
    s.warnings.push({
      code: 'RELEASE_EXTRAPOLATED',
      message: `The release lies ${fmtNum(release.backTime * 1000, 3)} ms${frames} before the first traced point, more than ${s.o.frameRate ? `${RELEASE_WARN_FRAMES} frames` : `${RELEASE_WARN_S * 1000} ms`}: the launch figures are traced back with the fitted model over that gap. Trace the ball from nearer the release to measure them directly.`,
    });
  }
  return release;
}

/**
 * Refuses a release that goes down (unless allowed, then warns `NEVER_RISES`) or lies more
 * than three noise units or standard errors below the ground.
 * @param s the fit's shared state; @param chosen the kept run; @param release the release state and its covariance.
 * @throws PhysicsError `NEVER_RISES`, `FIT_FAILED`.
 */
function checkRelease(s: FitStage, chosen: Run, release: ReleasePoint): void {
  const y0 = release.y, vy0 = release.vy;
  const cov = release.cov;
  if (!s.o.allowDescending && vy0 <= 0) {
    throw new PhysicsError('NEVER_RISES', 'The fitted flight never rises (it leaves the release going down). Start the trace at the release frame; for a ball struck downward (serve, spike) allow descending flights.');
  }
  if (vy0 <= 0) s.warnings.push({ code: 'NEVER_RISES', message: 'The ball leaves the release going down: the apex is the release point.' });
  if (y0 < 0 && y0 < -3 * Math.max(s.init.noise, stdErr(cov, chosen.names.length, 1) ?? 0)) {
    const hint = s.o.release && 'time' in s.o.release ? ' The release frame may be too early: the flight traced back to it is underground.' : '';
    throw new PhysicsError('FIT_FAILED', `The fitted release is ${fmtNum(-y0, 2)} m below the ground: check that y is measured up from the ground and the level line of the calibration.${hint}`);
  }
}

/**
 * The chosen run's problem with gravity free, at the chosen run's parameters only: its residuals and
 * Jacobian there are the run's own, so only the gravity column ∂(x, y)/∂g is integrated (the state
 * and one variational column instead of all of them; the same steps, since only the state controls
 * them). Without air the column is (0, −t²/2).
 * @param s the fit's shared state; @param chosen the kept run; @param gCfg its configuration with gravity free.
 * @returns a problem that answers for the chosen parameters with gravity appended (m/s²), and fails elsewhere.
 */
function withGravityColumn(s: FitStage, chosen: Run, gCfg: Config): LmProblem {
  const { prep, n } = s;
  const np = chosen.names.length, npG = np + 1;
  const nRes = chosen.lm.r.length;
  const col = new Float64Array(2 * n);
  const model = chosen.config.model;
  let ok = true;
  if (model === 'vacuum') {
    for (let k = 0; k < n; k++) col[2 * k + 1] = -0.5 * prep.tau[k] * prep.tau[k];
  } else {
    const p = chosen.lm.p;
    const out = new Float64Array(n * 8);
    try {
      integrate(flightRhs(coefficientsOf(s, chosen), s.kappa, ['g']), 0, initialState(p[0], p[1], p[2], p[3], ['g']), {
        tEnd: prep.tau[n - 1], rtol: s.o.rtol, atol: s.o.rtol, errorDim: 4, outputTimes: prep.tau, output: out, maxSteps: 5000,
      });
      for (let k = 0; k < n; k++) { col[2 * k] = out[8 * k + 4]; col[2 * k + 1] = out[8 * k + 5]; }
    } catch (e) {
      if (!isPhysicsError(e)) throw e;
      ok = false;
    }
  }
  return {
    nParams: npG, nResiduals: nRes, robustResiduals: 2 * n, groupSize: 2,
    evaluate(_p, r, J) {
      if (!ok || gCfg.model !== model) return false;
      r.set(chosen.lm.r);
      if (J) {
        for (let i = 0; i < nRes; i++) {
          for (let a = 0; a < np; a++) J[i * npG + a] = chosen.lm.J[i * np + a];
          J[i * npG + np] = i < 2 * n ? col[i] : 0;
        }
      }
      return true;
    },
  };
}

/**
 * Scale check: the chosen model with gravity free, started from the fit, gives the factor
 * g_fitted / g and its standard error. Near a consistent scale one Gauss–Newton step settles it
 * (g enters almost linearly over a few per cent), and so it does when gravity is too poorly
 * determined for the check to say anything; a clear deviation (over 10 % and 4σ) gets a full run so
 * that the message quotes the right factor. A deviation over 20 % and 4σ is a scale error unless
 * the drag-lift model with standard gravity explains the flight as well (BIC within 2); over 3 %
 * and 2.5σ it is a `SCALE_DISAGREES` warning; σ over 10 % leaves the check `inconclusive` with
 * `SCALE_UNCHECKED`.
 * @param s the fit's shared state; @param chosen the kept run.
 * @returns the factor (dimensionless, 1 = agrees), its standard error and the verdict; null when `scaleCheck` is off.
 * @throws PhysicsError `SCALE_SUSPECT` when the calibration, not the model, must be wrong.
 */
function checkScale(s: FitStage, chosen: Run): ScaleCheck | null {
  const { o, n, ball, cd0 } = s;
  if (!o.scaleCheck) return null;
  const p = chosen.lm.p;
  const model = chosen.config.model;
  const gCfg: Config = { ...chosen.config, freeG: true };
  const iG = paramNames(gCfg).indexOf('g');
  const start = [...Array.from(p), o.gravity];
  const step = gaussNewtonStep(withGravityColumn(s, chosen, gCfg), start, { loss: o.loss, lossScale: s.lossScale });
  s.evaluations++;
  let factor = NaN, gErr: number | null = null;
  if (step) {
    factor = (o.gravity + step.delta[iG]) / o.gravity;
    const run: Run = { config: gCfg, names: paramNames(gCfg), lm: { ...chosen.lm, r: step.r, weights: step.weights, jtwj: step.jtwj, p: Float64Array.from(start) } };
    gErr = stdErr(covarianceOf(run, n).cov, run.names.length, iG);
  }
  const clearlyOff = step && gErr !== null && Math.abs(factor - 1) > 0.1 && Math.abs(factor - 1) > 4 * (gErr / o.gravity);
  let gRun: Run | null = null;
  if (!step || clearlyOff) {
    try {
      gRun = runFit(s, gCfg, start);
      factor = gRun.lm.p[iG] / o.gravity;
      gErr = stdErr(covarianceOf(gRun, n).cov, gRun.names.length, iG);
    } catch (e) {
      if (!isPhysicsError(e)) throw e;
      gErr = null;
    }
  }
  const error = gErr === null || !Number.isFinite(factor) ? null : gErr / o.gravity;
  const dev = Math.abs(factor - 1);
  let status: ScaleCheck['status'] = 'agrees';
  if (error === null || error > 0.1) {
    status = 'inconclusive';
    s.warnings.push({ code: 'SCALE_UNCHECKED', message: 'The track is too short to cross-check the calibration against gravity; trust the calibration points alone.' });
  } else if (dev > 0.2 && dev > 4 * error) {
    // A model without lift (or without air) shifts the gravity it fits by whatever force it leaves
    // out: blame the calibration only when the drag-lift model with standard gravity cannot do as well.
    let explainedByModel = false;
    if (model !== 'drag-lift' && ball && gRun) {
      try {
        const rich = stagedFit(s, plainConfig('drag-lift'), [p[0], p[1], p[2], p[3], model === 'drag' ? p[4] : cd0, 0]);
        explainedByModel = bic(rich, n) <= bic(gRun, n) + 2;
      } catch (e) {
        if (!isPhysicsError(e)) throw e;
      }
    }
    if (!explainedByModel) {
      throw scaleError(factor, 'from a fit with gravity free',
        model === 'drag-lift' || ball ? '' : `; or the ${model} model leaves out the air's force on this ball: give the ball and fit with a drag model`);
    }
    status = 'disagrees';
    s.warnings.push({
      code: 'SCALE_DISAGREES',
      message: `Gravity fitted with the ${model} model is ${fmtNum(dev * 100, 2)} % ${factor > 1 ? 'above' : 'below'} standard, but the drag-lift model explains the flight as well with standard gravity: the ball carries lift (spin) or drag that the ${model} model leaves out. Fit with the auto or drag-lift model.`,
    });
  } else if (dev > 0.03 && dev > 2.5 * error) {
    status = 'disagrees';
    s.warnings.push({
      code: 'SCALE_DISAGREES',
      message: `Gravity fitted from the flight is ${fmtNum(dev * 100, 2)} % ${factor > 1 ? 'above' : 'below'} standard (±${fmtNum(error * 100, 2)} %): the calibration scale may be off by that much${model === 'drag-lift' ? '' : ', or the ball carries lift (spin) — try the drag-lift model'}. Re-check the reference distance and the frame rate.`,
    });
  } else if (error > 0.03) status = 'inconclusive';
  return { factor, error, status };
}

/**
 * Uncertainty: the fitted flight to the ground and in standard air, with standard errors of the
 * parameters from the covariance and of the derived metrics through the variational equations
 * ({@link derivedWithErrors}); launch speed and angle errors by the delta method; terminal speed
 * √(g/(κC_d)) (m/s) or g/β, drag over weight at launch, Reynolds number and drag regime; the RMS
 * distance of the points (m), the robust noise (m) and the outliers beyond {@link OUTLIER_SIGMAS}.
 * The standard-air carry scales β by the viscosity ratio (Stokes: b = 3πμD).
 * @param s the fit's shared state; @param chosen the kept run; @param cov its covariance (`names` order).
 * @returns the fitted flight and its errors (m, s, m/s, degrees).
 * @throws PhysicsError `FIT_FAILED` when the fitted flight does not come down to the ground.
 */
function estimateUncertainty(s: FitStage, chosen: Run, release: ReleasePoint): FittedFlight {
  const { o, n, ball, air, kappa, prep } = s;
  const names = chosen.names;
  const np = names.length;
  const p = chosen.lm.p;
  const idx = (name: string) => names.indexOf(name);
  const model = chosen.config.model;
  // Everything below starts at the release; its covariance has the release state in the launch rows.
  const cov = release.cov;
  const { x: x0, y: y0, vx: vx0, vy: vy0 } = release;
  const cd = idx('cd') >= 0 ? p[idx('cd')] : null;
  const cl = idx('cl') >= 0 ? p[idx('cl')] : null;
  const beta = idx('beta') >= 0 ? p[idx('beta')] : null;
  const coeffs: MotionCoefficients = { model, k: kappa * (cd ?? 0), kl: kappa * (cl ?? 0), beta: beta ?? 0, g: o.gravity, wind: o.windSpeed };
  const sens = sensList(names);
  // The flight to the ground at the simulator's tolerance (or the fit's, when tighter), so that the
  // reported flight is the one the planner and the charts fly again from the same launch.
  const derivedRtol = Math.min(o.rtol, SIMULATE_DEFAULTS.rtol);
  let derived: ReturnType<typeof derivedWithErrors>, std: ReturnType<typeof derivedWithErrors>;
  const stdAir = standardAir();
  const stdKappa = ball ? dragFactor(ball, stdAir) : 0;
  try {
    derived = derivedWithErrors(coeffs, kappa, x0, y0, vx0, vy0, sens, cov, np, derivedRtol);
    const stdBeta = beta === null ? 0 : (beta * stdAir.viscosityPaS) / air.viscosityPaS;
    const stdCoeffs: MotionCoefficients = { model, k: stdKappa * (cd ?? 0), kl: stdKappa * (cl ?? 0), beta: stdBeta, g: STANDARD_GRAVITY, wind: 0 };
    std = derivedWithErrors(stdCoeffs, stdKappa, x0, y0, vx0, vy0, sens, cov, np, derivedRtol);
  } catch (e) {
    if (!isPhysicsError(e) || (e.code !== 'INTEGRATION_FAILED' && e.code !== 'NO_LANDING')) throw e;
    const what = [cd !== null ? `C_d ${fmtNum(cd, 2)}` : '', cl !== null ? `C_L ${fmtNum(cl, 2)}` : '', beta !== null ? `drag rate ${fmtNum(beta, 2)}/s` : ''].filter(Boolean).join(', ');
    throw new PhysicsError('FIT_FAILED', `The fitted ${model} flight (${what || 'no air'}) does not come down to the ground: the points may not be one ball's flight, or the scale or timing is far off. Check the trace and the calibration, or try another model.`);
  }
  const flight = derived.summary;
  const vac = summarize({ model: 'vacuum', k: 0, kl: 0, beta: 0, g: o.gravity, wind: 0 }, 0, x0, y0, vx0, vy0, derivedRtol);

  const speed = Math.hypot(vx0, vy0);
  const gradSpeed = new Float64Array(np), gradAngle = new Float64Array(np);
  gradSpeed[2] = vx0 / speed; gradSpeed[3] = vy0 / speed;
  gradAngle[2] = (-vy0 / (speed * speed)) * (180 / Math.PI); gradAngle[3] = (vx0 / (speed * speed)) * (180 / Math.PI);

  const uAir = vx0 - o.windSpeed;
  const vAir = Math.hypot(uAir, vy0);
  let terminalSpeed: number | null = null, dragToWeight: number | null = null;
  if ((model === 'drag' || model === 'drag-lift') && cd !== null && cd > 0) {
    terminalSpeed = Math.sqrt(o.gravity / (kappa * cd));
    dragToWeight = (kappa * cd * vAir * vAir) / o.gravity;
  } else if (model === 'linear' && beta !== null && beta > 0) {
    terminalSpeed = o.gravity / beta;
    dragToWeight = (beta * vAir) / o.gravity;
  }
  let reynolds: number | null = null, regime: DragRegime | null = null, nearDragCrisis: boolean | null = null;
  let reynoldsRange: FittedFlight['reynoldsRange'] = null;
  if (ball) {
    reynolds = reynoldsNumber(vAir, ball.diameterM, air);
    regime = dragRegime(reynolds, ball.crisisReynolds).regime;
    reynoldsRange = reynoldsOverFlight(coeffs, kappa, release, flight.flightTime, ball.diameterM, air, derivedRtol);
    // The crisis matters when the flight's own Reynolds numbers reach into the ball's band, not when launch is merely near it.
    const [lo, hi] = ball.crisisReynolds ?? SMOOTH_SPHERE_CRISIS_RE;
    nearDragCrisis = reynoldsRange.max >= lo && reynoldsRange.min <= hi;
  }

  const { d, noise } = runNoise(chosen, n);
  let ss = 0;
  for (let k = 0; k < n; k++) ss += d[k] * d[k];
  const outliers: number[] = [];
  if (s.robust) for (let k = 0; k < n; k++) if (d[k] > OUTLIER_SIGMAS * Math.SQRT2 * noise) outliers.push(k + 1);
  const trackEnd = prep.tau[n - 1] + release.backTime;
  // Carry beyond the last traced point: the fitted x there (residual + sample) against the landing.
  const xLast = chosen.lm.r[2 * (n - 1)] + prep.xs[n - 1];
  const extrapolatedCarry = Math.max(0, flight.carry - (xLast - x0));
  return {
    model, names, cov, x0, y0, vx0, vy0,
    speed, speedError: propagate(cov, gradSpeed), angleDegError: propagate(cov, gradAngle), heightError: stdErr(cov, np, 1),
    cd, cdError: stdErr(cov, np, idx('cd')),
    cl, clError: stdErr(cov, np, idx('cl')),
    dragRate: beta, dragRateError: stdErr(cov, np, idx('beta')),
    flight,
    errors: { ...derived.errors, standardCarry: std.errors.carry },
    standardCarry: std.summary.carry,
    vacuum: { carry: vac.carry, apexHeight: vac.apexHeight, flightTime: vac.flightTime },
    terminalSpeed, dragToWeight, reynolds, regime, nearDragCrisis,
    rms: Math.sqrt(ss / n), noise, outliers, trackEnd,
    extrapolated: flight.carry > 0 && extrapolatedCarry > EXTRAPOLATED_CARRY_SHARE * flight.carry,
    extrapolatedCarry, reynoldsRange, release,
  };
}

/**
 * Reynolds numbers over a flight (41 evenly timed points from the release to the ground), from the
 * air-relative speed: Re = ρVD/μ.
 * @param c the flight's coefficients; @param kappa κ (1/m); @param release its release state (m, m/s);
 * @param flightTime s; @param diameterM the ball's D (m); @param air density and viscosity; @param rtol tolerance.
 */
function reynoldsOverFlight(c: MotionCoefficients, kappa: number, release: ReleasePoint, flightTime: number, diameterM: number, air: Air, rtol: number): { min: number; max: number } {
  const path = samplePath(c, kappa, release.x, release.y, release.vx, release.vy, flightTime, 41, rtol);
  let min = Infinity, max = 0;
  for (let i = 0; i < path.t.length; i++) {
    const re = reynoldsNumber(Math.hypot(path.vx[i] - c.wind, path.vy[i]), diameterM, air);
    if (re < min) min = re;
    if (re > max) max = re;
  }
  return { min, max };
}

/**
 * Warnings a coach or analyst can act on, about the fitted values: not converged, negative drag,
 * C_d more than 2σ outside the ball's typical range (unless the prior set it), an extrapolated
 * landing, outliers set aside, poorly determined C_L (σ > 0.15) or launch speed (σ > 10 %),
 * |C_L| > 0.5 (spinning balls reach |C_L| ≲ 0.4, common practice), a Reynolds number near the
 * ball's drag crisis, and linear drag above Re 10³.
 * @param s the fit's shared state (the warnings are added to it); @param chosen the kept run;
 * @param f its fitted flight; @param cdPrior the prior on C_d, when the model has C_d.
 */
function addFitWarnings(s: FitStage, chosen: Run, f: FittedFlight, cdPrior: FitResult['cdPrior']): void {
  const { warnings, ball } = s;
  const { model, cd, cdError: cdErr, dragRate: beta, cl, clError: clErr, flight, trackEnd, outliers, reynolds } = f;
  if (!chosen.lm.converged) {
    warnings.push({ code: 'NOT_CONVERGED', message: `The fit stopped without converging (${chosen.lm.stopReason}); treat the numbers as rough and check the track for points from another object.` });
  }
  if (cd !== null && cd < 0) {
    warnings.push({ code: 'NEGATIVE_CD', message: `The fitted drag coefficient is negative (${fmtNum(cd, 2)}${cdErr !== null ? ` ± ${fmtNum(cdErr, 2)}` : ''}): the ball would speed up by itself, which is impossible. Check the calibration scale, the wind (a tailwind must be entered) and the traced points; the drag values of this fit are not physical.` });
  }
  if (beta !== null && beta < 0) {
    warnings.push({ code: 'NEGATIVE_CD', message: `The fitted drag rate is negative (${fmtNum(beta, 2)} 1/s): the ball would speed up by itself. Check the calibration, the wind and the traced points.` });
  }
  if (cd !== null && cd >= 0 && ball?.cdRange && cdErr !== null && !cdPrior?.used) {
    const { min, max } = ball.cdRange;
    if (cd < min - 2 * cdErr || cd > max + 2 * cdErr) {
      warnings.push({ code: 'CD_OUTSIDE_RANGE', message: `C_d = ${fmtNum(cd, 3)} ± ${fmtNum(cdErr, 2)} lies outside the typical ${min}–${max} for ${ball.name ?? 'this ball'}: check the ball, the air density and the wind; a knuckling, wobbling or tumbling ball can also do this.` });
    }
  }
  if (f.extrapolated) {
    warnings.push({ code: 'EXTRAPOLATED', message: `${fmtNum(f.extrapolatedCarry, 3)} m of the ${fmtNum(flight.carry, 3)} m carry (${Math.round((100 * f.extrapolatedCarry) / flight.carry)} %, more than the ${Math.round(100 * EXTRAPOLATED_CARRY_SHARE)} % flagged) lies beyond the last traced point, ${fmtNum(trackEnd, 3)} s after the release: carry, landing and hang time are extrapolated with the fitted model. Trace the ball closer to the landing to measure them.` });
  }
  if (outliers.length > 0) {
    const list = outliers.slice(0, 8).join(', ') + (outliers.length > 8 ? ', …' : '');
    warnings.push({ code: 'OUTLIERS_DOWNWEIGHTED', message: `${outliers.length} point${outliers.length > 1 ? 's' : ''} (${list}) lie far from the flight and were set aside by the robust fit: check them in the trace (another object, a mis-click).` });
  }
  if (clErr !== null && clErr > 0.15) {
    warnings.push({ code: 'POORLY_DETERMINED', message: `The lift coefficient is poorly determined (±${fmtNum(clErr, 2)}): trace more of the flight, or use the drag model.` });
  }
  if (f.speedError !== null && f.speedError > 0.1 * f.speed) {
    warnings.push({ code: 'POORLY_DETERMINED', message: `The launch speed is poorly determined (±${fmtNum(f.speedError, 2)} m/s): trace more frames after the release.` });
  }
  if (cl !== null && Math.abs(cl) > 0.5) {
    warnings.push({ code: 'LARGE_LIFT', message: `The lift coefficient ${fmtNum(cl, 2)} is larger than spinning balls usually reach (|C_L| ≲ 0.4): check the calibration's level line and the wind.` });
  }
  if (f.nearDragCrisis && f.reynoldsRange && (model === 'drag' || model === 'drag-lift')) {
    const [lo, hi] = ball?.crisisReynolds ?? SMOOTH_SPHERE_CRISIS_RE;
    warnings.push({ code: 'NEAR_DRAG_CRISIS', message: `The Reynolds number runs from ${fmtNum(f.reynoldsRange.min, 2)} to ${fmtNum(f.reynoldsRange.max, 2)} during the flight, into this ball's drag crisis (${fmtNum(lo, 2)}–${fmtNum(hi, 2)}): C_d may change during the flight, and the fitted value is an average over it.` });
  }
  if (model === 'linear' && reynolds !== null && reynolds > 1e3) {
    warnings.push({ code: 'LINEAR_DRAG_UNUSUAL', message: `Linear drag holds for slow, small objects (Reynolds number below about 1); at ${fmtNum(reynolds, 2)} this ball's drag grows with the square of its speed: prefer the drag model.` });
  }
}

/**
 * Checks the release options and leaves out the samples before a release time (a ball at rest before
 * the kick, or in the hand before the throw).
 * @param track samples t (s), x, y (m); @param options the fit's `release` (time s or height m) and `frameRate` (frames/s).
 * @returns the samples from the release on, and how many were left out.
 * @throws PhysicsError `BAD_OPTION` for a release after the last sample, a height below the ground or above 5 m,
 *   a frame rate that is not positive; `TOO_FEW_POINTS` when too few samples follow the release; the track's codes.
 */
function fromRelease(track: Track, options: FitOptions): { track: Track; dropped: number } {
  const { release, frameRate } = options;
  if (frameRate !== undefined && !(Number.isFinite(frameRate) && frameRate > 0)) {
    throw new PhysicsError('BAD_OPTION', `Frame rate ${frameRate} is not a positive number of frames per second.`);
  }
  if (!release) return { track, dropped: 0 };
  if ('height' in release) {
    checkReleaseHeight(release.height);
    return { track, dropped: 0 };
  }
  const { t, x, y } = checkTrack(track);
  const tr = release.time;
  const last = t[t.length - 1];
  if (!Number.isFinite(tr)) throw new PhysicsError('BAD_OPTION', `The release time ${tr} is not a number of seconds.`);
  if (tr > last + 1e-9) {
    throw new PhysicsError('BAD_OPTION', `The release (t = ${fmtNum(tr, 4)} s) comes after the last traced point (t = ${fmtNum(last, 4)} s): mark the frame where the ball left the foot or hand, before the traced flight.`);
  }
  let first = 0;
  while (first < t.length && t[first] < tr - 1e-9) first++;
  const kept = t.length - first;
  if (kept < MIN_POINTS) {
    throw new PhysicsError('TOO_FEW_POINTS', `Only ${kept} traced point${kept === 1 ? '' : 's'} follow the release (t = ${fmtNum(tr, 4)} s); a fit needs at least ${MIN_POINTS}. Trace more of the flight after the release, or check the release frame.`, { points: kept });
  }
  return { track: { t: Array.from(t.subarray(first)), x: Array.from(x.subarray(first)), y: Array.from(y.subarray(first)) }, dropped: first };
}

/**
 * Fit a flight model to a traced flight.
 *
 * Stages: {@link stageFit} (checks and starting point), {@link chooseModel} and {@link applyCdPrior}
 * (model choice), {@link checkRelease}, {@link checkScale} (calibration against gravity),
 * {@link estimateUncertainty} (derived flight and standard errors), {@link addFitWarnings}.
 * @param track samples t (s), x (m, along the flight, either direction), y (m, up from the ground); first sample at the release; at least 5.
 * @param options model, ball, air, wind (m/s), gravity (m/s²), loss, checks; see {@link FitOptions}.
 * @returns launch speed/angle/height, C_d/C_L with standard errors, the fitted flight to the ground
 *   and the metrics derived from it, goodness of fit, warnings; see {@link FitResult}.
 * @throws PhysicsError with a code: bad tracks (`TOO_FEW_POINTS`, `UNSORTED_TIMES`,
 *   `DUPLICATE_TIMES`, `NON_FINITE`, `LENGTH_MISMATCH`), `NEVER_RISES`, `SCALE_SUSPECT`,
 *   `MISSING_BALL`, `BAD_OPTION`, `FIT_FAILED`.
 */
export function fitFlight(track: Track, options: FitOptions = {}): FitResult {
  const { track: flown, dropped } = fromRelease(track, options);
  const s = stageFit(flown, options);
  const choice = chooseModel(s);
  const { chosen, cdPrior } = applyCdPrior(s, choice.chosen);
  const { cov, phi } = covarianceOf(chosen, s.n, true);
  const release = findRelease(s, chosen, cov);
  checkRelease(s, chosen, release);
  const scaleCheck = checkScale(s, chosen);
  const f = estimateUncertainty(s, chosen, release);
  addFitWarnings(s, chosen, f, cdPrior);

  const { o, prep, ball, air } = s;
  const np = f.names.length;
  const aero: FlightAero = { model: f.model, ...(f.cd !== null ? { cd: f.cd } : {}), ...(f.cl !== null ? { cl: f.cl } : {}), ...(f.dragRate !== null ? { dragRate: f.dragRate } : {}) };
  const launch: Launch = { speed: f.speed, angleDeg: (Math.atan2(f.vy0, f.vx0) * 180) / Math.PI, height: f.y0 };
  return {
    model: f.model,
    converged: chosen.lm.converged,
    stopReason: chosen.lm.stopReason,
    iterations: s.iterations,
    evaluations: s.evaluations,
    launch: {
      ...launch, x: prep.direction * f.x0, vx: f.vx0, vy: f.vy0,
      speedError: f.speedError, angleDegError: f.angleDegError, heightError: f.heightError,
    },
    cd: f.cd, cdError: f.cdError, cl: f.cl, clError: f.clError,
    dragRate: f.dragRate, dragRateError: f.dragRateError,
    flight: f.flight,
    errors: f.errors,
    terminalSpeed: f.terminalSpeed, dragToWeight: f.dragToWeight, reynolds: f.reynolds, regime: f.regime, nearDragCrisis: f.nearDragCrisis,
    vacuum: f.vacuum,
    standardCarry: f.standardCarry,
    rms: f.rms, noise: f.noise, points: s.n, outliers: f.outliers, trackEnd: f.trackEnd, extrapolated: f.extrapolated,
    extrapolatedCarry: f.extrapolatedCarry,
    release: {
      mode: !o.release ? 'first-point' : 'time' in o.release ? 'time' : 'height',
      time: prep.t0 - f.release.backTime,
      backTime: f.release.backTime,
      backTimeError: f.release.backTimeError,
      backFrames: o.frameRate ? f.release.backTime * o.frameRate : null,
      droppedPoints: dropped,
    },
    reynoldsRange: f.reynoldsRange,
    noiseCorrelation: { phi, effectivePoints: (s.n * (1 - phi)) / (1 + phi) },
    scaleCheck, modelSelection: choice.selection, cdPrior,
    warnings: s.warnings,
    setup: { launch, aero, ball, air, windSpeed: o.windSpeed, gravity: o.gravity },
    track: { t0: prep.t0 - f.release.backTime, direction: prep.direction },
    covariance: f.cov ? { params: f.names, matrix: Array.from({ length: np }, (_, i) => Array.from(f.cov!.subarray(i * np, (i + 1) * np))) } : null,
  };
}

/**
 * Flight summary with standard errors of carry, apex, times and landing speed, from the state's
 * sensitivities at the events: t_L moves by −S_y/v_y at landing, the carry by S_x + vₓ·δt_L; the
 * apex time by −S_vy/a_y (implicit function theorem on the event conditions y = 0 and v_y = 0).
 */
function derivedWithErrors(c: MotionCoefficients, kappa: number, x0: number, y0: number, vx0: number, vy0: number,
  sens: SensitivityParam[], cov: Float64Array | null, np: number, rtol: number) {
  // Gravity is fixed in the final fit; only launch and aerodynamic columns matter.
  const s = cov ? sens.filter((k) => k !== 'g') : [];
  const raw = flyToGround(c, kappa, initialState(x0, y0, vx0, vy0, s), s, rtol, true);
  const summary = summaryOf(c, raw, x0, y0, vx0, vy0);
  const none = { carry: null, apexHeight: null, apexTime: null, flightTime: null, landingSpeed: null };
  if (!cov) return { summary, errors: none };
  const L = raw.landing.y;
  const [axL, ayL] = acceleration(c, L[2], L[3]);
  const gCarry = new Float64Array(np), gTL = new Float64Array(np), gApexH = new Float64Array(np), gApexT = new Float64Array(np), gLs = new Float64Array(np);
  // Column 0 (x0) moves nothing relative to the release; column 1 (y0) shifts the state by (0, 1, 0, 0).
  const col = (j: number, st: Float64Array, comp: number) => (j === 1 ? (comp === 1 ? 1 : 0) : st[4 + 4 * (j - 2) + comp]);
  const vL = Math.hypot(L[2], L[3]);
  for (let j = 1; j < np && j < 2 + s.length; j++) {
    const dt = -col(j, L, 1) / L[3];
    gTL[j] = dt;
    gCarry[j] = col(j, L, 0) + L[2] * dt;
    const dvx = col(j, L, 2) + axL * dt, dvy = col(j, L, 3) + ayL * dt;
    gLs[j] = (L[2] * dvx + L[3] * dvy) / vL;
    if (raw.apex) {
      const A = raw.apex.y;
      const [, ayA] = acceleration(c, A[2], A[3]);
      const dtA = -col(j, A, 3) / ayA;
      gApexT[j] = dtA;
      gApexH[j] = col(j, A, 1);
    } else if (j === 1) gApexH[j] = 1;
  }
  return {
    summary,
    errors: {
      carry: propagate(cov, gCarry), apexHeight: propagate(cov, gApexH), apexTime: raw.apex ? propagate(cov, gApexT) : null,
      flightTime: propagate(cov, gTL), landingSpeed: propagate(cov, gLs),
    },
  };
}

/**
 * Points of a fitted flight for charts, from the release to the ground, in the input's coordinates
 * (time in the input clock, x in the input direction).
 * @param fit a result of {@link fitFlight}; @param points how many (≥ 2), evenly timed.
 */
export function fittedPath(fit: FitResult, points = 101): { t: number[]; x: number[]; y: number[] } {
  const { setup } = fit;
  const ball = setup.ball ?? undefined;
  const kappa = ball ? dragFactor(ball, setup.air) : 0;
  const c: MotionCoefficients = {
    model: fit.model, k: kappa * (fit.cd ?? 0), kl: kappa * (fit.cl ?? 0), beta: fit.dragRate ?? 0, g: setup.gravity, wind: setup.windSpeed,
  };
  const x0 = fit.track.direction * fit.launch.x;
  const path = samplePath(c, kappa, x0, fit.launch.height, fit.launch.vx, fit.launch.vy, fit.flight.flightTime, Math.max(2, points));
  return {
    t: path.t.map((t) => t + fit.track.t0),
    x: path.x.map((x) => fit.track.direction * x),
    y: path.y,
  };
}
