/**
 * Dormand–Prince 5(4) embedded Runge–Kutta integrator with dense output and event location.
 *
 * Method: Dormand & Prince, "A family of embedded Runge–Kutta formulae", J. Comput. Appl. Math. 6
 * (1980) 19–26; step-size control (PI controller), initial step and the 4th-order continuous
 * extension as in Hairer, Nørsett & Wanner, *Solving Ordinary Differential Equations I* (2nd ed.
 * 1993), §II.4–II.6 (code DOPRI5).
 *
 * Why our own code rather than a package: the fit calls it thousands of times per second on a
 * 4–28-component system and needs (1) output at the sample times from the dense output without
 * stopping the steps there, (2) event location on that dense output (apex: v_y = 0, landing:
 * y = 0), (3) error control on the state only while carrying variational equations along, and
 * (4) no allocation per step. The general-purpose `odex` package (Gragg–Bulirsch–Stoer) serves as
 * the independent reference in the tests instead.
 *
 * Tolerances: the local error estimate e of a step is accepted when
 * √(mean_i (e_i / (atol + rtol·max(|y_i|, |y_i,new|)))²) ≤ 1 over the controlled components.
 * With the defaults (rtol = atol = 1e-10, metres and m/s) a flight of a few seconds keeps its
 * global error below about 1e-8 m; `scripts/bench/physics.ts` prints the measured discrepancy
 * against a tighter run and against `odex`.
 */
import { andersonBjorck, DORMAND_PRINCE, STEP_CONTROL } from './dormand-prince';
import { PhysicsError } from './errors';

/** Right-hand side y' = f(t, y), written into `dydt` (no allocation expected). */
export type OdeRhs = (t: number, y: Float64Array, dydt: Float64Array) => void;

/** An event: a zero of g(t, y) crossed in the given direction. */
export interface OdeEvent {
  name: string;
  /** The event function; evaluated on the dense output when locating the root. */
  g: (t: number, y: Float64Array) => number;
  /** +1: g rising through 0; −1: falling; 0: either. A start exactly on g = 0 does not count. */
  direction: -1 | 0 | 1;
  /** Stop the integration at this event. */
  terminal: boolean;
}

export interface OdeEventHit {
  name: string;
  t: number;
  y: Float64Array;
}

export interface IntegrateOptions {
  /** End of the interval (same unit as t); must be > t0. */
  tEnd: number;
  /** Relative tolerance; default 1e-10. */
  rtol?: number;
  /** Absolute tolerance (units of y); default 1e-10. */
  atol?: number;
  /** Only the first `errorDim` components enter the error estimate (variational equations ride along); default all. */
  errorDim?: number;
  /** First step; default chosen by Hairer's algorithm. */
  hInitial?: number;
  /** Largest step; default tEnd − t0. */
  hMax?: number;
  /** Step limit; default 100 000. */
  maxSteps?: number;
  /** Ascending times in [t0, tEnd] at which to report y (from the dense output). */
  outputTimes?: ArrayLike<number>;
  /** Where to write the outputs: row k at k·dim; allocated when omitted. */
  output?: Float64Array;
  events?: OdeEvent[];
  /** Called after every accepted step with an interpolator valid on [tOld, t]. */
  onStep?: (tOld: number, t: number, y: Float64Array, interpolate: (tt: number, out: Float64Array) => void) => void;
}

export interface IntegrateResult {
  /** Final time: tEnd, or the time of a terminal event. */
  t: number;
  /** State at `t`. */
  y: Float64Array;
  status: 'end' | 'event';
  events: OdeEventHit[];
  /** Rows of `output` filled (fewer than requested when a terminal event came first). */
  outputCount: number;
  output: Float64Array | null;
  acceptedSteps: number;
  rejectedSteps: number;
  evaluations: number;
}

const {
  C2, C3, C4, C5, A21, A31, A32, A41, A42, A43, A51, A52, A53, A54, A61, A62, A63, A64, A65,
  A71, A73, A74, A75, A76, E1, E3, E4, E5, E6, E7, D1, D3, D4, D5, D6, D7,
} = DORMAND_PRINCE;
const { SAFE, FAC_MIN, FAC_MAX, BETA, EXPO1 } = STEP_CONTROL;

/** Defaults of {@link integrate}, declared once. */
export const INTEGRATOR_DEFAULTS = { rtol: 1e-10, atol: 1e-10, maxSteps: 100000 } as const;

