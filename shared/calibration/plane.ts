/**
 * The plane calibration: a homography from the image to the plane of flight, fitted to the four marked
 * corners of a rectangle of known size in that plane (the posts and bar of a goal, four cones). It holds
 * for a camera at any angle to the plane, where the two-point scale needs the camera square to it.
 *
 * Method: the direct linear transformation with Hartley's normalisation (Hartley & Zisserman, "Multiple
 * View Geometry in Computer Vision", 2nd ed., 2004, §4.1 and §4.4, algorithm 4.2): each side's points are
 * moved to their centroid and scaled to a mean distance of √2, the eight equations of four
 * correspondences are solved for the homography with h₃₃ = 1, and the result is taken back through
 * both normalisations. The 8 × 8 system is solved by ml-matrix.
 *
 * Corners are given in the order bottom left, bottom right, top right, top left as seen in the picture;
 * the rectangle's coordinates are metres with x along the bottom edge (corner 1 → corner 2) and y up it.
 */
import { Matrix, solve } from 'ml-matrix';

export interface PlanePoint {
  xPx: number;
  yPx: number;
}

/** A 3 × 3 matrix, row-major, acting on homogeneous column vectors. */
export type Mat3 = [number, number, number, number, number, number, number, number, number];

/** The order in which the coach marks the corners, for messages. */
export const CORNER_ORDER_WORDS = 'bottom left, bottom right, top right, top left';

/**
 * A triangle of three corners counts as flat when its height over its longest side is under this share of
 * that side (or under one pixel): the homography would then stretch pixel errors without bound.
 */
const COLLINEAR_SHARE = 0.01;

/** What is wrong with four corners as a rectangle's outline, worded for the coach; null when they can be used. */
export function cornerProblem(corners: readonly PlanePoint[]): string | null {
  if (corners.length !== 4) return `Mark exactly four corners (${CORNER_ORDER_WORDS}).`;
  for (const [i, j, k] of [[0, 1, 2], [0, 1, 3], [0, 2, 3], [1, 2, 3]] as const) {
    const a = corners[i]!, b = corners[j]!, c = corners[k]!;
    const longest = Math.max(dist(a, b), dist(b, c), dist(a, c));
    const height = longest > 0 ? Math.abs(cross(a, b, c)) / longest : 0;
    if (height < Math.max(1, COLLINEAR_SHARE * longest)) {
      return `Corners ${i + 1}, ${j + 1} and ${k + 1} lie on one line, so they cannot be three corners of a rectangle: move them onto the rectangle's corners (${CORNER_ORDER_WORDS}).`;
    }
  }
  const turns = [0, 1, 2, 3].map((i) => Math.sign(cross(corners[i]!, corners[(i + 1) % 4]!, corners[(i + 2) % 4]!)));
  if (!turns.every((s) => s === turns[0])) {
    return `The outline of the four corners crosses itself or bends inwards, so they are not in order round the rectangle: click them in turn, ${CORNER_ORDER_WORDS}.`;
  }
  const bottom = (corners[0]!.yPx + corners[1]!.yPx) / 2;
  const top = (corners[2]!.yPx + corners[3]!.yPx) / 2;
  if (bottom <= top) {
    return `Corners 1 and 2 must be the bottom edge of the rectangle, but they are above corners 3 and 4: click ${CORNER_ORDER_WORDS}.`;
  }
  // Image y runs down, so bottom left → bottom right → top right turns clockwise in these coordinates.
  if (turns[0]! > 0) return `The corners go round the wrong way (right to left along the bottom): click ${CORNER_ORDER_WORDS}.`;
  return null;
}

/**
 * Homography from image pixels to the rectangle's metres.
 * @param corners the four corners in the picture, pixels, in {@link CORNER_ORDER_WORDS} order
 * @param widthM length of the bottom edge, m (> 0)
 * @param heightM length of the side edges, m (> 0)
 * @returns H with (X, Y, 1)ᵀ ∝ H·(x, y, 1)ᵀ, scaled so that h₃₃ = 1
 * @throws Error when the corners cannot be used ({@link cornerProblem}) or the size is not above 0
 */
export function planeHomography(corners: readonly PlanePoint[], widthM: number, heightM: number): Mat3 {
  const problem = cornerProblem(corners);
  if (problem) throw new Error(problem);
  if (!(widthM > 0) || !(heightM > 0)) throw new Error('The rectangle needs a width and a height above 0 m.');
  const plane = [
    { xPx: 0, yPx: 0 },
    { xPx: widthM, yPx: 0 },
    { xPx: widthM, yPx: heightM },
    { xPx: 0, yPx: heightM },
  ];
  return fitHomography(corners, plane);
}

