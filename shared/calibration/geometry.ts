/**
 * Calibration geometry: pixels → metres in the plane of flight, by one of two methods.
 *
 * Two-point scale (common practice in planar video measurement): the scale is the known distance over the
 * pixel distance between two points in the plane of flight; a level line gives the horizontal; the
 * origin is a point on the ground under the release, or, when the ground is outside the picture, a point
 * under the release on a marked line a known height y₀ above it. With s = metres per pixel, h = the
 * unit vector along the level line pointing the way the ball flies, u = the unit perpendicular
 * pointing up the image, a pixel p maps to x = s·((p − o)·h), y = y₀ + s·((p − o)·u). Points may lie
 * off the picture, within {@link OFF_PICTURE_LIMIT}. Assumes square pixels and a camera
 * square to the plane of flight.
 *
 * Plane (four points), for a camera at an angle to the plane of flight: a homography H from the image to the
 * rectangle's metres (`plane.ts`); with O = H(origin) and σ = +1 for a flight to the right, −1 to the left,
 * x = σ·(X(p) − X(O)), y = y₀ + Y(p) − Y(O), composed into one 3 × 3 map and its inverse.
 *
 * Pure TypeScript, so the Trace screen previews exactly what the server stores.
 */
import type { BallCheck, CalibrationFrame, CalibrationInput, PixelPoint, PlaneCalibrationInput, ScaleCalibrationInput } from '../schemas/calibration';
import { apply, invert, jacobian, multiply, planeHomography, type Mat3 } from './plane';

/**
 * How far outside the picture a calibration point may lie, in picture widths (left and right) and heights
 * (above and below): a coach extends a line or a known distance past the edge by eye; much farther, the
 * point cannot be placed to a useful accuracy (an error of a few pixels there tilts or stretches the frame).
 */
export const OFF_PICTURE_LIMIT = 1;

/** Apparent over catalogue ball diameter outside 1 ± this is reported as not ok (a blurred ball looks bigger). */
export const BALL_CHECK_TOLERANCE = 0.15;

/**
 * Builds the pixel → metre frame of a calibration.
 * @param input validated calibration (scale points distinct, distance > 0 m)
 * @returns metres per pixel (m/px), the level tilt (degrees) and the unit vectors of the mapping
 * @throws Error when the scale or level points coincide (the schema refuses those first)
 */
export function computeCalibration(input: CalibrationInput): CalibrationFrame {
  return input.method === 'plane' ? planeFrame(input) : scaleFrame(input);
}

function scaleFrame(input: ScaleCalibrationInput): CalibrationFrame {
  const { a, b, distanceM } = input.scale;
  const pixels = Math.hypot(b.xPx - a.xPx, b.yPx - a.yPx);
  if (!(pixels > 0) || !(distanceM > 0)) throw new Error('Calibration needs two distinct scale points and a distance above 0 m.');
  let hx = 1;
  let hy = 0;
  if (input.level) {
    const dx = input.level.b.xPx - input.level.a.xPx;
    const dy = input.level.b.yPx - input.level.a.yPx;
    const len = Math.hypot(dx, dy);
    if (!(len > 0)) throw new Error('The level line needs two distinct points.');
    hx = dx / len;
    hy = dy / len;
  }
  // Orient h with the flight: rightwards means a positive image x component.
  const wantRight = input.direction === 'right';
  if ((hx < 0 && wantRight) || (hx > 0 && !wantRight) || (hx === 0 && hy > 0)) {
    hx = -hx;
    hy = -hy;
  }
  // Of the two perpendiculars pick the one pointing up the image (negative y, since image y runs down).
  let ux = hy;
  let uy = -hx;
  if (uy > 0) {
    ux = -ux;
    uy = -uy;
  }
  return {
    method: 'scale',
    metresPerPixel: distanceM / pixels,
    levelAngleDeg: screenAngleDeg(hx, hy),
    h: { x: hx, y: hy },
    u: { x: ux, y: uy },
    origin: { xPx: input.origin.xPx, yPx: input.origin.yPx },
    originHeightM: input.groundOffsetM ?? 0,
    homography: null,
  };
}