/**
 * Integrate y' = f(t, y) from (t0, y0) to `tEnd` or a terminal event.
 * @param f right-hand side; @param t0 start; @param y0 initial state (not modified).
 * @param options tolerances, output times, events; see {@link IntegrateOptions}.
 * @returns the final state, events found, outputs, and step counts.
 * @throws PhysicsError `INTEGRATION_FAILED` on a non-finite state, a step below round-off, or the step limit.
 */
export function integrate(f: OdeRhs, t0: number, y0: ArrayLike<number>, options: IntegrateOptions): IntegrateResult {
  const n = y0.length;
  const rtol = options.rtol ?? INTEGRATOR_DEFAULTS.rtol;
  const atol = options.atol ?? INTEGRATOR_DEFAULTS.atol;
  const nErr = Math.min(options.errorDim ?? n, n);
  const maxSteps = options.maxSteps ?? INTEGRATOR_DEFAULTS.maxSteps;
  const tEnd = options.tEnd;
  if (!(tEnd > t0)) throw new PhysicsError('INTEGRATION_FAILED', `Integration interval is empty (from ${t0} to ${tEnd}).`);

  const ws = takeWorkspace(n);
  try {
    return run(f, t0, y0, options, ws, n, tEnd, rtol, atol, nErr, maxSteps);
  } finally {
    ws.inUse = false;
  }
}

interface Workspace {
  inUse: boolean;
  y: Float64Array; k1: Float64Array; k2: Float64Array; k3: Float64Array; k4: Float64Array; k5: Float64Array; k6: Float64Array; k7: Float64Array;
  yTmp: Float64Array; yNew: Float64Array; r1: Float64Array; r2: Float64Array; r3: Float64Array; r4: Float64Array; r5: Float64Array;
}

// Note: typed-array allocation costs more than a whole step of a 4-component flight, so buffers are
// reused between calls; a re-entrant call (an rhs that integrates) gets fresh ones.
const workspaces = new Map<number, Workspace>();
const EMPTY = new Float64Array(0);

function takeWorkspace(n: number): Workspace {
  const cached = workspaces.get(n);
  if (cached && !cached.inUse) {
    cached.inUse = true;
    return cached;
  }
  // Note: separate arrays, not subarray views of one buffer: views measured 2× slower in the step loop.
  const part = (_i: number) => new Float64Array(n);
  const ws: Workspace = {
    inUse: true, y: part(0), k1: part(1), k2: part(2), k3: part(3), k4: part(4), k5: part(5), k6: part(6), k7: part(7),
    yTmp: part(8), yNew: part(9), r1: part(10), r2: part(11), r3: part(12), r4: part(13), r5: part(14),
  };
  if (!cached) workspaces.set(n, ws);
  return ws;
}

