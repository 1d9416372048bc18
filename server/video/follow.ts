/**
 * Auto-follow: from one click on the ball, follow it forward through the frames.
 *
 * Per frame: predict the centre from the path so far (motion.ts); build a background for a small
 * window around the prediction from nearby frames in which the ball is known or predicted to be
 * elsewhere (temporal median, detect.ts); take the blob nearest the prediction; place its centre
 * at the weighted centroid; score a confidence. Frames are streamed from ffmpeg and only a bounded
 * window of them is kept (past frames for the background, a look-ahead of future ones).
 */
import { cancelledError, VideoError } from './errors';
import { detectBall, medianBackground, roiAround, type Detection, type Roi } from './detect';
import { openSource } from './frame-stream';
import { fitBallistic, type BallisticPath } from './ballistic';
import { applyRigid, CameraTracker, composeRigid, IDENTITY, invertRigid, type Rigid } from './camera-motion';
import { fitMotion, predictAt, velocityAt, type MotionFit, type MotionPoint } from './motion';
import type { FollowOptions, FollowPoint, FollowResult, FollowSource, FollowStart, FollowStopReason } from './types';

/** Defaults of `followBall`, declared once; see FollowOptions for their meaning. */
export const FOLLOW_DEFAULTS = {
  maxBufferBytes: 96 * 1024 * 1024,
  seekAfterS: 2,
  /** Most frames of look-ahead kept for the background. */
  maxLookahead: 24,
  /** Frames before the click read for the first backgrounds. */
  leadIn: 12,
  /** Points a track needs before it takes backgrounds from behind only. */
  matureTrack: 8,
  /** Points in the path fit. */
  fitWindow: 12,
  /** Samples in the background median. */
  backgroundSamples: 9,
  /** Frames between the current frame and a background sample whose ball position is unknown. */
  unknownOffset: 6,
  /** Longest the ball may go unseen inside the picture (hidden behind someone) before following stops: seconds, and frames at least. */
  maxLostS: 0.3,
  minLostFrames: 8,
  /** Detections below this confidence count as misses. */
  minConfidence: 0.2,
  /** Longest the ball may stay out of the picture (a high kick over the top) and still be waited for: seconds. */
  maxCoastS: 3,
  /** Frames missing between two points after which the short-range fit starts afresh from the later one. */
  segmentGap: 3,
  /** Points after a gap before the short-range fit takes over again from the flight's physics. */
  segmentPoints: 4,
} as const;

interface TrackerConfig {
  width: number;
  height: number;
  startFrame: number;
  click: { x: number; y: number };
  radius: number | null;
  maxLost: number;
  maxSpeed: number;
  maxCoast: number;
}

type FrameBuffer = Map<number, Buffer>;

interface Point2 {
  x: number;
  y: number;
}

/**
 * Each frame's map to the reference frame's pixels (the start frame), from the camera's motion;
 * null when the camera is taken to be still (every map is the identity).
 */
class CameraMaps {
  private readonly toFirst = new Map<number, Rigid>();
  private base: Rigid | null = null;
  private newest = -1;

  constructor(
    private readonly tracker: CameraTracker,
    private readonly refFrame: number,
  ) {}

  push(index: number, data: Uint8Array): void {
    this.toFirst.set(index, this.tracker.push(data).toRef);
    this.newest = Math.max(this.newest, index);
    if (index === this.refFrame) this.base = invertRigid(this.toFirst.get(index)!);
  }

  /** Frame k → reference; frames not read yet keep the newest known map (the camera is taken to stop). */
  toRef(k: number): Rigid {
    const m = this.toFirst.get(k) ?? this.toFirst.get(this.newest) ?? IDENTITY;
    return this.base ? composeRigid(this.base, m) : m;
  }

  /** Every map found, frame by frame, from the reference frame on. */
  all(): Array<{ frame: number } & Rigid> {
    return [...this.toFirst.keys()].sort((a, b) => a - b).map((frame) => ({ frame, ...this.toRef(frame) }));
  }
}

