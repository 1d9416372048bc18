/**
 * The follower's long-range predictor: the flight so far fitted with the physics of a ball in air,
 * in picture coordinates, so a ball that leaves the picture (over the top at its apex, behind a
 * person) is looked for where it really comes back rather than along a straight line or a parabola
 * that ignores drag.
 *
 * Model, in pixels and frames (y down): a = (0, g) − k·|v|·v, quadratic drag (Taylor, Classical
 * Mechanics, 2005, §2.4) with g and k free, which holds for a camera square to the plane of flight;
 * integrated with the classical fourth-order Runge–Kutta method at one frame per step. The six
 * parameters (position and velocity at the last point, g, k) are fitted by Levenberg–Marquardt
 * (Marquardt, J. SIAM 11 (1963) 431) on the weighted point distances, with a weak prior pulling k
 * towards zero so a short track, which cannot tell drag from gravity, falls back to a parabola.
 */
import { fitMotion, solve, type MotionPoint } from './motion';

export interface BallisticState {
  x: number;
  y: number;
  /** Pixels per frame. */
  vx: number;
  vy: number;
}

export interface BallisticPath {
  /** Frame of the state the path starts from (the last point fitted). */
  ref: number;
  /** Gravity along +y, pixels per frame², and drag factor k, 1/pixel. */
  g: number;
  k: number;
  /** Robust scatter of the fitted points about the path, pixels. */
  rms: number;
  /** Position and velocity at a frame (any frame, before or after `ref`). */
  at(frame: number): BallisticState;
}

type Vec = [number, number, number, number];

function rk4(s: Vec, g: number, k: number, h: number): Vec {
  const f = (q: Vec): Vec => {
    const sp = Math.hypot(q[2], q[3]);
    return [q[2], q[3], -k * sp * q[2], g - k * sp * q[3]];
  };
  const add = (a: Vec, b: Vec, c: number): Vec => [a[0] + c * b[0], a[1] + c * b[1], a[2] + c * b[2], a[3] + c * b[3]];
  const k1 = f(s);
  const k2 = f(add(s, k1, h / 2));
  const k3 = f(add(s, k2, h / 2));
  const k4 = f(add(s, k3, h));
  return [
    s[0] + (h / 6) * (k1[0] + 2 * k2[0] + 2 * k3[0] + k4[0]),
    s[1] + (h / 6) * (k1[1] + 2 * k2[1] + 2 * k3[1] + k4[1]),
    s[2] + (h / 6) * (k1[2] + 2 * k2[2] + 2 * k3[2] + k4[2]),
    s[3] + (h / 6) * (k1[3] + 2 * k2[3] + 2 * k3[3] + k4[3]),
  ];
}

/** States at frames ref, ref + dir, …, `steps` of them, from the state at ref. */
function integrate(start: Vec, g: number, k: number, dir: 1 | -1, steps: number): Vec[] {
  const out: Vec[] = [start];
  let s = start;
  for (let i = 0; i < steps; i++) {
    s = rk4(s, g, k, dir);
    out.push(s);
  }
  return out;
}

/** Drag is fitted in thousandths of 1/pixel so the six parameters have similar sizes. */
const K_UNIT = 1e-3;

/**
 * Fits the path to the points (frame order, weights = confidence²). Needs at least 6 points
 * spanning at least 6 frames; returns null otherwise.
 * @param points the followed points of the flight (after launch), in frame order.
 * @param spanFrames only points within this many frames of the last one are fitted.
 */
