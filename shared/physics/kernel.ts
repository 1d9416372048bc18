/**
 * The flight integrated to the ground on scalars: the same Dormand–Prince 5(4) method, step
 * control, continuous extension and event location as {@link integrate} (Dormand & Prince 1980;
 * Hairer, Nørsett & Wanner I (1993) §II.4–II.6), written out for the four-component flight
 * without arrays. Why: the planner flies thousands of flights per grid, and array traffic cost
 * 2.3× the arithmetic here (measured: 5.2 µs against 12 µs CPU per football flight at rtol 1e-8).
 * The tests hold it to the generic integrator's results.
 *
 * One formula covers every model: a = −(κC_d V + β) u + κC_L V (−u_y, uₓ) − (0, g), u = (vₓ − w, v_y).
 */
import { andersonBjorck, DORMAND_PRINCE, STEP_CONTROL } from './dormand-prince';
import { PhysicsError } from './errors';
import type { MotionCoefficients } from './flight';

// The right-hand side does not depend on time, so the stage times c_i are not needed.
const {
  A21, A31, A32, A41, A42, A43, A51, A52, A53, A54, A61, A62, A63, A64, A65,
  A71, A73, A74, A75, A76, E1, E3, E4, E5, E6, E7, D1, D3, D4, D5, D6, D7,
} = DORMAND_PRINCE;
const { SAFE, FAC_MIN, FAC_MAX, BETA, EXPO1 } = STEP_CONTROL;

/** Apex and landing of a flight, as found by {@link flyKernel}. */
export interface KernelFlight {
  apex: { t: number; x: number; y: number } | null;
  landing: { t: number; x: number; vx: number; vy: number };
  steps: number;
  /** Step size (s) after the first three accepted steps (the last one when fewer): a start for a neighbouring flight. */
  hSettled: number;
}

/** Dense output of one step for the four components (HNW I §II.6, DOPRI5's CONTD5). */
class Dense {
  t0 = 0; h = 0;
  // r1..r5 per component: x, y, u, v.
  c = new Float64Array(20);
  at(t: number, comp: number): number {
    const s = (t - this.t0) / this.h, s1 = 1 - s, o = comp * 5, c = this.c;
    return c[o] + s * (c[o + 1] + s1 * (c[o + 2] + s * (c[o + 3] + s1 * c[o + 4])));
  }
}

const dense = new Dense();

/**
 * The continuous extension's coefficients of one component at `o`: from its value s0 → s1 over the step h,
 * its derivative at both ends (f0 = k₁, f7 = k₇) and the stages k₃…k₆ (written out, no arrays: the planner
 * does this twice per flight).
 */
function denseRow(dc: Float64Array, o: number, h: number, s0: number, s1: number, f0: number, f7: number, k3: number, k4: number, k5: number, k6: number): void {
  const dy = s1 - s0, bspl = h * f0 - dy;
  dc[o] = s0; dc[o + 1] = dy; dc[o + 2] = bspl; dc[o + 3] = dy - h * f7 - bspl;
  dc[o + 4] = h * (D1 * f0 + D3 * k3 + D4 * k4 + D5 * k5 + D6 * k6 + D7 * f7);
}

/**
 * Fly from (x₀, y₀, vₓ, v_y) until y falls through 0, locating the apex (v_y falls through 0) on the way.
 * @param rtol relative and absolute tolerance (m, m/s). @param tMax give up after this time (s).
 * @param hStart first step (s); 0: chosen as the generic integrator chooses it. A neighbouring flight's
 *   `hSettled` saves the steps in which the controller grows the cautious first step (measured: 2 of 19
 *   per flight of a carry grid, same accuracy).
 * @throws PhysicsError `NO_LANDING` or `INTEGRATION_FAILED`, as the generic path does.
 */