class Tracker {
  readonly points: MotionPoint[] = [];
  private readonly byFrame = new Map<number, MotionPoint>();
  private readonly conf = new Map<number, number>();
  private radius: number | null;
  private readonly radiusSamples: number[] = [];
  private lost = 0;
  private coast = 0;
  private landingCandidate: number | null = null;
  /** Whether the ball has been seen moving; until then it may be resting where it was clicked. */
  private launched = false;
  /** Index of the first point of the path fit (after any points at rest). */
  private fitFrom = 0;
  /** Frames before the start whose ball position is unknown and must not serve as background. */
  private untrustedBefore = -1;
  /** Index of the first point after the latest gap: the short-range fit uses points from here on. */
  private segmentFrom = 0;
  /** The flight's physical path fitted to the points so far; refitted after each new point when needed. */
  private path: BallisticPath | null = null;
  private pathPoints = -1;
  framesExamined = 0;

  constructor(
    private readonly cfg: TrackerConfig,
    private readonly camera: CameraMaps | null = null,
  ) {
    this.radius = cfg.radius;
  }

  /** Frame k's pixels → the reference frame's (the track's coordinates). */
  private toRef(k: number, p: Point2): Point2 {
    return this.camera ? applyRigid(this.camera.toRef(k), p.x, p.y) : p;
  }

  /** The reference frame's pixels → frame k's (where the ball is looked for). */
  fromRef(k: number, p: Point2): Point2 {
    return this.camera ? applyRigid(invertRigid(this.camera.toRef(k)), p.x, p.y) : p;
  }

  /**
   * Background of the window `roi` of frame k from other frames: their per-pixel median. With a
   * moving camera each sample is first taken at the same place of the scene (its pixels mapped
   * through the reference frame); a pixel out of a sample's view takes frame k's own value.
   */
  private background(buffer: FrameBuffer, samples: number[], k: number, roi: Roi): Uint8Array {
    const { width, height } = this.cfg;
    const rw = roi.x1 - roi.x0;
    const rh = roi.y1 - roi.y0;
    const bg = new Uint8Array(rw * rh);
    if (!this.camera) {
      medianBackground(samples.map((j) => buffer.get(j)!), width, roi, bg);
      return bg;
    }
    const own = buffer.get(k)!;
    const toK = this.camera.toRef(k);
    const warped = samples.map((j) => {
      const src = buffer.get(j)!;
      const m = composeRigid(invertRigid(this.camera!.toRef(j)), toK);
      const c = Math.cos(m.rotRad);
      const s = Math.sin(m.rotRad);
      const out = new Uint8Array(rw * rh);
      let o = 0;
      for (let y = roi.y0; y < roi.y1; y++) {
        for (let x = roi.x0; x < roi.x1; x++) {
          // Pixel centre (x + ½, y + ½) in frame j, back to array indices (− ½).
          const qx = c * (x + 0.5) - s * (y + 0.5) + m.tx - 0.5;
          const qy = s * (x + 0.5) + c * (y + 0.5) + m.ty - 0.5;
          const ix = Math.floor(qx);
          const iy = Math.floor(qy);
          if (ix < 0 || iy < 0 || ix + 1 >= width || iy + 1 >= height) {
            out[o++] = own[y * width + x]!;
            continue;
          }
          const fx = qx - ix;
          const fy = qy - iy;
          const p = iy * width + ix;
          const a = src[p]! + (src[p + 1]! - src[p]!) * fx;
          const b = src[p + width]! + (src[p + width + 1]! - src[p + width]!) * fx;
          out[o++] = Math.round(a + (b - a) * fy);
        }
      }
      return out;
    });
    medianBackground(warped, rw, { x0: 0, y0: 0, x1: rw, y1: rh }, bg);
    return bg;
  }

  get radiusPx(): number {
    return this.radius ?? 0;
  }

  /** True while backgrounds may need frames ahead: a ball not yet moving, a young track, or one that has lost the ball. */
  needsLookahead(): boolean {
    return !this.launched || this.points.length - this.fitFrom < FOLLOW_DEFAULTS.matureTrack || this.lost > 0 || this.coast > 0;
  }

