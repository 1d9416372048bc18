/**
 * Pure geometry of the Trace frame viewer: where an image pixel lands on the canvas under zoom and pan,
 * and back. No DOM here, so the unit tests can run it in Node.
 *
 * Coordinates:
 * - image coordinates are continuous pixels from the frame's top-left corner, y down; pixel (i, j) covers
 *   [i, i + 1) × [j, j + 1), so its centre is (i + 0.5, j + 0.5). Traced points are stored in these units.
 * - screen coordinates are CSS pixels from the canvas element's top-left corner.
 * The mapping is screen = image · scale + offset (a uniform scale, no rotation), the same affine map the
 * canvas applies with `setTransform(scale, 0, 0, scale, offsetX, offsetY)`.
 */

export interface Vec2 {
  x: number;
  y: number;
}

export interface Size {
  width: number;
  height: number;
}

export interface Viewport {
  /** Screen pixels per image pixel (1 = actual size). */
  scale: number;
  /** Screen position of the image's top-left corner. */
  offsetX: number;
  offsetY: number;
}

/** Zoom limits, declared once: from a quarter of the fitted size to 32 screen pixels per image pixel. */
export const VIEWPORT_DEFAULTS = {
  /** Smallest zoom, as a fraction of the zoom that fits the whole frame. */
  minFitFraction: 0.25,
  /** Largest zoom in screen pixels per image pixel: enough to place a centre to a tenth of a pixel by eye. */
  maxScale: 32,
  /** Empty border kept around the fitted frame, in screen pixels. */
  fitMargin: 8,
  /** Wheel sensitivity: zoom factor per 100 pixels of wheel travel is e^(100·k) ≈ 1.22 for k = 0.002. */
  wheelSensitivity: 0.002,
  /** Part of the frame that must stay on screen while panning, in screen pixels. */
  keepVisible: 48,
} as const;

export function imageToScreen(view: Viewport, p: Vec2): Vec2 {
  return { x: p.x * view.scale + view.offsetX, y: p.y * view.scale + view.offsetY };
}

export function screenToImage(view: Viewport, p: Vec2): Vec2 {
  return { x: (p.x - view.offsetX) / view.scale, y: (p.y - view.offsetY) / view.scale };
}

/** The zoom and offset that show the whole frame centred in the canvas, with a small margin. */
export function fitViewport(image: Size, canvas: Size, margin: number = VIEWPORT_DEFAULTS.fitMargin): Viewport {
  if (image.width <= 0 || image.height <= 0 || canvas.width <= 0 || canvas.height <= 0) {
    return { scale: 1, offsetX: 0, offsetY: 0 };
  }
  const usableW = Math.max(1, canvas.width - 2 * margin);
  const usableH = Math.max(1, canvas.height - 2 * margin);
  const scale = Math.min(usableW / image.width, usableH / image.height);
  return {
    scale,
    offsetX: (canvas.width - image.width * scale) / 2,
    offsetY: (canvas.height - image.height * scale) / 2,
  };
}

/** The allowed zoom range for a frame in a canvas. */
export function scaleLimits(image: Size, canvas: Size): { min: number; max: number } {
  const fit = fitViewport(image, canvas).scale;
  const min = Math.min(fit * VIEWPORT_DEFAULTS.minFitFraction, 1);
  return { min, max: Math.max(VIEWPORT_DEFAULTS.maxScale, min) };
}

/**
 * Zooms by `factor` about a screen point, so the image point under the cursor stays under the cursor.
 * From screen = image·s + o with the image point fixed: o' = p − (p − o)·s'/s.
 */
export function zoomAt(view: Viewport, anchor: Vec2, factor: number, limits: { min: number; max: number }): Viewport {
  if (!Number.isFinite(factor) || factor <= 0) return view;
  const scale = clamp(view.scale * factor, limits.min, limits.max);
  const ratio = scale / view.scale;
  return {
    scale,
    offsetX: anchor.x - (anchor.x - view.offsetX) * ratio,
    offsetY: anchor.y - (anchor.y - view.offsetY) * ratio,
  };
}

/** Sets an absolute zoom (for example 1:1) about a screen point. */
export function zoomTo(view: Viewport, anchor: Vec2, scale: number, limits: { min: number; max: number }): Viewport {
  return zoomAt(view, anchor, scale / view.scale, limits);
}

/** Moves the image by a screen-space displacement. */
export function panBy(view: Viewport, dx: number, dy: number): Viewport {
  return { scale: view.scale, offsetX: view.offsetX + dx, offsetY: view.offsetY + dy };
}

/**
 * Keeps at least `keep` screen pixels of the frame inside the canvas on each axis, so the frame can never be
 * panned out of sight and lost.
 */