export function flyKernel(c: MotionCoefficients, x0: number, y0: number, vx0: number, vy0: number, rtol: number, withApex: boolean, tMax: number, hStart = 0): KernelFlight {
  const k = c.model === 'linear' || c.model === 'vacuum' ? 0 : c.k;
  const kl = c.model === 'drag-lift' ? c.kl : 0;
  const beta = c.model === 'linear' ? c.beta : 0;
  const g = c.g, w = c.wind, tol = rtol;
  let x = x0, y = y0, u = vx0, v = vy0, t = 0;
  const ur = u - w, V = Math.sqrt(ur * ur + v * v), kv = k * V + beta;
  let ax = -kv * ur - kl * V * v, ay = -kv * v + kl * V * ur - g;
  let apex: KernelFlight['apex'] = null;

  // Initial step (HNW I §II.4), exactly as the generic integrator computes it.
  let h: number;
  if (hStart > 0) h = Math.min(hStart, tMax);
  else {
    const s0 = tol + tol * Math.abs(x), s1 = tol + tol * Math.abs(y), s2 = tol + tol * Math.abs(u), s3 = tol + tol * Math.abs(v);
    const dnf = (u / s0) ** 2 + (v / s1) ** 2 + (ax / s2) ** 2 + (ay / s3) ** 2;
    const dny = (x / s0) ** 2 + (y / s1) ** 2 + (u / s2) ** 2 + (v / s3) ** 2;
    let h0 = dnf <= 1e-10 || dny <= 1e-10 ? 1e-6 : Math.sqrt(dny / dnf) * 0.01;
    h0 = Math.min(h0, tMax);
    const u1 = u + h0 * ax, v1 = v + h0 * ay;
    const r1 = u1 - w, V1 = Math.sqrt(r1 * r1 + v1 * v1), kv1 = k * V1 + beta;
    const ax1 = -kv1 * r1 - kl * V1 * v1, ay1 = -kv1 * v1 + kl * V1 * r1 - g;
    const der2 = Math.sqrt(((u1 - u) / s0) ** 2 + ((v1 - v) / s1) ** 2 + ((ax1 - ax) / s2) ** 2 + ((ay1 - ay) / s3) ** 2) / h0;
    const der12 = Math.max(Math.abs(der2), Math.sqrt(dnf));
    const h1 = der12 <= 1e-15 ? Math.max(1e-6, Math.abs(h0) * 1e-3) : Math.pow(0.01 / der12, 1 / 5);
    h = Math.min(100 * Math.abs(h0), h1, tMax);
  }

  let facOld = 1e-4, lastRejected = false, steps = 0, rejected = 0, hSettled = 0;
  const dc = dense.c;
  for (;;) {
    if (steps + rejected >= 100000) throw new PhysicsError('INTEGRATION_FAILED', `The flight integration hit its step limit at t = ${t.toPrecision(6)} s: the parameters are far outside any real flight.`, { reason: 'max-steps', t });
    if (t + 1.01 * h >= tMax) h = tMax - t;
    if (0.1 * Math.abs(h) <= Math.abs(t) * 2.3e-16) throw new PhysicsError('INTEGRATION_FAILED', `The integration step fell below round-off at t = ${t.toPrecision(6)} s.`, { reason: 'step-underflow', t });
    let r: number, Vs: number, kvs: number;
    const u2 = u + h * A21 * ax, v2 = v + h * A21 * ay;
    r = u2 - w; Vs = Math.sqrt(r * r + v2 * v2); kvs = k * Vs + beta;
    const ax2 = -kvs * r - kl * Vs * v2, ay2 = -kvs * v2 + kl * Vs * r - g;
    const u3 = u + h * (A31 * ax + A32 * ax2), v3 = v + h * (A31 * ay + A32 * ay2);
    r = u3 - w; Vs = Math.sqrt(r * r + v3 * v3); kvs = k * Vs + beta;
    const ax3 = -kvs * r - kl * Vs * v3, ay3 = -kvs * v3 + kl * Vs * r - g;
    const u4 = u + h * (A41 * ax + A42 * ax2 + A43 * ax3), v4 = v + h * (A41 * ay + A42 * ay2 + A43 * ay3);
    r = u4 - w; Vs = Math.sqrt(r * r + v4 * v4); kvs = k * Vs + beta;
    const ax4 = -kvs * r - kl * Vs * v4, ay4 = -kvs * v4 + kl * Vs * r - g;
    const u5 = u + h * (A51 * ax + A52 * ax2 + A53 * ax3 + A54 * ax4), v5 = v + h * (A51 * ay + A52 * ay2 + A53 * ay3 + A54 * ay4);
    r = u5 - w; Vs = Math.sqrt(r * r + v5 * v5); kvs = k * Vs + beta;
    const ax5 = -kvs * r - kl * Vs * v5, ay5 = -kvs * v5 + kl * Vs * r - g;
    const u6 = u + h * (A61 * ax + A62 * ax2 + A63 * ax3 + A64 * ax4 + A65 * ax5), v6 = v + h * (A61 * ay + A62 * ay2 + A63 * ay3 + A64 * ay4 + A65 * ay5);
    r = u6 - w; Vs = Math.sqrt(r * r + v6 * v6); kvs = k * Vs + beta;
    const ax6 = -kvs * r - kl * Vs * v6, ay6 = -kvs * v6 + kl * Vs * r - g;
    // Position stages: x' = u, so the position's stage derivatives are the velocity stages.
    const xn = x + h * (A71 * u + A73 * u3 + A74 * u4 + A75 * u5 + A76 * u6);
    const yn = y + h * (A71 * v + A73 * v3 + A74 * v4 + A75 * v5 + A76 * v6);
    const un = u + h * (A71 * ax + A73 * ax3 + A74 * ax4 + A75 * ax5 + A76 * ax6);
    const vn = v + h * (A71 * ay + A73 * ay3 + A74 * ay4 + A75 * ay5 + A76 * ay6);
    r = un - w; Vs = Math.sqrt(r * r + vn * vn); kvs = k * Vs + beta;
    const ax7 = -kvs * r - kl * Vs * vn, ay7 = -kvs * vn + kl * Vs * r - g;
    const ex = (h * (E1 * u + E3 * u3 + E4 * u4 + E5 * u5 + E6 * u6 + E7 * un)) / (tol + tol * Math.max(Math.abs(x), Math.abs(xn)));
    const ey = (h * (E1 * v + E3 * v3 + E4 * v4 + E5 * v5 + E6 * v6 + E7 * vn)) / (tol + tol * Math.max(Math.abs(y), Math.abs(yn)));
    const eu = (h * (E1 * ax + E3 * ax3 + E4 * ax4 + E5 * ax5 + E6 * ax6 + E7 * ax7)) / (tol + tol * Math.max(Math.abs(u), Math.abs(un)));
    const ev = (h * (E1 * ay + E3 * ay3 + E4 * ay4 + E5 * ay5 + E6 * ay6 + E7 * ay7)) / (tol + tol * Math.max(Math.abs(v), Math.abs(vn)));
    const err = Math.sqrt((ex * ex + ey * ey + eu * eu + ev * ev) / 4);
    if (!Number.isFinite(err)) {
      if (h > 1e-12 * Math.max(1, Math.abs(t))) { h *= 0.1; rejected++; lastRejected = true; continue; }
      throw new PhysicsError('INTEGRATION_FAILED', `The flight state became non-finite at t = ${t.toPrecision(6)} s: the parameters are far outside any real flight.`, { reason: 'non-finite', t });
    }
    const fac11 = Math.pow(err, EXPO1);
    let fac = fac11 / Math.pow(facOld, BETA);
    fac = Math.max(1 / FAC_MAX, Math.min(1 / FAC_MIN, fac / SAFE));
    let hNew = h / fac;
    if (err > 1) {
      h = h / Math.min(1 / FAC_MIN, fac11 / SAFE);
      lastRejected = true;
      rejected++;
      continue;
    }
    // A ball launched from the ground must leave it within the first step: a borrowed first step long
    // enough to come down again would hide the landing (the event needs y > 0 before it).
    if (steps === 0 && hStart > 0 && y <= 0 && yn <= 0) {
      h *= 0.1;
      lastRejected = true;
      rejected++;
      continue;
    }
    facOld = Math.max(err, 1e-4);
    steps++;
    if (steps <= 3) hSettled = h;
    const tNew = t + h;
    const apexHere = withApex && apex === null && v > 0 && vn <= 0;
    const landHere = y > 0 && yn <= 0;
    if (apexHere || landHere) {
      // Continuous extension of the step for the four components.
      dense.t0 = t; dense.h = h;
      denseRow(dc, 0, h, x, xn, u, un, u3, u4, u5, u6);
      denseRow(dc, 5, h, y, yn, v, vn, v3, v4, v5, v6);
      denseRow(dc, 10, h, u, un, ax, ax7, ax3, ax4, ax5, ax6);
      denseRow(dc, 15, h, v, vn, ay, ay7, ay3, ay4, ay5, ay6);
      if (apexHere) {
        const ta = andersonBjorck((tt) => dense.at(tt, 3), t, tNew, v, vn);
        apex = { t: ta, x: dense.at(ta, 0), y: dense.at(ta, 1) };
      }
      if (landHere) {
        const tl = andersonBjorck((tt) => dense.at(tt, 1), t, tNew, y, yn);
        return { apex, landing: { t: tl, x: dense.at(tl, 0), vx: dense.at(tl, 2), vy: dense.at(tl, 3) }, steps, hSettled };
      }
    }
    t = tNew; x = xn; y = yn; u = un; v = vn; ax = ax7; ay = ay7;
    if (t >= tMax) throw new PhysicsError('NO_LANDING', `The ball does not come down within ${tMax} s with these parameters: check the drag and lift values.`);
    if (lastRejected) hNew = Math.min(hNew, h);
    lastRejected = false;
    h = Math.min(hNew, tMax);
  }
}