/** Tilt of an image direction as drawn on screen (y down), counter-clockwise positive, folded into (−90°, 90°]. */
function screenAngleDeg(hx: number, hy: number): number {
  const rightward = hx >= 0 ? { x: hx, y: hy } : { x: -hx, y: -hy };
  return (Math.atan2(-rightward.y, rightward.x) * 180) / Math.PI;
}

/**
 * The plane method's frame. `metresPerPixel`, `h`, `u` and `levelAngleDeg` describe the map near the origin
 * (where the ball is released, and its size is checked): the local scale is √|det J| of the map's derivative
 * J there, h and u the image directions of the flight's x and y there.
 */
function planeFrame(input: PlaneCalibrationInput): CalibrationFrame {
  const toRect = planeHomography(input.plane.corners, input.plane.widthM, input.plane.heightM);
  const o = apply(toRect, input.origin);
  const sign = input.direction === 'right' ? 1 : -1;
  const heightM = input.groundOffsetM ?? 0;
  const shift: Mat3 = [sign, 0, -sign * o.xPx, 0, 1, heightM - o.yPx, 0, 0, 1];
  const toMetres = multiply(shift, toRect);
  const toPixel = invert(toMetres);
  const [[a, b], [c, d]] = jacobian(toMetres, input.origin);
  const det = a * d - b * c;
  // Columns of J⁻¹: the pixel steps that move one metre along x and along y.
  const hx = d / det, hy = -c / det;
  const ux = -b / det, uy = a / det;
  const hl = Math.hypot(hx, hy), ul = Math.hypot(ux, uy);
  return {
    method: 'plane',
    metresPerPixel: Math.sqrt(Math.abs(det)),
    levelAngleDeg: screenAngleDeg(hx / hl, hy / hl),
    h: { x: hx / hl, y: hy / hl },
    u: { x: ux / ul, y: uy / ul },
    origin: { xPx: input.origin.xPx, yPx: input.origin.yPx },
    originHeightM: heightM,
    homography: { toMetres, toPixel },
  };
}

/** Maps an image pixel (x right, y down) to metres: x along the flight, y up from the ground at the origin. */
export function pixelToMetres(frame: CalibrationFrame, p: PixelPoint): { xM: number; yM: number } {
  if (frame.homography) {
    const m = apply(frame.homography.toMetres as Mat3, p);
    return { xM: m.xPx, yM: m.yPx };
  }
  const dx = p.xPx - frame.origin.xPx;
  const dy = p.yPx - frame.origin.yPx;
  return {
    xM: frame.metresPerPixel * (dx * frame.h.x + dy * frame.h.y),
    yM: (frame.originHeightM ?? 0) + frame.metresPerPixel * (dx * frame.u.x + dy * frame.u.y),
  };
}

/** The inverse of `pixelToMetres` (for the scale, h and u are orthonormal, so the inverse is the transpose). */
export function metresToPixel(frame: CalibrationFrame, m: { xM: number; yM: number }): PixelPoint {
  if (frame.homography) return apply(frame.homography.toPixel as Mat3, { xPx: m.xM, yPx: m.yM });
  const x = m.xM / frame.metresPerPixel;
  const y = (m.yM - (frame.originHeightM ?? 0)) / frame.metresPerPixel;
  return {
    xPx: frame.origin.xPx + x * frame.h.x + y * frame.u.x,
    yPx: frame.origin.yPx + x * frame.h.y + y * frame.u.y,
  };
}

/**
 * The ball-size cross-check: apparent diameter in metres against the catalogue diameter.
 * @param metresPerPixel scale, m/px
 * @param diameterPx apparent ball diameter, px
 * @param catalogueDiameterM nominal diameter from the ball catalogue, m
 */
export function ballCheck(ballId: string, metresPerPixel: number, diameterPx: number, catalogueDiameterM: number): BallCheck {
  const apparentDiameterM = diameterPx * metresPerPixel;
  const ratio = apparentDiameterM / catalogueDiameterM;
  return { ballId, apparentDiameterM, catalogueDiameterM, ratio, ok: Math.abs(ratio - 1) <= BALL_CHECK_TOLERANCE };
}
