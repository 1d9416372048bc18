import type { Vec2 } from './viewport';

/** What a press on the frame viewer does: mark the ball, draw the scale or level line, set the origin, or nothing. */
export type CanvasMode = 'mark' | 'scale' | 'level' | 'origin' | 'view';

/** A draggable calibration handle. */
export type HandleKey = 'scale.a' | 'scale.b' | 'level.a' | 'level.b' | 'origin';

/** Calibration drawn over the frame, in image pixels. */
export interface CalibrationOverlay {
  scale?: { a: Vec2; b: Vec2 } | null;
  level?: { a: Vec2; b: Vec2 } | null;
  origin?: Vec2 | null;
  direction?: 'right' | 'left';
}
