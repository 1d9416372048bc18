/**
 * Calibration geometry: pixels → metres in the plane of flight.
 *
 * Method (common practice in planar video measurement): the scale is the known distance over the
 * pixel distance between two points in the plane of flight; a level line gives the horizontal; the
 * origin is a point on the ground under the release, or, when the ground is outside the picture, a point
 * under the release on a marked line a known height y₀ above it. With s = metres per pixel, h = the
 * unit vector along the level line pointing the way the ball flies, u = the unit perpendicular
 * pointing up the image, a pixel p maps to x = s·((p − o)·h), y = y₀ + s·((p − o)·u). Points may lie
 * off the picture, within {@link OFF_PICTURE_LIMIT}. Assumes square pixels and a camera
 * square to the plane of flight.
 *
 * Pure TypeScript, so the Trace screen previews exactly what the server stores.
 */
import type { BallCheck, CalibrationFrame, CalibrationInput, PixelPoint } from '../schemas/calibration';

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
  // Tilt of the level line as drawn on screen (y down), folded into (−90°, 90°].
  const rightward = hx >= 0 ? { x: hx, y: hy } : { x: -hx, y: -hy };
  const levelAngleDeg = (Math.atan2(-rightward.y, rightward.x) * 180) / Math.PI;
  return {
    metresPerPixel: distanceM / pixels,
    levelAngleDeg,
    h: { x: hx, y: hy },
    u: { x: ux, y: uy },
    origin: { xPx: input.origin.xPx, yPx: input.origin.yPx },
    originHeightM: input.groundOffsetM ?? 0,
  };
}

/** Maps an image pixel (x right, y down) to metres: x along the flight, y up from the ground at the origin. */
export function pixelToMetres(frame: CalibrationFrame, p: PixelPoint): { xM: number; yM: number } {
  const dx = p.xPx - frame.origin.xPx;
  const dy = p.yPx - frame.origin.yPx;
  return {
    xM: frame.metresPerPixel * (dx * frame.h.x + dy * frame.h.y),
    yM: (frame.originHeightM ?? 0) + frame.metresPerPixel * (dx * frame.u.x + dy * frame.u.y),
  };
}

/** The inverse of `pixelToMetres` (h and u are orthonormal, so the inverse is the transpose). */
export function metresToPixel(frame: CalibrationFrame, m: { xM: number; yM: number }): PixelPoint {
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
