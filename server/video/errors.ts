/**
 * The one error type of the video engine. Every failure a user can cause (a file that is not a
 * video, a truncated upload, a click outside the frame…) is a `VideoError` with a stable code and a
 * message that says what was wrong and what to do; callers show the message as is.
 *
 * `apiCode` is the API error code (shared/errors.ts) a route should answer with, so the clips
 * routes can turn a `VideoError` into an `ApiError` without a table of their own.
 */
import type { ErrorCode } from '../../shared/errors';

/** Stable codes of the video engine; `apiCode` below maps each to an API error code. */
export const VIDEO_ERROR_CODES = {
  /** The file does not exist or cannot be read. */
  VIDEO_FILE_UNREADABLE: 'UNPROCESSABLE',
  /** The file has zero bytes. */
  VIDEO_EMPTY_FILE: 'UNPROCESSABLE',
  /** The first bytes are not those of a video container (or, for frame sets, of a JPEG/PNG). */
  VIDEO_NOT_MEDIA: 'UNSUPPORTED_MEDIA',
  /** An image was given where a video was expected (use a frame set instead). */
  VIDEO_IS_IMAGE: 'UNSUPPORTED_MEDIA',
  /** The container ends before its own structure says it should (upload cut short). */
  VIDEO_TRUNCATED: 'UNPROCESSABLE',
  /** A container without a video stream this ffmpeg can decode (audio only, unknown codec). */
  VIDEO_NO_DECODABLE_STREAM: 'UNSUPPORTED_MEDIA',
  /** ffprobe or ffmpeg failed for a reason not covered above; the message carries ffmpeg's last line. */
  VIDEO_DECODE_FAILED: 'UNPROCESSABLE',
  /** A frame's presentation timestamp goes back in time: the frames' order and times cannot be known. */
  VIDEO_TIMESTAMPS_BACKWARDS: 'UNPROCESSABLE',
  /** ffmpeg or ffprobe is missing at FFMPEG_PATH / FFPROBE_PATH. */
  VIDEO_TOOL_MISSING: 'INTERNAL',
  /** A frame set with no frames, a bad capture rate or frames of different sizes or types. */
  FRAMES_INVALID: 'UNPROCESSABLE',
  /** A frame of a set is larger than the server decodes (its header claims too many pixels). */
  FRAME_TOO_LARGE: 'UNPROCESSABLE',
  /** A bad argument from the caller (start outside the frame, capture rate not positive…). */
  VIDEO_BAD_REQUEST: 'VALIDATION_FAILED',
  /** The output folder for extracted frames already holds files. */
  VIDEO_OUTPUT_EXISTS: 'CONFLICT',
  /** The work was cancelled through its AbortSignal; nothing it wrote is left. */
  VIDEO_CANCELLED: 'SERVICE_UNAVAILABLE',
} as const satisfies Record<string, ErrorCode>;

export type VideoErrorCode = keyof typeof VIDEO_ERROR_CODES;

export class VideoError extends Error {
  readonly code: VideoErrorCode;
  /** The API error code a route should answer with (see shared/errors.ts for its HTTP status). */
  readonly apiCode: ErrorCode;
  /** Machine-readable facts behind the message (sizes, frame numbers, ffmpeg's last line…). */
  readonly details: Record<string, unknown>;

  constructor(code: VideoErrorCode, message: string, details: Record<string, unknown> = {}) {
    super(message);
    this.name = 'VideoError';
    this.code = code;
    this.apiCode = VIDEO_ERROR_CODES[code];
    this.details = details;
  }
}

export function isVideoError(err: unknown): err is VideoError {
  return err instanceof VideoError;
}

/** The error every cancelled operation throws, so callers can tell a cancel from a failure. */
export function cancelledError(what: string): VideoError {
  return new VideoError('VIDEO_CANCELLED', `${what} was cancelled; nothing it wrote was kept.`);
}
