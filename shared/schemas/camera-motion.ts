/**
 * The camera's motion during a flight as auto-follow found it from the background, and the coach's
 * "camera was still" on a clip. Pixels are the clip's (top-left origin, y down).
 */
import { z } from 'zod';

export const CAMERA_MODES = ['still', 'moving'] as const;
export type CameraMode = (typeof CAMERA_MODES)[number];

export const cameraModeSchema = z.enum(CAMERA_MODES, {
  error: 'camera must be "still" (a tripod: no motion is estimated) or "moving" (the motion is estimated from the background).',
});

/**
 * Below these the camera counts as still: a steady hand shakes the picture by a pixel or two, which the
 * follower's own noise already covers; above them the track had to be carried into the reference frame.
 */
export const CAMERA_MOVED_PAN_PX = 3;
export const CAMERA_MOVED_ROLL_DEG = 0.3;

export function cameraMoved(maxPanPx: number, maxRollDeg: number): boolean {
  return maxPanPx > CAMERA_MOVED_PAN_PX || Math.abs(maxRollDeg) > CAMERA_MOVED_ROLL_DEG;
}

/** The fit warning of a flight filmed with a moving camera (the report and the flight's warnings show it). */
export const MOVING_CAMERA_WARNING = {
  code: 'MOVING_CAMERA',
  message:
    'Filmed with a moving camera: camera motion was estimated from the background. The figures carry the extra uncertainty of the motion estimate; a tripod or a still hand gives the cleanest measurement.',
} as const;

/** One frame's camera motion relative to the reference frame: where the centre of the picture points, and the roll. */
export interface CameraFrameMotion {
  frame: number;
  /** The picture centre of this frame in the reference frame's pixels, minus the centre: + x the camera turned right, + y down. */
  panXPx: number;
  panYPx: number;
  /** Roll relative to the reference frame, degrees, + clockwise on screen. */
  rollDeg: number;
}

export interface CameraMotion {
  flightId: number;
  /** The coach marked the clip as filmed from a still camera: auto-follow does not estimate any motion. */
  cameraStill: boolean;
  /** Whether the latest auto-follow estimated the motion (false: never followed, or followed as still). */
  estimated: boolean;
  /** The frame whose pixels the track is expressed in (the frame the calibration was marked on). */
  referenceFrame: number | null;
  /** The motion found is above the thresholds: the flight's report says it was filmed with a moving camera. */
  moved: boolean;
  maxPanPx: number;
  maxRollDeg: number;
  frames: CameraFrameMotion[];
}
