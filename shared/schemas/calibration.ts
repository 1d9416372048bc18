/**
 * Calibration of a clip as a request body and as the API answers it: two scale points and the
 * known distance between them, an optional level line, the origin, the direction of play and an
 * optional ball-size cross-check. The pixel → metre mapping is in `shared/calibration/geometry.ts`.
 */
import { z } from 'zod';

const coord = (what: string) =>
  z.number({ error: `${what} must be a number of pixels.` }).refine(Number.isFinite, { error: `${what} must be a finite number.` });

export const pixelPointSchema = z.object({ xPx: coord('x'), yPx: coord('y') });
export type PixelPoint = z.infer<typeof pixelPointSchema>;

export const CALIBRATION_DIRECTIONS = ['right', 'left'] as const;
export type CalibrationDirection = (typeof CALIBRATION_DIRECTIONS)[number];

const samePoint = (a: PixelPoint, b: PixelPoint) => Math.hypot(a.xPx - b.xPx, a.yPx - b.yPx) < 1e-9;

export const calibrationInputSchema = z
  .object({
    scale: z.object({
      a: pixelPointSchema,
      b: pixelPointSchema,
      distanceM: z
        .number({ error: 'The known distance must be a number of metres.' })
        .refine(Number.isFinite, { error: 'The known distance must be a finite number of metres.' })
        .positive({ error: 'The known distance must be more than 0 m.' })
        .max(1000, { error: 'The known distance must be at most 1000 m.' }),
    }),
    level: z.object({ a: pixelPointSchema, b: pixelPointSchema }).nullable().optional(),
    origin: pixelPointSchema,
    /**
     * Height of the origin above the ground (m) when the ground is not in the picture: the origin is then
     * a point on a marked line under the release, and heights count from the ground this far below it.
     */
    groundOffsetM: z
      .number({ error: 'The height of the marked line above the ground must be a number of metres.' })
      .refine(Number.isFinite, { error: 'The height of the marked line above the ground must be a finite number of metres.' })
      .min(0, { error: 'The marked line cannot be below the ground: mark the ground itself, or a line above it and give its height.' })
      .max(50, { error: 'The marked line must be at most 50 m above the ground: give its height in metres.' })
      .nullable()
      .optional(),
    /** The frame the calibration was marked on: with a moving camera the track is expressed in its pixels. */
    frame: z.number({ error: 'The calibration frame must be a frame number.' }).int({ error: 'The calibration frame must be a whole number.' }).min(0, { error: 'The calibration frame must be 0 or more.' }).nullable().optional(),
    direction: z.enum(CALIBRATION_DIRECTIONS, { error: 'Direction must be "right" or "left": the way the ball flies across the image.' }),
    ball: z
      .object({
        ballId: z.string().trim().min(1, { error: 'Pick the ball for the size cross-check.' }).max(64),
        diameterPx: z.number().positive({ error: "The ball's apparent diameter must be more than 0 pixels." }),
      })
      .nullable()
      .optional(),
  })
  .superRefine((value, ctx) => {
    if (samePoint(value.scale.a, value.scale.b)) {
      ctx.addIssue({
        code: 'custom',
        path: ['scale', 'b'],
        message: 'The two scale points are the same pixel: put them at the two ends of the known distance.',
      });
    }
    if (value.level && samePoint(value.level.a, value.level.b)) {
      ctx.addIssue({
        code: 'custom',
        path: ['level', 'b'],
        message: 'The two ends of the level line are the same pixel: put them apart along something horizontal.',
      });
    }
  });
export type CalibrationInput = z.infer<typeof calibrationInputSchema>;

export interface BallCheck {
  ballId: string;
  apparentDiameterM: number;
  catalogueDiameterM: number;
  /** Apparent over catalogue diameter: 1 when the scale and the ball agree. */
  ratio: number;
  ok: boolean;
}

export interface CalibrationFrame {
  metresPerPixel: number;
  /** Tilt of the level line from the image horizontal in degrees, positive counter-clockwise as seen on screen. */
  levelAngleDeg: number;
  /** Unit vector (image pixels, y down) along the flight direction. */
  h: { x: number; y: number };
  /** Unit vector (image pixels, y down) pointing up. */
  u: { x: number; y: number };
  origin: PixelPoint;
  /** Height of the origin above the ground (m): 0 when the origin is on the ground. */
  originHeightM: number;
}

export interface Calibration extends CalibrationInput, CalibrationFrame {
  id: number;
  clipId: number;
  ballCheck: BallCheck | null;
  updatedAt: string;
}