export function fitBallistic(points: MotionPoint[], spanFrames = 240): BallisticPath | null {
  const last = points[points.length - 1];
  if (!last) return null;
  const pts = points.filter((p) => p.frame >= last.frame - spanFrames);
  if (pts.length < 6 || last.frame - pts[0]!.frame < 6) return null;
  const ref = last.frame;
  const span = ref - pts[0]!.frame;
  const quad = fitMotion(pts, pts.length, 2);
  // Parameters: x, y, vx, vy at ref; g; k in K_UNIT.
  let p = [quad.cx[0]!, quad.cy[0]!, quad.cx[1] ?? 0, quad.cy[1] ?? 0, 2 * (quad.cy[2] ?? 0), 0];
  const speed = Math.max(0.5, Math.hypot(p[2]!, p[3]!));
  // Weak prior: drag that would take away all the speed over the span is one standard deviation.
  const sumW = pts.reduce((s, q) => s + q.weight, 0);
  const priorW = Math.sqrt(sumW / pts.length) / (1 / (speed * Math.max(span, 1)) / K_UNIT);
  const weights = pts.map((q) => q.weight);

  const residuals = (q: number[]): number[] => {
    const states = integrate([q[0]!, q[1]!, q[2]!, q[3]!], q[4]!, Math.max(0, q[5]!) * K_UNIT, -1, span);
    const r: number[] = [];
    for (let i = 0; i < pts.length; i++) {
      const s = states[ref - pts[i]!.frame]!;
      const w = Math.sqrt(weights[i]!);
      r.push(w * (s[0] - pts[i]!.x), w * (s[1] - pts[i]!.y));
    }
    r.push(priorW * q[5]!);
    return r;
  };
  const cost = (r: number[]): number => r.reduce((s, v) => s + v * v, 0);

  let r = residuals(p);
  let c = cost(r);
  let lambda = 1e-3;
  const steps = [1e-3, 1e-3, 1e-4, 1e-4, 1e-5, 1e-3];
  for (let iter = 0; iter < 20; iter++) {
    const J: number[][] = [];
    for (let j = 0; j < 6; j++) {
      const h = steps[j]! * Math.max(1, Math.abs(p[j]!));
      const q = [...p];
      q[j]! += h;
      const rj = residuals(q);
      J.push(rj.map((v, i) => (v - r[i]!) / h));
    }
    const A = Array.from({ length: 6 }, (_, a) => Array.from({ length: 6 }, (_, b) => J[a]!.reduce((s, v, i) => s + v * J[b]![i]!, 0)));
    const b = Array.from({ length: 6 }, (_, a) => -J[a]!.reduce((s, v, i) => s + v * r[i]!, 0));
    let improved = false;
    for (let tries = 0; tries < 8 && !improved; tries++) {
      const damped = A.map((row, a) => row.map((v, bb) => (a === bb ? v * (1 + lambda) + 1e-12 : v)));
      const delta = solve(damped, [...b]);
      const q = p.map((v, j) => v + delta[j]!);
      q[5] = Math.max(0, q[5]!);
      const rq = residuals(q);
      const cq = cost(rq);
      if (Number.isFinite(cq) && cq < c) {
        const gain = c - cq;
        p = q;
        r = rq;
        c = cq;
        lambda = Math.max(1e-9, lambda / 3);
        improved = true;
        if (gain < 1e-9 * (1 + c)) iter = Infinity;
      } else {
        lambda *= 4;
      }
    }
    if (!improved) break;
  }

  const dists: number[] = [];
  for (let i = 0; i < pts.length; i++) dists.push(Math.hypot(r[2 * i]!, r[2 * i + 1]!) / Math.max(1e-6, Math.sqrt(weights[i]!)));
  dists.sort((a, b) => a - b);
  const g = p[4]!;
  const k = Math.max(0, p[5]!) * K_UNIT;
  const start: Vec = [p[0]!, p[1]!, p[2]!, p[3]!];
  const ahead: Vec[] = [start];
  const behind: Vec[] = [start];
  return {
    ref,
    g,
    k,
    rms: 1.4826 * dists[dists.length >> 1]!,
    at(frame: number): BallisticState {
      const u = Math.round(frame - ref);
      const table = u >= 0 ? ahead : behind;
      const n = Math.abs(u);
      while (table.length <= n) table.push(rk4(table[table.length - 1]!, g, k, u >= 0 ? 1 : -1));
      const s = table[n]!;
      return { x: s[0], y: s[1], vx: s[2], vy: s[3] };
    },
  };
}
