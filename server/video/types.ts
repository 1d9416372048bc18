/**
 * Shapes the video engine hands to its callers (the clips service, the jobs worker, the `follow`
 * command). Pixels are counted from the top-left corner of the displayed picture (after rotation),
 * x to the right and y down; frame indices are 0-based in decode order; times are seconds.
 */

/** Containers and image types recognised by their first bytes (see sniff.ts). */
export type MediaFormat = 'mp4' | 'mov' | 'matroska' | 'webm' | 'avi' | 'mpegts' | 'jpeg' | 'png';

export interface MediaSniff {
  format: MediaFormat;
  /** `video` for containers, `image` for JPEG/PNG stills. */
  kind: 'video' | 'image';
  /** The usual MIME type of the format, for storing beside the upload. */
  mime: string;
}

/** What `probeClip` learns about a video file. */
export interface ClipProbe {
  kind: 'video';
  path: string;
  sizeBytes: number;
  /** Container by its first bytes. */
  container: MediaFormat;
  /** ffprobe's `format_name` (for example `mov,mp4,m4a,3gp,3g2,mj2`). */
  formatName: string;
  /** ffprobe's codec name of the video stream (for example `h264`). */
  codec: string;
  /** ffprobe's pixel format of the video stream (for example `yuv420p`). */
  pixelFormat: string;
  /** Size of the displayed picture, after rotation: the size of extracted frames. */
  width: number;
  height: number;
  /** Size as coded in the stream, before rotation. */
  codedWidth: number;
  codedHeight: number;
  /** Clockwise turn that takes the coded picture to the displayed one (display matrix or `rotate` tag). */
  rotationDeg: 0 | 90 | 180 | 270;
  /**
   * The container's average frame rate (frames per second). This is the PLAYBACK rate: a slow-motion
   * phone clip filmed at 240 fps often says 30 here. The capture rate is asked of the coach.
   */
  frameRate: number;
  /** The same rate as ffprobe's exact fraction, for example `30000/1001`. */
  frameRateFraction: string;
  /**
   * The stream's nominal rate (`r_frame_rate`): for a variable-rate clip the rate its timestamps
   * count in, the one a slow-motion clip's timestamps are scaled from. Equal to `frameRate` otherwise.
   */
  nominalFrameRate: number;
  /** False when the container's nominal and average rates differ, or the frames' timestamps are not evenly spaced (variable frame rate). */
  constantFrameRate: boolean;
  /**
   * Presentation time of every frame, seconds at the playback rate from frame 0, when the frames
   * are not evenly spaced; null for a constant rate (then frame i is at i / frameRate).
   */
  frameTimesS: number[] | null;
  /** What is odd about the timestamps (they jump or repeat), in words for the coach; null when nothing is. */
  timestampWarning: string | null;
  /** Number of video frames. */
  frameCount: number;
  /** `header` when the container states it (`nb_frames`), `counted` when ffprobe counted packets. */
  frameCountSource: 'header' | 'counted';
  /** Duration of the video stream in seconds at the playback rate. */
  durationS: number;
  hasAudio: boolean;
}

/** What `probeFrameSet` learns about an uploaded set of still frames. */
export interface FrameSetProbe {
  kind: 'frames';
  /** The frames in natural filename order (`f2.png` before `f10.png`); frame i is `files[i]`. */
  files: string[];
  format: 'jpeg' | 'png';
  width: number;
  height: number;
  /** The capture rate stated at upload, frames per second. */
  frameRate: number;
  frameCount: number;
  /** frameCount / frameRate. */
  durationS: number;
  rotationDeg: 0;
}

export type MediaProbe = ClipProbe | FrameSetProbe;

/** Progress callback: an integer per cent 0–100, non-decreasing; 100 is reported once, on success. */
export type ProgressListener = (percent: number) => void;

export interface ExtractOptions {
  onProgress?: ProgressListener;
  /** Aborting kills ffmpeg, removes everything written and rejects with VIDEO_CANCELLED. */
  signal?: AbortSignal;
  /** ffmpeg's JPEG quality scale, 2 (best) – 31; default 5 (about libjpeg quality 85). */
  jpegQuality?: number;
  /** Thumbnails in the strip; default 12 (fewer when the clip has fewer frames). */
  stripTiles?: number;
  /** Height of one thumbnail in pixels; default 90. */
  stripHeight?: number;
  /**
   * Longest side of the frame images in pixels; larger clips are scaled down (aspect kept), smaller
   * ones are kept at their size. Default 960 (DEFAULT_MAX_SIDE). 0 keeps every clip at full size.
   */
  maxSide?: number;
}