  confidenceOf(frame: number): number {
    return this.conf.get(frame) ?? 0;
  }

  /** Processes frame k; returns why following stops, or null to go on. */
  step(k: number, buffer: FrameBuffer): FollowStopReason | null {
    this.framesExamined++;
    if (k === this.cfg.startFrame) {
      this.bootstrap(k, buffer);
      return null;
    }
    const { width, height } = this.cfg;
    const r = this.radius ?? 4;
    // The path is fitted from the launch on: points of a ball still at rest (clicked on the tee
    // before the kick) would bend it.
    const active = this.fitFrom > 0 ? this.points.slice(this.fitFrom) : this.points;
    const n = active.length;
    let pred: { x: number; y: number };
    let gate: number;
    let fit: MotionFit | null = null;
    let predict: ((j: number) => { x: number; y: number }) | null = null;
    let vy = 0;
    const atRest = !this.launched && n >= 1;
    if (n < 2 || atRest) {
      // No motion known yet: the ball may leave at any speed, so search wide around where it is.
      pred = n >= 1 ? active[n - 1]! : this.cfg.click;
      gate = this.cfg.maxSpeed * (1 + 0.2 * this.lost);
    } else {
      const recent = this.points.slice(Math.max(this.fitFrom, this.segmentFrom));
      const last = active[n - 1]!;
      const gap = k - last.frame - 1;
      // Across a gap (out of the picture, hidden) and just after one, the flight's physics fitted
      // to the whole track predicts far better than a short polynomial.
      const path = this.lost > 0 || this.coast > 0 || recent.length < FOLLOW_DEFAULTS.segmentPoints ? this.ballistic(active) : null;
      if (recent.length >= 2) fit = fitMotion(recent, FOLLOW_DEFAULTS.fitWindow, 2);
      if (path) {
        const st = path.at(k);
        pred = st;
        vy = st.vy;
        predict = (j) => path.at(j);
        const speed = Math.hypot(st.vx, st.vy);
        const base = Math.max(2.5, 0.8 * r, 4 * path.rms);
        gate = base + gap * Math.max(0.5, 0.05 * speed) + 0.004 * gap * gap;
      } else {
        fit ??= fitMotion(active, FOLLOW_DEFAULTS.fitWindow, 2);
        const f = fit;
        pred = predictAt(f, k);
        predict = (j) => predictAt(f, j);
        const v = velocityAt(f, k);
        vy = v.vy;
        const speed = Math.hypot(v.vx, v.vy);
        const base = recent.length < 4 ? Math.max(4, 0.8 * r, 0.35 * speed) : Math.max(2.5, 0.8 * r, 4 * f.rms);
        gate = base + gap * Math.max(1.5, 0.15 * speed) + 0.02 * gap * gap;
      }
      const seen = this.fromRef(k, pred);
      if (seen.x < -0.5 * r || seen.x > width + 0.5 * r || seen.y < -0.5 * r || seen.y > height + 0.5 * r) {
        // Out of the picture: no point, no guess. Wait for the ball while its path comes back in.
        const along = path ?? this.ballistic(active);
        const returns = along ? this.reenters(along, k) : seen.y < 0 && seen.x >= 0 && seen.x <= width;
        if (!returns) return 'left-frame';
        this.coast++;
        return this.coast > this.cfg.maxCoast ? 'left-frame' : null;
      }
      if (path && fit && recent.length < FOLLOW_DEFAULTS.segmentPoints) fit = null;
    }

    // While descending, also look back along the path to the last point: a ball that has landed
    // or bounced is found there, and that is how a landing is recognised.
    let centre = pred;
    let reach = gate;
    const descending = fit !== null && this.lost === 0 && n >= 6 && vy > Math.max(0.3, 0.03 * r);
    if (descending) {
      const last = active[n - 1]!;
      centre = { x: (pred.x + last.x) / 2, y: (pred.y + last.y) / 2 };
      reach = gate + Math.hypot(pred.x - last.x, pred.y - last.y) / 2;
    }
    const predK = this.fromRef(k, pred);
    const found = this.detectAt(k, buffer, this.fromRef(k, centre), reach, predK, r, predict);
    const confidence = found ? this.confidence(found, predK, gate, r) : 0;
    if (!found || confidence < FOLLOW_DEFAULTS.minConfidence) {
      this.lost++;
      return this.lost > this.cfg.maxLost ? 'lost' : null;
    }
    // From here on the detection is in the track's coordinates.
    const det = { ...found, ...this.toRef(k, found) };
    if (descending && fit) {
      // Landed or bounced: the ball stops short of the path, above it (y is down), or all but
      // stops where the path says it should still be moving.
      const last = active[n - 1]!;
      const expectedMove = Math.hypot(pred.x - last.x, pred.y - last.y);
      const moved = Math.hypot(det.x - last.x, det.y - last.y);
      const above = pred.y - det.y > Math.max(2, 4 * fit.rms, 0.5 * vy);
      const stalled = expectedMove > 1.5 && moved < 0.35 * expectedMove;
      // Only a clear ball-like blob may end the flight (its distance from the path is the point
      // here, so it does not count against it); a doubtful one is more likely clutter.
      if ((above || stalled) && this.clarity(det, r) >= 0.5) {
        if (this.landingCandidate !== null) {
          // Two frames in a row off the path: the ball came down at the first of them. Keep only the flight.
          this.dropFrom(this.landingCandidate);
          return 'landed';
        }
        this.landingCandidate = k;
      } else {
        this.landingCandidate = null;
      }
    } else if (Math.hypot(det.x - pred.x, det.y - pred.y) > gate) {
      this.lost++;
      return this.lost > this.cfg.maxLost ? 'lost' : null;
    }
    if (!this.launched && n >= 1) {
      const last = active[n - 1]!;
      if (Math.hypot(det.x - last.x, det.y - last.y) > Math.max(1.5, 0.3 * r) * (k - last.frame)) {
        // It moves: the flight starts here; earlier points (at rest) stay in the track, out of the fit.
        this.launched = true;
        this.fitFrom = n >= 2 && this.restingSince(active) ? this.points.length : 0;
      }
    }
    this.accept(k, det, confidence);
    return null;
  }