function run(f: OdeRhs, t0: number, y0: ArrayLike<number>, options: IntegrateOptions, ws: Workspace, n: number, tEnd: number,
  rtol: number, atol: number, nErr: number, maxSteps: number): IntegrateResult {
  const hMax = Math.abs(options.hMax ?? tEnd - t0);
  const { y, k1, k2, k3, k4, k5, k6, k7, yTmp, yNew, r1, r2, r3, r4, r5 } = ws;
  for (let i = 0; i < n; i++) y[i] = y0[i];

  const outTimes = options.outputTimes;
  const nOut = outTimes ? outTimes.length : 0;
  const output = outTimes ? (options.output ?? new Float64Array(nOut * n)) : null;
  let outIdx = 0;
  const events = options.events ?? [];
  const gPrev = events.length > 0 ? new Float64Array(events.length) : EMPTY;
  for (let e = 0; e < events.length; e++) gPrev[e] = events[e].g(t0, y);
  const hits: OdeEventHit[] = [];
  const needDense = nOut > 0 || events.length > 0 || options.onStep !== undefined;

  let evaluations = 0;
  let t = t0;
  // Outputs at t0 exactly need no step.
  while (outTimes && outIdx < nOut && outTimes[outIdx] <= t0) {
    output!.set(y, outIdx * n);
    outIdx++;
  }
  f(t, y, k1);
  evaluations++;
  checkFinite(k1, t);

  let h = options.hInitial ?? initialStep(f, t, y, k1, hMax, rtol, atol, nErr, k2, k3);
  if (options.hInitial === undefined) evaluations++;
  let facOld = 1e-4;
  let accepted = 0, rejected = 0;
  let lastRejected = false;
  let tOldDense = t;
  let hDense = 0;

  const interpolate = (tt: number, out: Float64Array): void => interpolateAt(tt, out, 0);
  // The dense output at tt into out[at…at+n): outputs go straight into their row, without a copy.
  const interpolateAt = (tt: number, out: Float64Array, at: number): void => {
    const s = (tt - tOldDense) / hDense;
    const s1 = 1 - s;
    for (let i = 0; i < n; i++) out[at + i] = r1[i] + s * (r2[i] + s1 * (r3[i] + s * (r4[i] + s1 * r5[i])));
  };

  for (;;) {
    if (accepted + rejected >= maxSteps) {
      throw new PhysicsError('INTEGRATION_FAILED', `The flight integration hit its step limit (${maxSteps}) at t = ${t.toPrecision(6)} s: the parameters are far outside any real flight.`, { reason: 'max-steps', t });
    }
    if (t + 1.01 * h >= tEnd) h = tEnd - t;
    if (0.1 * Math.abs(h) <= Math.abs(t) * 2.3e-16) {
      throw new PhysicsError('INTEGRATION_FAILED', `The integration step fell below round-off at t = ${t.toPrecision(6)} s.`, { reason: 'step-underflow', t });
    }
    for (let i = 0; i < n; i++) yTmp[i] = y[i] + h * A21 * k1[i];
    f(t + C2 * h, yTmp, k2);
    for (let i = 0; i < n; i++) yTmp[i] = y[i] + h * (A31 * k1[i] + A32 * k2[i]);
    f(t + C3 * h, yTmp, k3);
    for (let i = 0; i < n; i++) yTmp[i] = y[i] + h * (A41 * k1[i] + A42 * k2[i] + A43 * k3[i]);
    f(t + C4 * h, yTmp, k4);
    for (let i = 0; i < n; i++) yTmp[i] = y[i] + h * (A51 * k1[i] + A52 * k2[i] + A53 * k3[i] + A54 * k4[i]);
    f(t + C5 * h, yTmp, k5);
    for (let i = 0; i < n; i++) yTmp[i] = y[i] + h * (A61 * k1[i] + A62 * k2[i] + A63 * k3[i] + A64 * k4[i] + A65 * k5[i]);
    const tNew = t + h;
    f(tNew, yTmp, k6);
    for (let i = 0; i < n; i++) yNew[i] = y[i] + h * (A71 * k1[i] + A73 * k3[i] + A74 * k4[i] + A75 * k5[i] + A76 * k6[i]);
    f(tNew, yNew, k7);
    evaluations += 6;

    let err = 0;
    for (let i = 0; i < nErr; i++) {
      const ei = h * (E1 * k1[i] + E3 * k3[i] + E4 * k4[i] + E5 * k5[i] + E6 * k6[i] + E7 * k7[i]);
      const sc = atol + rtol * Math.max(Math.abs(y[i]), Math.abs(yNew[i]));
      const q = ei / sc;
      err += q * q;
    }
    err = Math.sqrt(err / nErr);
    if (!Number.isFinite(err)) {
      // A non-finite trial may just be a step too large for a violent start: shrink and retry a few times.
      if (h > 1e-12 * Math.max(1, Math.abs(t)) && rejected < maxSteps) {
        h *= 0.1;
        rejected++;
        lastRejected = true;
        continue;
      }
      throw new PhysicsError('INTEGRATION_FAILED', `The flight state became non-finite at t = ${t.toPrecision(6)} s: the parameters are far outside any real flight.`, { reason: 'non-finite', t });
    }

    const fac11 = Math.pow(err, EXPO1);
    let fac = fac11 / Math.pow(facOld, BETA);
    fac = Math.max(1 / FAC_MAX, Math.min(1 / FAC_MIN, fac / SAFE));
    let hNew = h / fac;

    if (err <= 1) {
      facOld = Math.max(err, 1e-4);
      accepted++;
      if (needDense) {
        for (let i = 0; i < n; i++) {
          const dy = yNew[i] - y[i];
          const bspl = h * k1[i] - dy;
          r1[i] = y[i];
          r2[i] = dy;
          r3[i] = bspl;
          r4[i] = dy - h * k7[i] - bspl;
          r5[i] = h * (D1 * k1[i] + D3 * k3[i] + D4 * k4[i] + D5 * k5[i] + D6 * k6[i] + D7 * k7[i]);
        }
        tOldDense = t;
        hDense = h;
      }

      // Events: locate the earliest sign change in this step on the dense output.
      let stopAt = -1;
      let stopT = tNew;
      for (let e = 0; e < events.length; e++) {
        const ev = events[e];
        const g1 = ev.g(tNew, yNew);
        const g0 = gPrev[e];
        const crosses = (ev.direction <= 0 && g0 > 0 && g1 <= 0) || (ev.direction >= 0 && g0 < 0 && g1 >= 0);
        if (crosses) {
          const tHit = andersonBjorck((tt) => { interpolate(tt, yTmp); return ev.g(tt, yTmp); }, t, tNew, g0, g1);
          interpolate(tHit, yTmp);
          hits.push({ name: ev.name, t: tHit, y: Float64Array.from(yTmp) });
          if (ev.terminal && tHit <= stopT) {
            stopT = tHit;
            stopAt = e;
          }
        }
        gPrev[e] = g1;
      }
      if (stopAt >= 0) {
        // Drop non-terminal hits found beyond the terminal one, then report the state at the event.
        for (let i = hits.length - 1; i >= 0; i--) if (hits[i].t > stopT) hits.splice(i, 1);
        hits.sort((a, b) => a.t - b.t);
        while (outTimes && outIdx < nOut && outTimes[outIdx] <= stopT) {
          interpolateAt(outTimes[outIdx], output!, outIdx * n);
          outIdx++;
        }
        interpolate(stopT, yTmp);
        if (options.onStep) options.onStep(t, stopT, yTmp, interpolate);
        return {
          t: stopT, y: Float64Array.from(yTmp), status: 'event', events: hits, outputCount: outIdx, output,
          acceptedSteps: accepted, rejectedSteps: rejected, evaluations,
        };
      }

      while (outTimes && outIdx < nOut && outTimes[outIdx] <= tNew) {
        interpolateAt(outTimes[outIdx], output!, outIdx * n);
        outIdx++;
      }
      if (options.onStep) options.onStep(t, tNew, yNew, interpolate);

      // FSAL: the last stage is the first of the next step.
      k1.set(k7);
      y.set(yNew);
      t = tNew;
      checkFinite(y, t);
      if (t >= tEnd) break;
      if (Math.abs(hNew) > hMax) hNew = hMax;
      if (lastRejected) hNew = Math.min(hNew, h);
      lastRejected = false;
      h = hNew;
    } else {
      hNew = h / Math.min(1 / FAC_MIN, fac11 / SAFE);
      lastRejected = true;
      rejected++;
      h = hNew;
    }
  }
  return {
    t, y: Float64Array.from(y), status: 'end', events: hits, outputCount: outIdx, output,
    acceptedSteps: accepted, rejectedSteps: rejected, evaluations,
  };
}

