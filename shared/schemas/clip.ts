/**
 * Clips (an uploaded video or a set of frames) and the jobs that process them.
 * Times derive from the capture rate: t = frame / captureFps, frame indices 0-based.
 */
import { z } from 'zod';
import { paginationQuerySchema } from './pagination';
import type { Calibration } from './calibration';

export const CLIP_STATUSES = ['processing', 'ready', 'failed'] as const;
export type ClipStatus = (typeof CLIP_STATUSES)[number];

export const JOB_TYPES = ['clip.process', 'flight.follow', 'flight.fit'] as const;
export type JobType = (typeof JOB_TYPES)[number];
export const JOB_STATUSES = ['queued', 'running', 'done', 'failed'] as const;
export type JobStatus = (typeof JOB_STATUSES)[number];

/** Highest capture rate accepted; phone slow motion reaches 240–960 fps. */
export const MAX_CAPTURE_FPS = 2000;

export const captureFpsSchema = z.coerce
  .number({ error: 'Capture frame rate must be a number of frames per second.' })
  .refine((v) => Number.isFinite(v), { error: 'Capture frame rate must be a number of frames per second.' })
  .min(1, { error: 'Capture frame rate must be at least 1 frame per second.' })
  .max(MAX_CAPTURE_FPS, { error: `Capture frame rate must be at most ${MAX_CAPTURE_FPS} frames per second.` });

const booleanField = z
  .union([z.boolean(), z.enum(['true', 'false', '1', '0', 'on', 'off', ''])])
  .transform((v) => v === true || v === 'true' || v === '1' || v === 'on');

/**
 * The text fields of the multipart upload. Files go in `video` (one) or `frames` (two or more).
 * `captureFps` is required when `slowMotion` is true or when frames are sent (checked by the server with the files).
 */
export const clipUploadFieldsSchema = z.object({
  slowMotion: booleanField.optional(),
  captureFps: z.union([captureFpsSchema, z.literal('').transform(() => undefined)]).optional(),
  label: z.string().trim().max(120, { error: 'Label must be at most 120 characters.' }).optional(),
});
export type ClipUploadFields = z.infer<typeof clipUploadFieldsSchema>;

export const clipPatchSchema = z
  .object({
    label: z.string().trim().min(1, { error: 'Label cannot be empty.' }).max(120, { error: 'Label must be at most 120 characters.' }).optional(),
    captureFps: captureFpsSchema.optional(),
    cameraStill: z.boolean({ error: 'cameraStill must be true (the camera did not move: auto-follow skips the motion estimate) or false.' }).optional(),
  })
  .strict();
export type ClipPatch = z.infer<typeof clipPatchSchema>;

export const clipListQuerySchema = paginationQuerySchema.extend({
  sessionId: z.coerce.number().int().positive().optional(),
  status: z.enum(CLIP_STATUSES).optional(),
});
export type ClipListQuery = z.output<typeof clipListQuerySchema>;

export interface JobSummary {
  id: number;
  type: JobType;
  status: JobStatus;
  progress: number;
  error: string | null;
}

export interface Job extends JobSummary {
  attempts: number;
  maxAttempts: number;
  clipId: number | null;
  flightId: number | null;
  /** flight.follow: { pointCount, stoppedBecause, lastFrame }; flight.fit: { fitId, status }; clip.process: { frameCount }. */
  result: Record<string, unknown> | null;
  createdAt: string;
  startedAt: string | null;
  finishedAt: string | null;
  updatedAt: string;
}

export const jobListQuerySchema = z.object({
  clipId: z.coerce.number().int().positive().optional(),
  flightId: z.coerce.number().int().positive().optional(),
  status: z.enum(JOB_STATUSES).optional(),
});

export interface ClipStrip {
  url: string;
  tileCount: number;
  tileWidth: number;
  tileHeight: number;
  /** The frame index shown by each tile, left to right. */
  frames: number[];
}

export interface Clip {
  id: number;
  clubId: number;
  sessionId: number;
  label: string;
  kind: 'video' | 'frames';
  originalName: string;
  sizeBytes: number;
  container: string | null;
  codec: string | null;
  /**
   * The clip's picture size after rotation. Points, calibration and auto-follow are in these pixels
   * (top-left origin, y down), whatever the size of the served frame images.
   */
  width: number;
  height: number;
  /** Size of the served frame images; large clips are scaled down for tracing. Null until extracted. */
  frameWidth: number | null;
  frameHeight: number | null;
  /** frameWidth / width (≤ 1): clip pixel = image pixel / frameScale. Null until extracted. */
  frameScale: number | null;
  rotationDeg: number;
  /** The container's playback rate; null for frame sets. */
  playbackFps: number | null;
  captureFps: number;
  slowMotion: boolean;
  frameCount: number | null;
  /** frameCount / captureFps: real time, not playback time. */
  durationS: number | null;
  /** The frames are not evenly spaced: every time comes from the frame's own timestamp. */
  variableFrameRate: boolean;
  /** What the upload found odd about the timestamps (they jump or repeat), in words; null when nothing. */
  timestampWarning: string | null;
  /** The coach marked the clip as filmed from a still camera: auto-follow skips the camera-motion estimate. */
  cameraStill: boolean;
  status: ClipStatus;
  failureReason: string | null;
  job: JobSummary | null;
  framesReady: boolean;
  strip: ClipStrip | null;
  calibration: Calibration | null;
  flightCount: number;
  createdAt: string;
  updatedAt: string;
}
