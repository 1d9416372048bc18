/**
 * Pure edits of a traced track on the Trace screen. A track holds at most one point per frame, kept sorted by
 * frame; every function returns a new array and leaves its input untouched (the undo history keeps the old ones).
 */

export type PointSource = 'manual' | 'auto';

export interface TracePoint {
  /** Frame index (0-based, as the server numbers frames). */
  frame: number;
  /** Ball centre in image pixels from the frame's top-left corner, y down. */
  x: number;
  y: number;
  /** Apparent ball radius in image pixels, when the coach dragged it out or the follower measured it. */
  radius: number | null;
  source: PointSource;
  /** Follower's confidence 0–1; null for points placed by hand. */
  confidence: number | null;
}

export function sortByFrame(points: readonly TracePoint[]): TracePoint[] {
  return [...points].sort((a, b) => a.frame - b.frame);
}

export function pointAt(points: readonly TracePoint[], frame: number): TracePoint | undefined {
  return points.find((p) => p.frame === frame);
}

/** Places (or replaces) the hand-placed point of a frame. A replaced point keeps its radius unless a new one is given. */
export function placePoint(points: readonly TracePoint[], frame: number, x: number, y: number, radius?: number | null): TracePoint[] {
  const old = pointAt(points, frame);
  const next: TracePoint = {
    frame,
    x,
    y,
    radius: radius === undefined ? (old?.radius ?? null) : radius,
    source: 'manual',
    confidence: null,
  };
  return sortByFrame([...points.filter((p) => p.frame !== frame), next]);
}

/** Sets the apparent radius of a frame's point; a no-op (same array) when the frame has no point. */
export function setRadius(points: readonly TracePoint[], frame: number, radius: number | null): TracePoint[] {
  if (!pointAt(points, frame)) return [...points];
  return points.map((p) => (p.frame === frame ? { ...p, radius } : p));
}

export function deletePoint(points: readonly TracePoint[], frame: number): TracePoint[] {
  return points.filter((p) => p.frame !== frame);
}

/** Removes every point after `frame`, as "follow again from here" replaces what the follower found before. */
export function truncateAfter(points: readonly TracePoint[], frame: number): TracePoint[] {
  return points.filter((p) => p.frame <= frame);
}

/** Merges followed points into a track: followed frames replace what was there, other frames stay. */
export function mergePoints(points: readonly TracePoint[], incoming: readonly TracePoint[]): TracePoint[] {
  const frames = new Set(incoming.map((p) => p.frame));
  return sortByFrame([...points.filter((p) => !frames.has(p.frame)), ...incoming]);
}

/** The nearest frame that has a point, searching in `direction`; undefined when there is none. */
export function nextPointFrame(points: readonly TracePoint[], from: number, direction: 1 | -1): number | undefined {
  const frames = points.map((p) => p.frame).filter((f) => (direction > 0 ? f > from : f < from));
  if (frames.length === 0) return undefined;
  return direction > 0 ? Math.min(...frames) : Math.max(...frames);
}

/** First and last traced frame, or null for an empty track. */
export function frameSpan(points: readonly TracePoint[]): { first: number; last: number } | null {
  if (points.length === 0) return null;
  let first = Infinity;
  let last = -Infinity;
  for (const p of points) {
    first = Math.min(first, p.frame);
    last = Math.max(last, p.frame);
  }
  return { first, last };
}

/** Whether two tracks hold the same points (used to tell whether there is anything unsaved). */
export function sameTrack(a: readonly TracePoint[], b: readonly TracePoint[]): boolean {
  if (a.length !== b.length) return false;
  const sa = sortByFrame(a);
  const sb = sortByFrame(b);
  return sa.every((p, i) => {
    const q = sb[i];
    return p.frame === q.frame && p.x === q.x && p.y === q.y && p.radius === q.radius && p.source === q.source;
  });
}

/** Below this follower confidence a mark is shown as doubtful and worth a look. */
export const DOUBTFUL_CONFIDENCE = 0.5;

/** Whether the follower was unsure of a mark (hand marks are never doubtful). */
export function isDoubtful(p: Pick<TracePoint, 'source' | 'confidence'>): boolean {
  return p.source === 'auto' && p.confidence !== null && p.confidence < DOUBTFUL_CONFIDENCE;
}

/** The next doubtful mark after `from` (wrapping to the first), or undefined when there is none. */
export function nextDoubtfulFrame(points: readonly TracePoint[], from: number): number | undefined {
  const doubtful = points.filter(isDoubtful).map((p) => p.frame);
  if (doubtful.length === 0) return undefined;
  return doubtful.find((f) => f > from) ?? Math.min(...doubtful);
}

/** Moves to another frame, clamped to the clip: `delta` frames from `current` among `frameCount` frames (0-based). */
export function stepFrame(current: number, delta: number, frameCount: number): number {
  if (frameCount <= 0) return 0;
  return Math.min(frameCount - 1, Math.max(0, Math.round(current + delta)));
}
