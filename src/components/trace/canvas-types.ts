import type { Vec2 } from './viewport';

/**
 * What a press on the frame viewer does: mark the ball, draw the scale or level line, click the plane's corners,
 * set the origin, or nothing.
 */
export type CanvasMode = 'mark' | 'scale' | 'level' | 'plane' | 'origin' | 'view';

/** A draggable calibration handle; `plane.N` is the plane's corner N (0–3). */
export type HandleKey = 'scale.a' | 'scale.b' | 'level.a' | 'level.b' | 'origin' | `plane.${0 | 1 | 2 | 3}`;

/** Calibration drawn over the frame, in image pixels. */
export interface CalibrationOverlay {
  scale?: { a: Vec2; b: Vec2 } | null;
  level?: { a: Vec2; b: Vec2 } | null;
  origin?: Vec2 | null;
  /** The plane's corners as clicked so far (up to four); the outline closes at four. */
  plane?: Vec2[] | null;
  direction?: 'right' | 'left';
}
