/**
 * Flights: one throw or kick inside a clip, its tags (athlete, action, ball), frame range, status and fits.
 */
import { z } from 'zod';
import type { JobSummary } from './clip';
import type { Calibration } from './calibration';
import type { TrackPoint } from './track';
import { paginationQuerySchema } from './pagination';

/** Status words of PRODUCT.md; `needs_attention` is shown as "needs attention". */
export const FLIGHT_STATUSES = ['uploaded', 'traced', 'fitted', 'reviewed', 'needs_attention'] as const;
export type FlightStatus = (typeof FLIGHT_STATUSES)[number];

export const FLIGHT_STATUS_LABELS: Record<FlightStatus, string> = {
  uploaded: 'uploaded',
  traced: 'traced',
  fitted: 'fitted',
  reviewed: 'reviewed',
  needs_attention: 'needs attention',
};

/** The action list every club starts with (PRODUCT.md); clubs edit their own copy. */
export const DEFAULT_FLIGHT_ACTIONS: readonly { key: string; label: string }[] = [
  { key: 'punt', label: 'Punt' },
  { key: 'drop_kick', label: 'Drop kick' },
  { key: 'place_kick', label: 'Place kick' },
  { key: 'goal_kick', label: 'Goal kick' },
  { key: 'long_throw', label: 'Long throw' },
  { key: 'throw_in', label: 'Throw-in' },
  { key: 'serve', label: 'Serve' },
  { key: 'pitch', label: 'Pitch' },
  { key: 'outfield_throw', label: 'Outfield throw' },
  { key: 'shot_put', label: 'Shot put' },
];

const id = (what: string) => z.number({ error: `${what} is required.` }).int().positive({ error: `${what} is required.` });
const frameIndex = (what: string) =>
  z.number({ error: `${what} must be a whole number.` }).int({ error: `${what} must be a whole number.` }).min(0, { error: `${what} must be 0 or more.` });

export const actionKeySchema = z
  .string({ error: 'Action is required.' })
  .trim()
  .min(1, { error: 'Action is required.' })
  .max(40, { error: 'Action key must be at most 40 characters.' })
  .regex(/^[a-z0-9_]+$/, { error: 'Action key may hold only lower-case letters, digits and "_".' });

export const ballIdSchema = z
  .string({ error: 'Ball is required.' })
  .trim()
  .min(1, { error: 'Ball is required: pick it from the catalogue.' })
  .max(64, { error: 'Ball id must be at most 64 characters.' });

const flightFields = {
  athleteId: id('Athlete'),
  action: actionKeySchema,
  ballId: ballIdSchema,
  frameStart: frameIndex('First frame').optional(),
  frameEnd: frameIndex('Last frame').optional(),
  notes: z.string().max(4000, { error: 'Notes must be at most 4000 characters.' }).nullable().optional(),
  /** The frame of contact or release, when the trace starts after it; null: not marked. */
  releaseFrame: frameIndex('Release frame').nullable().optional(),
  /** "Released at height H" (m above the ground: 0 for a ball on the ground or a tee); null: not given. */
  releaseHeightM: z
    .number({ error: 'The release height must be a number of metres.' })
    .refine(Number.isFinite, { error: 'The release height must be a finite number of metres.' })
    .min(0, { error: 'The release height cannot be below the ground: give 0 for a ball on the ground or a tee, or the height of the hand at release.' })
    .max(5, { error: 'The release height must be at most 5 m: give it in metres (a 2.1 m release is 2.1).' })
    .nullable()
    .optional(),
};

const rangeOk = (v: { frameStart?: number; frameEnd?: number }) => v.frameStart === undefined || v.frameEnd === undefined || v.frameEnd > v.frameStart;
const rangeIssue = { error: 'The last frame must come after the first frame.', path: ['frameEnd'] };
const releaseOk = (v: { releaseFrame?: number | null; releaseHeightM?: number | null }) =>
  v.releaseFrame === undefined || v.releaseFrame === null || v.releaseHeightM === undefined || v.releaseHeightM === null;
const releaseIssue = { error: 'Give either the release frame or the release height, not both: a marked frame already fixes the height.', path: ['releaseHeightM'] };