function checkFinite(v: Float64Array, t: number): void {
  for (let i = 0; i < v.length; i++) {
    if (!Number.isFinite(v[i])) {
      throw new PhysicsError('INTEGRATION_FAILED', `The flight state became non-finite at t = ${t.toPrecision(6)} s: the parameters are far outside any real flight.`, { reason: 'non-finite', t });
    }
  }
}

/** Initial step size (HNW I, §II.4, "Starting step size"; DOPRI5's HINIT). */
function initialStep(f: OdeRhs, t: number, y: Float64Array, f0: Float64Array, hMax: number, rtol: number, atol: number,
  nErr: number, y1: Float64Array, f1: Float64Array): number {
  let dnf = 0, dny = 0;
  for (let i = 0; i < nErr; i++) {
    const sk = atol + rtol * Math.abs(y[i]);
    dnf += (f0[i] / sk) ** 2;
    dny += (y[i] / sk) ** 2;
  }
  let h = dnf <= 1e-10 || dny <= 1e-10 ? 1e-6 : Math.sqrt(dny / dnf) * 0.01;
  h = Math.min(h, hMax);
  for (let i = 0; i < y.length; i++) y1[i] = y[i] + h * f0[i];
  f(t + h, y1, f1);
  let der2 = 0;
  for (let i = 0; i < nErr; i++) {
    const sk = atol + rtol * Math.abs(y[i]);
    der2 += ((f1[i] - f0[i]) / sk) ** 2;
  }
  der2 = Math.sqrt(der2) / h;
  const der12 = Math.max(Math.abs(der2), Math.sqrt(dnf));
  const h1 = der12 <= 1e-15 ? Math.max(1e-6, Math.abs(h) * 1e-3) : Math.pow(0.01 / der12, 1 / 5);
  return Math.min(100 * Math.abs(h), h1, hMax);
}
