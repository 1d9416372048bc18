/**
 * Calibration of a clip as a request body and as the API answers it: either two scale points and the
 * known distance between them with an optional level line (`method: 'scale'`), or the four corners of a
 * rectangle of known size in the plane of flight (`method: 'plane'`); then the origin, the direction of
 * play and an optional ball-size cross-check. The pixel → metre mapping is in `shared/calibration/geometry.ts`.
 */
import { z } from 'zod';
import { CORNER_ORDER_WORDS, cornerProblem } from '../calibration/plane';

const coord = (what: string) =>
  z.number({ error: `${what} must be a number of pixels.` }).refine(Number.isFinite, { error: `${what} must be a finite number.` });

export const pixelPointSchema = z.object({ xPx: coord('x'), yPx: coord('y') });
export type PixelPoint = z.infer<typeof pixelPointSchema>;

export const CALIBRATION_DIRECTIONS = ['right', 'left'] as const;
export type CalibrationDirection = (typeof CALIBRATION_DIRECTIONS)[number];

const samePoint = (a: PixelPoint, b: PixelPoint) => Math.hypot(a.xPx - b.xPx, a.yPx - b.yPx) < 1e-9;

export const CALIBRATION_METHODS = ['scale', 'plane'] as const;
export type CalibrationMethod = (typeof CALIBRATION_METHODS)[number];

/** The parts both methods share: the origin under the release, its height, the direction of play and the ball check. */
const commonFields = {
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
};

/** The quick method: two points a known distance apart, for a camera square to the plane of flight. */
const scaleCalibrationSchema = z
  .object({
    method: z.literal('scale'),
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
    ...commonFields,
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

const rectangleSide = (side: string, edge: string) =>
  z
    .number({ error: `The rectangle's ${side} must be a number of metres.` })
    .refine(Number.isFinite, { error: `The rectangle's ${side} must be a finite number of metres.` })
    .positive({ error: `The rectangle's ${side} must be more than 0 m: measure ${edge} and enter it.` })
    .max(1000, { error: `The rectangle's ${side} must be at most 1000 m.` });

/**
 * The plane method: four corners of a rectangle of known size standing in the plane of flight, for a camera at
 * an angle to it (the homography is in `shared/calibration/plane.ts`).
 */
const planeCalibrationSchema = z
  .object({
    method: z.literal('plane'),
    plane: z.object({
      corners: z.array(pixelPointSchema).length(4, { error: `Mark exactly four corners of the rectangle (${CORNER_ORDER_WORDS}).` }),
      widthM: rectangleSide('width', 'the bottom edge, from corner 1 to corner 2,'),
      heightM: rectangleSide('height', 'a side edge, from corner 2 to corner 3,'),
    }),
    ...commonFields,
  })
  .superRefine((value, ctx) => {
    const problem = cornerProblem(value.plane.corners);
    if (problem) ctx.addIssue({ code: 'custom', path: ['plane', 'corners'], message: problem });
  });

/**
 * A calibration as a request body. `method` may be left out for the two-point scale (bodies and stored
 * calibrations from before the plane method have none).
 */
export const calibrationInputSchema = z.preprocess(
  (v) => (typeof v === 'object' && v !== null && !Array.isArray(v) && !('method' in v) ? { ...v, method: 'scale' } : v),
  z.discriminatedUnion('method', [scaleCalibrationSchema, planeCalibrationSchema], {
    error: 'Method must be "scale" (two points a known distance apart) or "plane" (four corners of a known rectangle).',
  }),
);
export type CalibrationInput = z.infer<typeof calibrationInputSchema>;
export type ScaleCalibrationInput = z.infer<typeof scaleCalibrationSchema>;
export type PlaneCalibrationInput = z.infer<typeof planeCalibrationSchema>;

export interface BallCheck {
  ballId: string;
  apparentDiameterM: number;
  catalogueDiameterM: number;
  /** Apparent over catalogue diameter: 1 when the scale and the ball agree. */
  ratio: number;
  ok: boolean;
}

export interface CalibrationFrame {
  method: CalibrationMethod;
  /** Metres per pixel; with the plane method the local scale at the origin (it changes across a tilted picture). */
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
  /**
   * Plane method: the homography from image pixels to metres of the flight (x along the flight from the origin,
   * y up from the ground), row-major 3 × 3, and its inverse; null for the two-point scale.
   */
  homography: { toMetres: number[]; toPixel: number[] } | null;
}

/** A stored calibration as the API answers it: its input, the mapping it gives (the method is the input's) and its checks. */
export type Calibration = CalibrationInput &
  Omit<CalibrationFrame, 'method'> & {
    id: number;
    clipId: number;
    ballCheck: BallCheck | null;
    updatedAt: string;
  };
