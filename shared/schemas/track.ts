/**
 * Traced ball positions of a flight, and the bodies that write them (the CSV format is in `shared/tracks/csv.ts`).
 * Pixels are measured from the top-left corner of the frame as served (after rotation), y down; frames are 0-based.
 */
import { z } from 'zod';
import { cameraModeSchema } from './camera-motion';

export const POINT_SOURCES = ['manual', 'auto'] as const;
export type PointSource = (typeof POINT_SOURCES)[number];

/** Most points one flight may hold (a 10 s clip at 960 fps). */
export const MAX_TRACK_POINTS = 10_000;

const finite = (what: string) =>
  z.number({ error: `${what} must be a number.` }).refine(Number.isFinite, { error: `${what} must be a finite number.` });

export const trackPointInputSchema = z.object({
  frame: z.number({ error: 'Frame must be a whole number.' }).int({ error: 'Frame must be a whole number.' }).min(0, { error: 'Frame must be 0 or more.' }),
  xPx: finite('x (px)'),
  yPx: finite('y (px)'),
  radiusPx: z.number().positive({ error: 'Radius must be more than 0 pixels.' }).nullable().optional(),
  source: z.enum(POINT_SOURCES).optional(),
  confidence: z.number().min(0, { error: 'Confidence must be between 0 and 1.' }).max(1, { error: 'Confidence must be between 0 and 1.' }).nullable().optional(),
});
export type TrackPointInput = z.infer<typeof trackPointInputSchema>;

export const trackPointsBodySchema = z
  .object({
    points: z.array(trackPointInputSchema).max(MAX_TRACK_POINTS, { error: `A flight holds at most ${MAX_TRACK_POINTS} points.` }),
  })
  .superRefine((value, ctx) => {
    const seen = new Set<number>();
    value.points.forEach((p, i) => {
      if (seen.has(p.frame)) {
        ctx.addIssue({ code: 'custom', path: ['points', i, 'frame'], message: `Frame ${p.frame} has two points: keep one point per frame.` });
      }
      seen.add(p.frame);
    });
  });
export type TrackPointsBody = z.infer<typeof trackPointsBodySchema>;

export const followBodySchema = z.object({
  frame: z.number().int({ error: 'Frame must be a whole number.' }).min(0, { error: 'Frame must be 0 or more.' }),
  xPx: finite('x (px)'),
  yPx: finite('y (px)'),
  radiusPx: z.number().positive({ error: 'Radius must be more than 0 pixels.' }).nullable().optional(),
  /** Default: "still" when the clip is marked as filmed from a still camera, else "moving" (estimated). */
  camera: cameraModeSchema.optional(),
});
export type FollowBody = z.infer<typeof followBodySchema>;

export const trackImportBodySchema = z.object({
  csv: z.string({ error: 'Send the CSV text in "csv".' }).min(1, { error: 'The CSV is empty.' }).max(5_000_000, { error: 'The CSV is larger than 5 MB.' }),
});

export interface TrackPoint {
  frame: number;
  xPx: number;
  yPx: number;
  radiusPx: number | null;
  source: PointSource;
  confidence: number | null;
  /** frame / captureFps, seconds. */
  tS: number;
  /** Metres along the flight and up from the ground; null until the clip is calibrated. */
  xM: number | null;
  yM: number | null;
  /**
   * The point in the reference frame's pixels (the frame the calibration was marked on), through the camera
   * motion auto-follow found; equal to xPx, yPx when the camera was still. Metres are computed from these.
   */
  xRefPx: number;
  yRefPx: number;
}
