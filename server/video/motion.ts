/**
 * The follower's path predictor: weighted least-squares polynomials x(f), y(f) in the frame number
 * over the latest points — constant acceleration (degree 2) once there are enough points, constant
 * velocity (degree 1) before. In the picture a flight under gravity and modest drag is close to a
 * parabola over a dozen frames, which is what a constant-acceleration Kalman filter would also
 * assume; the explicit fit is simpler to reason about and needs no tuning of process noise.
 * Least squares by the normal equations (Björck, Numerical Methods for Least Squares Problems,
 * SIAM, 1996, ch. 2), well conditioned here because the frame variable is centred on the last point
 * and the degree is at most 2.
 */

export interface MotionPoint {
  frame: number;
  x: number;
  y: number;
  /** Weight of the point in the fit (its confidence). */
  weight: number;
}

export interface MotionFit {
  /** Frame the polynomial variable is measured from. */
  ref: number;
  /** Coefficients, lowest power first, for x and for y. */
  cx: number[];
  cy: number[];
  /**
   * Robust scatter of the points about the fit, pixels: 1.4826 × the median distance, so one bad
   * point among a dozen does not widen the search (Rousseeuw & Croux, JASA 88 (1993) 1273).
   * 0 when the fit is exact.
   */
  rms: number;
}

/** Fits the last `window` points: degree 2 from four points, 1 from two, 0 from one (never above maxDegree). */
export function fitMotion(points: MotionPoint[], window: number, maxDegree: 0 | 1 | 2): MotionFit {
  const pts = points.slice(-window);
  const ref = pts[pts.length - 1]!.frame;
  const degree = Math.min(maxDegree, pts.length >= 4 ? 2 : pts.length >= 2 ? 1 : 0);
  const m = degree + 1;
  const A = Array.from({ length: m }, () => new Array<number>(m).fill(0));
  const bx = new Array<number>(m).fill(0);
  const by = new Array<number>(m).fill(0);
  for (const p of pts) {
    const u = p.frame - ref;
    const pow = [1, u, u * u];
    for (let i = 0; i < m; i++) {
      bx[i]! += p.weight * pow[i]! * p.x;
      by[i]! += p.weight * pow[i]! * p.y;
      for (let j = 0; j < m; j++) A[i]![j]! += p.weight * pow[i]! * pow[j]!;
    }
  }
  const cx = solve(A.map((r) => [...r]), bx);
  const cy = solve(A.map((r) => [...r]), by);
  const dists = pts.map((p) => {
    const u = p.frame - ref;
    return Math.hypot(evalPoly(cx, u) - p.x, evalPoly(cy, u) - p.y);
  });
  dists.sort((a, b) => a - b);
  const rms = pts.length > m ? 1.4826 * dists[dists.length >> 1]! : 0;
  return { ref, cx, cy, rms };
}

export function evalPoly(c: number[], u: number): number {
  let v = 0;
  for (let i = c.length - 1; i >= 0; i--) v = v * u + c[i]!;
  return v;
}

/** Position predicted by a fit at `frame`. */
export function predictAt(fit: MotionFit, frame: number): { x: number; y: number } {
  const u = frame - fit.ref;
  return { x: evalPoly(fit.cx, u), y: evalPoly(fit.cy, u) };
}

/** Velocity (pixels per frame) of a fit at `frame`. */
export function velocityAt(fit: MotionFit, frame: number): { vx: number; vy: number } {
  const u = frame - fit.ref;
  const d = (c: number[]): number => (c[1] ?? 0) + 2 * (c[2] ?? 0) * u;
  return { vx: d(fit.cx), vy: d(fit.cy) };
}

/** Gaussian elimination with partial pivoting; a singular system falls back to the weighted mean. */
export function solve(A: number[][], b: number[]): number[] {
  const m = b.length;
  const x = [...b];
  for (let col = 0; col < m; col++) {
    let piv = col;
    for (let r = col + 1; r < m; r++) if (Math.abs(A[r]![col]!) > Math.abs(A[piv]![col]!)) piv = r;
    if (Math.abs(A[piv]![col]!) < 1e-12) {
      const mean = A[0]![0]! > 0 ? b[0]! / A[0]![0]! : 0;
      return [mean, ...new Array<number>(m - 1).fill(0)];
    }
    [A[col], A[piv]] = [A[piv]!, A[col]!];
    [x[col], x[piv]] = [x[piv]!, x[col]!];
    for (let r = col + 1; r < m; r++) {
      const f = A[r]![col]! / A[col]![col]!;
      for (let c = col; c < m; c++) A[r]![c]! -= f * A[col]![c]!;
      x[r]! -= f * x[col]!;
    }
  }
  for (let r = m - 1; r >= 0; r--) {
    let s = x[r]!;
    for (let c = r + 1; c < m; c++) s -= A[r]![c]! * x[c]!;
    x[r] = s / A[r]![r]!;
  }
  return x;
}