  /** True when the track so far has the ball in one place: it was clicked at rest. */
  private restingSince(active: MotionPoint[]): boolean {
    const first = active[0]!;
    const r = this.radius ?? 4;
    return active.every((p) => Math.hypot(p.x - first.x, p.y - first.y) < Math.max(1.5, 0.3 * r));
  }

  private bootstrap(k: number, buffer: FrameBuffer): void {
    const { width, height } = this.cfg;
    const r0 = this.radius;
    const gate = r0 ? Math.max(2 * r0, 10) : Math.max(16, 0.015 * Math.max(width, height));
    const half = gate + 2 * (r0 ?? 10) + 3;
    const roi = roiAround(this.cfg.click.x, this.cfg.click.y, half, width, height);
    const frame = buffer.get(k);
    let best: { det: Detection; score: number; set: 'future' | 'past' | 'both' } | null = null;
    if (roi && frame) {
      // The ball may rest before a kick (past frames hold it) or be carried before a throw:
      // try backgrounds from after the click, before it, and both, and keep the clearest blob.
      for (const set of ['future', 'past', 'both'] as const) {
        const frames = [...buffer.keys()]
          .filter((j) => Math.abs(j - k) >= FOLLOW_DEFAULTS.unknownOffset && (set === 'both' || (set === 'future' ? j > k : j < k)))
          .sort((a, b) => Math.abs(a - k) - Math.abs(b - k));
        const picked = spread(frames, FOLLOW_DEFAULTS.backgroundSamples);
        if (picked.length < 3) continue;
        const bg = this.background(buffer, picked, k, roi);
        const det = detectBall(frame, bg, width, roi, { x: this.cfg.click.x, y: this.cfg.click.y, gate, radius: r0 });
        if (!det) continue;
        const score = (det.contrast / det.noise) * (1 - (0.5 * det.distance) / gate);
        if (!best || score > best.score) best = { det, score, set };
      }
    }
    if (best) {
      if (best.set === 'future') this.untrustedBefore = k;
      const conf = this.confidence(best.det, this.cfg.click, gate, this.radius ?? best.det.minorRadius);
      this.accept(k, { ...best.det, ...this.toRef(k, best.det) }, Math.max(conf, FOLLOW_DEFAULTS.minConfidence));
    } else {
      // Nothing stands out at the click: keep the coach's point, with no confidence, and look on.
      this.untrustedBefore = k;
      const point = { frame: k, ...this.toRef(k, this.cfg.click), weight: 0.0025 };
      this.points.push(point);
      this.byFrame.set(k, point);
      this.conf.set(k, 0);
    }
  }