/** The result of `extractFrames`: a folder holding `frame-000000.jpg`, `frame-000001.jpg`, … and `strip.jpg`. */
export interface ExtractedFrames {
  kind: 'extracted';
  dir: string;
  /** printf-style name of the frame files inside `dir`; the number is the 0-based frame index. */
  pattern: 'frame-%06d.jpg';
  frameCount: number;
  /** Size of each frame image (rotation applied; scaled down when the clip is larger than `maxSide`). */
  width: number;
  height: number;
  /** Displayed size of the clip itself: the pixel space of tracks and of `followBall`. */
  sourceWidth: number;
  sourceHeight: number;
  /** Frame-image pixels per clip pixel (width / sourceWidth, at most 1): clip x = image x / scale. */
  scale: number;
  /** Rate used to number the frames in time: the probe's rate (frame sets: the stated capture rate). */
  frameRate: number;
  /** The thumbnail strip: `stripTiles` thumbnails side by side, evenly spaced through the clip. */
  stripPath: string;
  stripTiles: number;
  /** Frame index shown by each thumbnail, left to right. */
  stripFrames: number[];
}

/**
 * Where the follower reads frames from: a video file or a folder of frames (a string), a probe, or
 * extracted frames (read from the JPEGs, positions mapped back to clip pixels).
 */
export type FollowSource = string | MediaProbe | ExtractedFrames;

export interface FollowStart {
  /** 0-based frame index of the click. */
  frame: number;
  /** Clicked centre in pixels of the displayed picture. */
  x: number;
  y: number;
  /** Ball radius in pixels, when the coach dragged it; otherwise it is measured. */
  radius?: number;
}

export interface FollowOptions {
  /**
   * Capture rate for `t`. A constant-rate clip: t = frame / captureFps. A variable-rate one: t is
   * the frame's presentation time × playback rate / captureFps. Default: the source's rate.
   */
  captureFps?: number;
  /**
   * Presentation times of the frames (seconds at the playback rate, as `ClipProbe.frameTimesS`),
   * for a source that does not carry them (extracted frames of a variable-rate clip).
   */
  frameTimesS?: number[] | null;
  /** Stop after this many consecutive frames without a confident detection. Default: a tenth of a second of frames, at least 5. */
  maxLostFrames?: number;
  /** Last frame to consider (inclusive). Default: the end of the clip. */
  endFrame?: number;
  /** Largest expected ball speed in pixels per frame, bounding the first search. Default: a tenth of the frame width. */
  maxSpeedPxPerFrame?: number;
  /**
   * `still` (default): the camera did not move. `moving`: the camera's motion is estimated from the
   * background (camera-motion.ts) and the track is followed in the start frame's coordinates.
   */
  camera?: 'still' | 'moving';
  /**
   * With `camera: 'moving'`: the frame whose pixels `xRef, yRef` and the camera maps are given in (the frame the
   * calibration was marked on); the camera is tracked through it even outside the frames followed. Default: the start frame.
   */
  referenceFrame?: number;
  /** Memory for buffered frames, bytes. Default 96 MiB (about 48 frames of 1080p gray). */
  maxBufferBytes?: number;
  /**
   * For a constant-rate video whose start frame is later than this many seconds, ffmpeg seeks
   * instead of decoding from the first frame. Default 2. Infinity always decodes from the start.
   */
  seekAfterS?: number;
  /** Aborting stops ffmpeg and rejects with VIDEO_CANCELLED. */
  signal?: AbortSignal;
  /** Called after each processed frame with the frames done since the start and the points so far. */
  onProgress?: (info: { frame: number; framesDone: number; points: number }) => void;
}

export interface FollowPoint {
  frame: number;
  /** Seconds since frame 0 in real time: from the frame's own timestamp, scaled for slow motion. */
  t: number;
  x: number;
  y: number;
  /** 0–1: contrast against the background, agreement with the predicted path and with the ball's size. */
  confidence: number;
  /** The same point in the reference frame's pixels (`referenceFrame`, else the start frame; equal to x, y with a still camera). */
  xRef: number;
  yRef: number;
}

export type FollowStopReason =
  /** No confident detection for `maxLostFrames` frames in a row. */
  | 'lost'
  /** The ball left the picture and its path does not bring it back (or not within 3 s); the points end at the last sighting. */
  | 'left-frame'
  /** The ball stopped descending (hit the ground or bounced). */
  | 'landed'
  /** The clip (or `endFrame`) ended while the ball was still followed. */
  | 'end-of-clip';

export interface FollowResult {
  /** One point per followed frame, in frame order, starting with the start frame. */
  points: FollowPoint[];
  stoppedBecause: FollowStopReason;
  /**
   * Runs of frames, between the first and the last point, in which the ball was out of view (out
   * of the picture, hidden, or not found): they have no point, and no position is guessed for them.
   */
  outOfView: Array<{ fromFrame: number; toFrame: number }>;
  /**
   * With `camera: 'moving'`: each frame's map to the reference frame's pixels (ref = R(rotRad)·p +
   * (tx, ty), p from the top-left corner); null with a still camera.
   */
  camera: Array<{ frame: number; rotRad: number; tx: number; ty: number }> | null;
  /** The frame `xRef, yRef` and `camera` refer to (the start frame with a still camera). */
  referenceFrame: number;
  /** Measured (or given) ball radius in pixels. */
  radiusPx: number;
  captureFps: number;
  /** Frames decoded and examined, including those where the ball was not found. */
  framesExamined: number;
}