export const flightInputSchema = z.object(flightFields).refine(rangeOk, rangeIssue).refine(releaseOk, releaseIssue);
export type FlightInput = z.infer<typeof flightInputSchema>;

export const flightPatchSchema = z
  .object({ ...flightFields, status: z.enum(['reviewed', 'fitted'], { error: 'Status may be set to "reviewed" or back to "fitted" only.' }) })
  .partial()
  .refine(rangeOk, rangeIssue)
  .refine(releaseOk, releaseIssue);
export type FlightPatch = z.infer<typeof flightPatchSchema>;

/** Orders of the flights list on the server: `recent` is newest recorded first (the default), the rest by column. */
export const FLIGHT_SORTS = ['recent', 'date', 'athlete', 'action', 'ball', 'status', 'launchSpeed', 'launchAngle', 'carry', 'standardCarry'] as const;
export type FlightSort = (typeof FLIGHT_SORTS)[number];

export const flightListQuerySchema = paginationQuerySchema.extend({
  sessionId: z.coerce.number().int().positive().optional(),
  clipId: z.coerce.number().int().positive().optional(),
  athleteId: z.coerce.number().int().positive().optional(),
  status: z.enum(FLIGHT_STATUSES).optional(),
  action: actionKeySchema.optional(),
  ballId: z.string().trim().min(1).max(64).optional(),
  sort: z.enum(FLIGHT_SORTS, { error: `sort must be one of ${FLIGHT_SORTS.join(', ')}.` }).default('recent'),
  order: z.enum(['asc', 'desc'], { error: 'order must be asc or desc.' }).default('desc'),
});
export type FlightListQuery = z.output<typeof flightListQuerySchema>;

export const fitRequestSchema = z.object({
  model: z.string().trim().min(1).max(40).optional(),
});

export const flightActionInputSchema = z.object({
  key: actionKeySchema.optional(),
  label: z.string({ error: 'Label is required.' }).trim().min(1, { error: 'Label is required.' }).max(60, { error: 'Label must be at most 60 characters.' }),
});
export const flightActionPatchSchema = z.object({
  label: z.string().trim().min(1, { error: 'Label cannot be empty.' }).max(60, { error: 'Label must be at most 60 characters.' }).optional(),
  archived: z.boolean().optional(),
});

export interface FlightAction {
  id: number;
  key: string;
  label: string;
  archived: boolean;
  sortOrder: number;
}

export interface FitWarning {
  code: string;
  message: string;
}

export interface FitSummary {
  id: number;
  model: string;
  status: 'fitted' | 'needs_attention';
  createdAt: string;
  launchSpeedMps: number | null;
  launchAngleDeg: number | null;
  carryM: number | null;
  /** Fitted drag coefficient and its standard error (null for models without one). */
  cd: number | null;
  cdError: number | null;
  /** Carry of the same launch in still ISO sea-level air, m. */
  standardCarryM: number | null;
  /** What the launch figures refer to, and how many frames the fit traced back to it (null for fits of older engines). */
  release: { mode: 'first-point' | 'time' | 'height'; backFrames: number | null } | null;
  warnings: FitWarning[];
}

export interface Fit extends FitSummary {
  jobId: number | null;
  engineVersion: string;
  calibrationId: number | null;
  params: Record<string, unknown>;
  /** The engine's full result, as it returned it. */
  result: Record<string, unknown>;
}

export interface Flight {
  id: number;
  clubId: number;
  sessionId: number;
  clipId: number;
  athleteId: number;
  athleteName: string;
  action: string;
  ballId: string;
  frameStart: number;
  frameEnd: number;
  /** Frame of contact or release marked by the coach, or null. */
  releaseFrame: number | null;
  /** "Released at height H" (m), or null; a marked frame wins over it. */
  releaseHeightM: number | null;
  status: FlightStatus;
  attentionReason: string | null;
  notes: string | null;
  pointCount: number;
  latestFit: FitSummary | null;
  job: JobSummary | null;
  createdAt: string;
  updatedAt: string;
}

export interface FlightDetail extends Flight {
  points: TrackPoint[];
  clip: {
    id: number;
    label: string;
    width: number;
    height: number;
    frameWidth: number | null;
    frameHeight: number | null;
    frameScale: number | null;
    frameCount: number | null;
    captureFps: number;
    calibration: Calibration | null;
  };
}