  private detectAt(
    k: number,
    buffer: FrameBuffer,
    centre: { x: number; y: number },
    reach: number,
    pred: { x: number; y: number },
    r: number,
    predict: ((j: number) => { x: number; y: number }) | null,
  ): Detection | null {
    const { width, height } = this.cfg;
    const frame = buffer.get(k);
    const roi = roiAround(centre.x, centre.y, reach + 2 * r + 3, width, height);
    if (!frame || !roi) return null;
    const exclusion = reach + 2 * r + 2;
    const centreRef = this.toRef(k, centre);
    const firstTracked = this.points[0]?.frame ?? k;
    const cleanPast: number[] = [];
    const cleanAhead: number[] = [];
    const unknown: number[] = [];
    for (const j of buffer.keys()) {
      if (j === k) continue;
      let pos: { x: number; y: number } | null = this.byFrame.get(j) ?? null;
      if (!pos && predict && j >= firstTracked) pos = predict(j);
      if (pos) {
        if (Math.hypot(pos.x - centreRef.x, pos.y - centreRef.y) > exclusion) (j < k ? cleanPast : cleanAhead).push(j);
      } else if (Math.abs(j - k) >= FOLLOW_DEFAULTS.unknownOffset && j > this.untrustedBefore) {
        unknown.push(j);
      }
    }
    const byNearness = (a: number, b: number): number => Math.abs(a - k) - Math.abs(b - k);
    // Measured positions before predicted ones: a prediction is wrong exactly when the ball lands
    // or bounces, and a background taken from frames where it already rests would hide it.
    const want = FOLLOW_DEFAULTS.backgroundSamples;
    // Spread over all the clean past frames kept, not the nearest few: something that moves slowly
    // (a walking player) then covers a pixel in a minority of samples and leaves no ghost.
    const samples = spread(cleanPast.sort(byNearness), want);
    if (samples.length < 5) samples.push(...cleanAhead.sort(byNearness).slice(0, want - samples.length));
    if (samples.length < 5) samples.push(...spread(unknown.sort(byNearness), want - samples.length));
    if (samples.length < 3) return null;
    const bg = this.background(buffer, samples, k, roi);
    const det = detectBall(frame, bg, width, roi, { x: centre.x, y: centre.y, gate: reach, radius: this.radius, prefer: pred });
    if (!det) return null;
    return { ...det, distance: Math.hypot(det.x - pred.x, det.y - pred.y) };
  }

  /** 0–1 from contrast over noise and agreement with the ball's size. */
  private clarity(det: Detection, r: number): number {
    const cSnr = 1 - Math.exp(-det.contrast / det.noise / 8);
    const cSize = r > 0 && det.minorRadius > 0 ? Math.exp(-2 * Math.abs(Math.log(det.minorRadius / r))) : 0.5;
    return cSnr * (0.4 + 0.6 * cSize);
  }

  /** 0–1: clarity, times distance from the prediction and nearness to the edge. */
  private confidence(det: Detection, pred: { x: number; y: number }, gate: number, r: number): number {
    const d = Math.hypot(det.x - pred.x, det.y - pred.y);
    const cPred = 1 / (1 + (d / Math.max(1, 0.5 * gate)) ** 2);
    const edge = Math.min(det.x, this.cfg.width - det.x, det.y, this.cfg.height - det.y);
    const cEdge = Math.sqrt(Math.min(1, Math.max(0, edge / Math.max(r, 1))));
    return this.clarity(det, r) * (0.4 + 0.6 * cPred) * cEdge;
  }