/** Exact homography taking four points `from` onto four points `to`, normalised DLT (see the file's head). */
export function fitHomography(from: readonly PlanePoint[], to: readonly PlanePoint[]): Mat3 {
  const tFrom = normalising(from);
  const tTo = normalising(to);
  const a = from.map((p) => apply(tFrom, p));
  const b = to.map((p) => apply(tTo, p));
  const rows: number[][] = [];
  const rhs: number[] = [];
  for (let i = 0; i < 4; i++) {
    const { xPx: x, yPx: y } = a[i]!;
    const { xPx: u, yPx: v } = b[i]!;
    rows.push([x, y, 1, 0, 0, 0, -u * x, -u * y]);
    rhs.push(u);
    rows.push([0, 0, 0, x, y, 1, -v * x, -v * y]);
    rhs.push(v);
  }
  const h = solve(new Matrix(rows), Matrix.columnVector(rhs)).to1DArray();
  const normalised: Mat3 = [h[0]!, h[1]!, h[2]!, h[3]!, h[4]!, h[5]!, h[6]!, h[7]!, 1];
  const out = multiply(invert(tTo), multiply(normalised, tFrom));
  return out.map((v) => v / out[8]) as Mat3;
}

/** Applies a homography to a point. */
export function apply(m: Mat3, p: PlanePoint): PlanePoint {
  const w = m[6] * p.xPx + m[7] * p.yPx + m[8];
  return { xPx: (m[0] * p.xPx + m[1] * p.yPx + m[2]) / w, yPx: (m[3] * p.xPx + m[4] * p.yPx + m[5]) / w };
}

/**
 * The derivative of the map at a point: [[∂X/∂x, ∂X/∂y], [∂Y/∂x, ∂Y/∂y]] (quotient rule on the homogeneous form).
 */
export function jacobian(m: Mat3, p: PlanePoint): [[number, number], [number, number]] {
  const w = m[6] * p.xPx + m[7] * p.yPx + m[8];
  const q = apply(m, p);
  return [
    [(m[0] - q.xPx * m[6]) / w, (m[1] - q.xPx * m[7]) / w],
    [(m[3] - q.yPx * m[6]) / w, (m[4] - q.yPx * m[7]) / w],
  ];
}

export function multiply(a: Mat3, b: Mat3): Mat3 {
  const out = new Array<number>(9);
  for (let r = 0; r < 3; r++) {
    for (let c = 0; c < 3; c++) out[r * 3 + c] = a[r * 3]! * b[c]! + a[r * 3 + 1]! * b[3 + c]! + a[r * 3 + 2]! * b[6 + c]!;
  }
  return out as Mat3;
}

/** Inverse by the adjugate; a homography of four usable corners is never singular. */
export function invert(m: Mat3): Mat3 {
  const [a, b, c, d, e, f, g, h, i] = m;
  const A = e * i - f * h, B = -(d * i - f * g), C = d * h - e * g;
  const det = a * A + b * B + c * C;
  if (!(Math.abs(det) > 0)) throw new Error('The plane map cannot be inverted.');
  const adj: Mat3 = [A, -(b * i - c * h), b * f - c * e, B, a * i - c * g, -(a * f - c * d), C, -(a * h - b * g), a * e - b * d];
  return adj.map((v) => v / det) as Mat3;
}

/** Similarity moving points to their centroid at a mean distance of √2 (Hartley's normalisation). */
function normalising(points: readonly PlanePoint[]): Mat3 {
  const cx = points.reduce((s, p) => s + p.xPx, 0) / points.length;
  const cy = points.reduce((s, p) => s + p.yPx, 0) / points.length;
  const mean = points.reduce((s, p) => s + Math.hypot(p.xPx - cx, p.yPx - cy), 0) / points.length;
  const k = Math.SQRT2 / mean;
  return [k, 0, -k * cx, 0, k, -k * cy, 0, 0, 1];
}

function dist(a: PlanePoint, b: PlanePoint): number {
  return Math.hypot(b.xPx - a.xPx, b.yPx - a.yPx);
}

/** z of (b − a) × (c − b): the turn at b. */
function cross(a: PlanePoint, b: PlanePoint, c: PlanePoint): number {
  return (b.xPx - a.xPx) * (c.yPx - b.yPx) - (b.yPx - a.yPx) * (c.xPx - b.xPx);
}
