/**
 * Live preview of a calibration while the coach places its points, before the server stores it. The server's
 * calibration is the one that counts; these figures only let the coach see what the points will give.
 *
 * Model: the flight plane faces the camera, so one scale (metres per pixel) holds over the plane and a level
 * line fixes the horizontal — the similarity case of a plane-to-image map (Hartley & Zisserman, "Multiple View
 * Geometry in Computer Vision", 2nd ed., 2004, §2.4.2 on similarity transformations and §8.1 on a camera's
 * action on a plane: a plane facing the camera images with one uniform scale).
 */
import type { Vec2 } from './viewport';

export interface ScalePreview {
  /** Length of the reference segment in image pixels. */
  lengthPx: number;
  /** Metres per image pixel. */
  metresPerPixel: number;
}

/** Why a preview cannot be computed, worded for the coach. */
export type PreviewProblem = { problem: string };

/** Two points and the known distance between them (m) → metres per pixel. */
export function scalePreview(a: Vec2, b: Vec2, distanceM: number): ScalePreview | PreviewProblem {
  const lengthPx = Math.hypot(b.x - a.x, b.y - a.y);
  if (!(lengthPx >= 1)) return { problem: 'The two scale points are on top of each other: place them at the two ends of the known distance.' };
  if (!Number.isFinite(distanceM) || distanceM <= 0) return { problem: 'Enter the known distance between the two points (more than 0).' };
  return { lengthPx, metresPerPixel: distanceM / lengthPx };
}

/**
 * Angle of a level line from the image x axis, in degrees, counter-clockwise as seen on screen (so a line that
 * rises to the right is positive). The line's direction does not matter: the result is folded to (−90°, 90°].
 */
export function levelAngleDeg(a: Vec2, b: Vec2): number | PreviewProblem {
  const dx = b.x - a.x;
  const dy = b.y - a.y;
  if (Math.hypot(dx, dy) < 1) return { problem: 'The two level points are on top of each other: place them along something level, far apart.' };
  // Image y points down, so the on-screen counter-clockwise angle is atan2(−dy, dx).
  let deg = (Math.atan2(-dy, dx) * 180) / Math.PI;
  if (deg > 90) deg -= 180;
  if (deg <= -90) deg += 180;
  // Note: atan2(−0, x) is −0, which would print as "−0.0°"; adding 0 turns it into +0.
  return deg + 0;
}

/** Median of the traced radii (pixels), ignoring points without one; null when none has a radius. */
export function medianRadius(radii: readonly (number | null | undefined)[]): number | null {
  const r = radii.filter((v): v is number => typeof v === 'number' && v > 0).sort((a, b) => a - b);
  if (r.length === 0) return null;
  const mid = Math.floor(r.length / 2);
  return r.length % 2 === 1 ? r[mid] : (r[mid - 1] + r[mid]) / 2;
}

export function isProblem(v: unknown): v is PreviewProblem {
  return typeof v === 'object' && v !== null && 'problem' in v;
}