export function constrainViewport(view: Viewport, image: Size, canvas: Size, keep: number = VIEWPORT_DEFAULTS.keepVisible): Viewport {
  const w = image.width * view.scale;
  const h = image.height * view.scale;
  const keepX = Math.min(keep, w, canvas.width);
  const keepY = Math.min(keep, h, canvas.height);
  return {
    scale: view.scale,
    offsetX: clamp(view.offsetX, keepX - w, canvas.width - keepX),
    offsetY: clamp(view.offsetY, keepY - h, canvas.height - keepY),
  };
}

/**
 * The zoom factor for one wheel event. Exponential in the wheel travel so that zooming in and back out by the
 * same travel returns to the same scale. `deltaMode` 1 (lines) and 2 (pages) are converted to pixels.
 */
export function wheelZoomFactor(deltaY: number, deltaMode = 0, sensitivity: number = VIEWPORT_DEFAULTS.wheelSensitivity): number {
  const pixels = deltaMode === 1 ? deltaY * 16 : deltaMode === 2 ? deltaY * 400 : deltaY;
  // Note: a single notch can report several hundred pixels on some devices; cap it so one notch never jumps 10×.
  const capped = clamp(pixels, -300, 300);
  return Math.exp(-capped * sensitivity);
}

/** Whether a pointer moved far enough between press and release to count as a drag rather than a click. */
export function isDrag(down: Vec2, up: Vec2, thresholdPx = 4): boolean {
  return Math.hypot(up.x - down.x, up.y - down.y) >= thresholdPx;
}

export function distance(a: Vec2, b: Vec2): number {
  return Math.hypot(b.x - a.x, b.y - a.y);
}

/** Whether an image point lies on the frame. */
export function insideImage(p: Vec2, image: Size): boolean {
  return p.x >= 0 && p.y >= 0 && p.x < image.width && p.y < image.height;
}

/**
 * The index of the point nearest to an image position that is within `maxScreenPx` on screen, or −1.
 * The tolerance is in screen pixels so that picking feels the same at every zoom.
 */
export function pickNearest(points: readonly Vec2[], at: Vec2, view: Viewport, maxScreenPx = 8): number {
  let best = -1;
  let bestD = maxScreenPx / view.scale;
  points.forEach((p, i) => {
    const d = distance(p, at);
    if (d <= bestD) {
      bestD = d;
      best = i;
    }
  });
  return best;
}

export function clamp(v: number, lo: number, hi: number): number {
  return Math.min(hi, Math.max(lo, v));
}

/** Rounds a pixel coordinate to a tenth of a pixel, the precision worth storing from a click. */
export function roundPx(v: number): number {
  return Math.round(v * 10) / 10;
}

/**
 * Two-finger zoom and pan: the image point that sat under the fingers' midpoint when the pinch began stays under
 * their midpoint now, and the zoom changes by the ratio of the fingers' spread (now / at the start), within the
 * limits. `a0`, `b0` are the fingers at the start (with `start` the viewport then), `a1`, `b1` where they are now.
 */
export function pinchViewport(start: Viewport, a0: Vec2, b0: Vec2, a1: Vec2, b1: Vec2, limits: { min: number; max: number }): Viewport {
  const spread0 = distance(a0, b0);
  const spread1 = distance(a1, b1);
  const factor = spread0 > 0 && spread1 > 0 ? spread1 / spread0 : 1;
  const scale = clamp(start.scale * factor, limits.min, limits.max);
  const anchor = screenToImage(start, midpoint(a0, b0));
  const mid = midpoint(a1, b1);
  return { scale, offsetX: mid.x - anchor.x * scale, offsetY: mid.y - anchor.y * scale };
}

export function midpoint(a: Vec2, b: Vec2): Vec2 {
  return { x: (a.x + b.x) / 2, y: (a.y + b.y) / 2 };
}

/** An image point moved by (dx, dy) image pixels and kept on the frame (the keyboard cursor, a nudged mark). */
export function nudgeWithin(p: Vec2, dx: number, dy: number, image: Size): Vec2 {
  return {
    x: roundPx(clamp(p.x + dx, 0, image.width - 0.1)),
    y: roundPx(clamp(p.y + dy, 0, image.height - 0.1)),
  };
}

/**
 * Where the touch magnifier sits: a circle of radius `r` above the finger (below it near the top edge), kept
 * inside the canvas, so the fingertip never covers what it shows.
 */
export function loupePlace(finger: Vec2, canvas: Size, r: number, gap = 24): Vec2 {
  const above = finger.y - gap - r;
  const y = above - r >= 0 ? above : finger.y + gap + r;
  return { x: clamp(finger.x, r, Math.max(r, canvas.width - r)), y: clamp(y, r, Math.max(r, canvas.height - r)) };
}