  /** The physical path fitted to the flight's points (cached until a point is added); null while too short. */
  private ballistic(active: MotionPoint[]): BallisticPath | null {
    if (this.pathPoints !== this.points.length) {
      this.path = fitBallistic(active);
      this.pathPoints = this.points.length;
    }
    return this.path;
  }

  /** Whether the path, out of the picture at frame k, comes back into it within the longest wait. */
  private reenters(path: BallisticPath, k: number): boolean {
    const { width, height } = this.cfg;
    const r = this.radius ?? 4;
    for (let j = k + 1; j <= k + this.cfg.maxCoast; j++) {
      const st = path.at(j);
      const s = { ...st, ...this.fromRef(j, st) };
      if (s.x >= r && s.x <= width - r && s.y >= r && s.y <= height - r) return true;
      // Below the picture and falling, or beyond a side and moving away: it will not come back.
      if (s.y > height + r && s.vy >= 0) return false;
      if ((s.x < -r && s.vx <= 0) || (s.x > width + r && s.vx >= 0)) return false;
    }
    return false;
  }

  private accept(k: number, det: Detection, confidence: number): void {
    // Confidence squared: a doubtful point should hardly bend the predicted path.
    const point = { frame: k, x: det.x, y: det.y, weight: Math.max(0.0025, confidence * confidence) };
    const previous = this.points[this.points.length - 1];
    if (previous && k - previous.frame - 1 > FOLLOW_DEFAULTS.segmentGap) this.segmentFrom = this.points.length;
    this.points.push(point);
    this.byFrame.set(k, point);
    this.conf.set(k, confidence);
    this.lost = 0;
    this.coast = 0;
    if (this.cfg.radius === null && this.radiusSamples.length < 7 && det.minorRadius > 0.5) {
      this.radiusSamples.push(det.minorRadius);
      const sorted = [...this.radiusSamples].sort((a, b) => a - b);
      this.radius = sorted[sorted.length >> 1]!;
    }
  }

  private dropFrom(frame: number): void {
    while (this.points.length > 0 && this.points[this.points.length - 1]!.frame >= frame) {
      const dropped = this.points.pop()!;
      this.conf.delete(dropped.frame);
      this.byFrame.delete(dropped.frame);
    }
  }
}

/** Up to `count` items spread evenly over `items` (kept in order), so samples span time rather than bunch. */
function spread<T>(items: T[], count: number): T[] {
  if (items.length <= count) return [...items];
  const out: T[] = [];
  for (let i = 0; i < count; i++) out.push(items[Math.floor((i * items.length) / count)]!);
  return out;
}

/**
 * Follows the ball forward from a click.
 * @param source a video path, a folder of frames, a probe, or extracted frames (see FollowSource).
 * @param start the clicked frame (0-based) and centre in clip pixels; optionally the ball radius.
 * @param options see FollowOptions (capture rate for t, stop rules, memory, cancellation, progress).
 * @returns one point per followed frame from the start frame on, why it stopped, the ball radius.
 * @throws VideoError VIDEO_BAD_REQUEST (start outside the clip or picture, bad options), the probe's
 *   errors for an unreadable clip, VIDEO_DECODE_FAILED, VIDEO_CANCELLED.
 */
