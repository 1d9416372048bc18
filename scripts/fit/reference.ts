/**
 * Independent references for the flight engine, used by its tests and its benchmark:
 * - `odexStates`: the flight integrated by `odex` (v2.0.4, Hairer & Wanner's ODEX, a
 *   Gragg–Bulirsch–Stoer extrapolation code) from sample to sample;
 * - `fitDragWithMlLm`: the drag model fitted by `ml-levenberg-marquardt` (v5.1), plain least squares.
 * Neither shares code with the engine's integrator or its least-squares solver.
 */
import { createRequire } from 'node:module';
import { levenbergMarquardt as mlLevenbergMarquardt } from 'ml-levenberg-marquardt';
import { dragFactor, type Air, type BallProps } from '../../shared/physics/index';
import { flightRhs, initialState, type MotionCoefficients } from '../../shared/physics/flight';
import { integrate } from '../../shared/physics/integrator';

/** The part of odex's Solver used here. */
interface OdexSolver {
  relativeTolerance: number;
  absoluteTolerance: number;
  maxSteps: number;
  solve(f: (x: number, y: number[]) => number[], x0: number, y0: number[], xEnd: number): { y: number[] };
}
// Note: loaded through require, not imported: odex ships its TypeScript source, which the
// project's strict type check would then compile (and reject).
const { Solver } = createRequire(import.meta.url)('odex') as { Solver: new (n: number) => OdexSolver };

/** Quadratic-drag-with-lift right-hand side written out again, independently of the engine's. */
function odexRhs(c: MotionCoefficients): (t: number, y: number[]) => number[] {
  return (_t, y) => {
    const u = y[2] - c.wind, v = y[3];
    if (c.model === 'linear') return [y[2], y[3], -c.beta * u, -c.beta * v - c.g];
    const V = Math.hypot(u, v);
    return [y[2], y[3], -c.k * V * u - c.kl * V * v, -c.k * V * v + c.kl * V * u - c.g];
  };
}

/**
 * States (x, y, vₓ, v_y) at ascending times from t = 0, integrated by odex between consecutive times.
 * @param tol odex's relative and absolute tolerance.
 */
export function odexStates(c: MotionCoefficients, s0: number[], times: ArrayLike<number>, tol = 1e-13): number[][] {
  const solver = new Solver(4);
  solver.relativeTolerance = tol;
  solver.absoluteTolerance = tol;
  solver.maxSteps = 100000;
  const f = odexRhs(c);
  const out: number[][] = [];
  let t = 0;
  let y = s0.slice();
  for (let i = 0; i < times.length; i++) {
    if (times[i] > t) {
      const r = solver.solve(f, t, y, times[i]);
      y = r.y;
      t = times[i];
    }
    out.push(y.slice());
  }
  return out;
}

export interface MlLmFit {
  /** x0, y0, vx0, vy0, cd */
  params: number[];
  iterations: number;
  sse: number;
}

/**
 * Fit the drag model by `ml-levenberg-marquardt`. The package fits a scalar y = f(x): the x and y
 * residuals are interleaved and indexed by x; the flight is integrated once per parameter vector
 * and cached.
 * @param model 'odex' integrates with odex and lets the package difference the Jacobian (fully
 *   independent, slow); 'engine' integrates with the engine and passes its variational Jacobian
 *   (a fair timing comparison of the least-squares part).
 */
export function fitDragWithMlLm(track: { t: ArrayLike<number>; x: ArrayLike<number>; y: ArrayLike<number> }, ball: BallProps, air: Air,
  start: number[], model: 'odex' | 'engine', options: { wind?: number; gravity?: number; maxIterations?: number } = {}): MlLmFit {
  const n = track.t.length;
  const t0 = track.t[0];
  const times = Array.from(track.t, (t) => t - t0);
  const kappa = dragFactor(ball, air);
  const g = options.gravity ?? 9.80665, wind = options.wind ?? 0;
  const xIdx = Array.from({ length: 2 * n }, (_, i) => i);
  const yData = Array.from({ length: 2 * n }, (_, i) => (i % 2 === 0 ? track.x[i >> 1] : track.y[i >> 1]));
  const cache = new Map<string, { values: Float64Array; jac: Float64Array | null }>();
  const evaluate = (p: number[]) => {
    const key = p.join(',');
    const hit = cache.get(key);
    if (hit) return hit;
    const c: MotionCoefficients = { model: 'drag', k: kappa * p[4], kl: 0, beta: 0, g, wind };
    const values = new Float64Array(2 * n);
    let jac: Float64Array | null = null;
    if (model === 'odex') {
      const states = odexStates(c, [p[0], p[1], p[2], p[3]], times, 1e-11);
      states.forEach((s, k) => { values[2 * k] = s[0]; values[2 * k + 1] = s[1]; });
    } else {
      const sens = ['vx0', 'vy0', 'cd'] as const;
      const dim = 16;
      const out = new Float64Array(n * dim);
      integrate(flightRhs(c, kappa, sens), 0, initialState(p[0], p[1], p[2], p[3], sens), { tEnd: times[n - 1], rtol: 1e-9, atol: 1e-9, errorDim: 4, outputTimes: times, output: out });
      jac = new Float64Array(2 * n * 5);
      for (let k = 0; k < n; k++) {
        const o = k * dim;
        values[2 * k] = out[o]; values[2 * k + 1] = out[o + 1];
        jac.set([1, 0, out[o + 4], out[o + 8], out[o + 12]], 2 * k * 5);
        jac.set([0, 1, out[o + 5], out[o + 9], out[o + 13]], (2 * k + 1) * 5);
      }
    }
    const entry = { values, jac };
    if (cache.size > 64) cache.clear();
    cache.set(key, entry);
    return entry;
  };
  const result = mlLevenbergMarquardt(
    { x: xIdx, y: yData },
    (p: number[]) => { const e = evaluate(p); return (i: number) => e.values[i]; },
    {
      initialValues: start,
      maxIterations: options.maxIterations ?? 60,
      errorTolerance: 0,
      damping: 1e-2,
      // Steps for the package's own finite differences (odex mode): small against each parameter's scale.
      gradientDifference: [1e-6, 1e-6, 1e-6, 1e-6, 1e-7],
      centralDifference: true,
      ...(model === 'engine' ? { jacobianFunction: (p: number[]) => { const e = evaluate(p); return (i: number) => Array.from(e.jac!.subarray(i * 5, i * 5 + 5)); } } : {}),
    },
  );
  return { params: result.parameterValues, iterations: result.iterations, sse: result.parameterError };
}