export async function followBall(source: FollowSource, start: FollowStart, options: FollowOptions = {}): Promise<FollowResult> {
  for (const [name, v] of [['frame', start.frame], ['x', start.x], ['y', start.y]] as const) {
    if (typeof v !== 'number' || !Number.isFinite(v)) {
      throw new VideoError('VIDEO_BAD_REQUEST', `The start ${name} must be a number (got ${String(v)}).`, { start });
    }
  }
  if (start.radius !== undefined && !(Number.isFinite(start.radius) && start.radius > 0)) {
    throw new VideoError('VIDEO_BAD_REQUEST', `The ball radius must be a number of pixels above 0 (got ${String(start.radius)}).`, { start });
  }
  if (options.captureFps !== undefined && !(Number.isFinite(options.captureFps) && options.captureFps > 0)) {
    throw new VideoError('VIDEO_BAD_REQUEST', `The capture rate must be a number of frames per second above 0 (got ${String(options.captureFps)}).`, {
      captureFps: options.captureFps,
    });
  }
  if (options.signal?.aborted) throw cancelledError('Following');
  const src = await openSource(source, options.captureFps, options.seekAfterS ?? FOLLOW_DEFAULTS.seekAfterS);
  try {
    const fps = options.captureFps ?? src.frameRate;
    if (!Number.isInteger(start.frame) || start.frame < 0 || start.frame >= src.frameCount) {
      throw new VideoError('VIDEO_BAD_REQUEST', `Start frame ${start.frame} is outside the clip: its frames are numbered 0 to ${src.frameCount - 1}.`, {
        frame: start.frame,
        frameCount: src.frameCount,
      });
    }
    if (start.x < 0 || start.x >= src.sourceWidth || start.y < 0 || start.y >= src.sourceHeight) {
      throw new VideoError(
        'VIDEO_BAD_REQUEST',
        `The start point (${start.x}, ${start.y}) is outside the picture, which is ${src.sourceWidth}×${src.sourceHeight} pixels (x 0–${src.sourceWidth}, y 0–${src.sourceHeight} from the top-left corner).`,
        { x: start.x, y: start.y, width: src.sourceWidth, height: src.sourceHeight },
      );
    }
    const sx = src.width / src.sourceWidth;
    const sy = src.height / src.sourceHeight;
    const s = Math.sqrt(sx * sy);
    const maxLost = options.maxLostFrames ?? Math.max(FOLLOW_DEFAULTS.minLostFrames, Math.round(FOLLOW_DEFAULTS.maxLostS * fps));
    const referenceFrame = options.referenceFrame ?? start.frame;
    if (!Number.isInteger(referenceFrame) || referenceFrame < 0 || referenceFrame >= src.frameCount) {
      throw new VideoError('VIDEO_BAD_REQUEST', `Reference frame ${referenceFrame} is outside the clip: its frames are numbered 0 to ${src.frameCount - 1}.`, {
        referenceFrame,
        frameCount: src.frameCount,
      });
    }
    const camera = options.camera === 'moving' ? new CameraMaps(new CameraTracker(src.width, src.height), start.frame) : null;
    const tracker = new Tracker({
      width: src.width,
      height: src.height,
      startFrame: start.frame,
      click: { x: start.x * sx, y: start.y * sy },
      radius: start.radius ? start.radius * s : null,
      maxLost,
      maxSpeed: (options.maxSpeedPxPerFrame ?? src.sourceWidth / 10) * s,
      maxCoast: Math.round(FOLLOW_DEFAULTS.maxCoastS * fps),
    }, camera);

    const frameBytes = src.width * src.height;
    const windowFrames = Math.max(8, Math.min(80, Math.floor((options.maxBufferBytes ?? FOLLOW_DEFAULTS.maxBufferBytes) / frameBytes)));
    const ahead = Math.min(FOLLOW_DEFAULTS.maxLookahead, Math.floor(windowFrames / 2));
    const behind = windowFrames - ahead - 1;
    // Frames before the click serve only the first steps' backgrounds, where they are often
    // untrusted (the ball rested or was carried there): a short lead-in is enough.
    const first = Math.max(0, start.frame - Math.min(behind, FOLLOW_DEFAULTS.leadIn));
    const lastFrame = options.endFrame !== undefined ? Math.min(options.endFrame, src.frameCount - 1) : null;
    if (lastFrame !== null && lastFrame < start.frame) {
      throw new VideoError('VIDEO_BAD_REQUEST', `The end frame ${lastFrame} comes before the start frame ${start.frame}.`, { endFrame: lastFrame });
    }

    const buffer: FrameBuffer = new Map();
    // Frames leaving the window are reused for new ones: no allocation per frame in a long follow.
    const pool: Buffer[] = [];
    let next = start.frame;
    let stopped: FollowStopReason | null = null;
    let newest = -1;
    // A frame waits for its look-ahead only while the track is young or lost; a track in full
    // flight takes its background from the frames behind it, so following stops decoding as soon
    // as it stops.
    const advance = (upTo: number, newestFrame: number): void => {
      while (!stopped && (next <= upTo || (next <= newestFrame && !tracker.needsLookahead()))) {
        stopped = tracker.step(next, buffer);
        options.onProgress?.({ frame: next, framesDone: next - start.frame + 1, points: tracker.points.length });
        next++;
        for (const [j, data] of buffer) {
          if (j >= next - behind) continue;
          buffer.delete(j);
          pool.push(data);
        }
      }
    };
    // Frames past `lastFrame` are still read as look-ahead for the background.
    // With a reference frame outside the frames followed, the camera alone is tracked through to it:
    // those frames go to the camera tracker only (its key frames are copies) and back to the pool.
    const refFrame = camera ? referenceFrame : start.frame;
    const followLast = lastFrame === null ? null : Math.min(src.frameCount - 1, lastFrame + ahead);
    const readLast = followLast === null ? null : Math.max(followLast, refFrame);
    for await (const f of src.read(Math.min(first, refFrame), readLast, options.signal, pool)) {
      camera?.push(f.index, f.data);
      if (f.index < first || stopped) {
        pool.push(f.data);
        if (stopped && f.index >= refFrame) break;
        continue;
      }
      buffer.set(f.index, f.data);
      newest = f.index;
      advance(Math.min(f.index - ahead, lastFrame ?? Infinity), Math.min(f.index, lastFrame ?? Infinity));
      if (stopped && (!camera || f.index >= refFrame)) break;
    }
    if (!stopped) {
      if (newest < start.frame) {
        throw new VideoError('VIDEO_BAD_REQUEST', `Start frame ${start.frame} is beyond the last frame that could be decoded (${newest}).`, { frame: start.frame });
      }
      advance(Math.min(newest, lastFrame ?? Infinity), Math.min(newest, lastFrame ?? Infinity));
    }
    // Times from the frames' own timestamps when they are not evenly spaced (playback seconds,
    // scaled by the stream's nominal rate over the capture rate for slow motion); otherwise
    // frame / fps exactly. Without a stated capture rate the timestamps are real time.
    const times = options.frameTimesS ?? src.frameTimesS;
    const timeScale = options.captureFps ? src.timestampRate / options.captureFps : 1;
    const timeOf = (frame: number): number => (times && times[frame] !== undefined ? (times[frame]! - times[0]!) * timeScale : frame / fps);
    // The track is followed in the start frame's pixels; the result is given in the reference frame's.
    const startToRef = camera && refFrame !== start.frame ? invertRigid(camera.toRef(refFrame)) : IDENTITY;
    const points: FollowPoint[] = tracker.points.map((p) => {
      const own = tracker.fromRef(p.frame, p);
      const ref = applyRigid(startToRef, p.x, p.y);
      return {
      frame: p.frame,
      t: timeOf(p.frame),
      x: own.x / sx,
      y: own.y / sy,
      xRef: ref.x / sx,
      yRef: ref.y / sy,
      confidence: Math.round(tracker.confidenceOf(p.frame) * 1000) / 1000,
      };
    });
    const outOfView: FollowResult['outOfView'] = [];
    for (let i = 1; i < points.length; i++) {
      const from = points[i - 1]!.frame + 1;
      if (points[i]!.frame > from) outOfView.push({ fromFrame: from, toFrame: points[i]!.frame - 1 });
    }
    return {
      points,
      outOfView,
      camera: camera
        ? camera.all().map((k) => {
            const m = composeRigid(startToRef, k);
            return { frame: k.frame, rotRad: m.rotRad, tx: m.tx / sx, ty: m.ty / sy };
          })
        : null,
      referenceFrame: refFrame,
      stoppedBecause: stopped ?? 'end-of-clip',
      radiusPx: tracker.radiusPx / s,
      captureFps: fps,
      framesExamined: tracker.framesExamined,
    };
  } finally {
    await src.close();
  }
}
