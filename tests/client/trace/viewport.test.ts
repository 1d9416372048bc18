import { describe, expect, it } from 'vitest';
import {
  constrainViewport,
  fitViewport,
  imageToScreen,
  isDrag,
  loupePlace,
  nudgeWithin,
  panBy,
  pinchViewport,
  pickNearest,
  scaleLimits,
  screenToImage,
  VIEWPORT_DEFAULTS,
  wheelZoomFactor,
  zoomAt,
  zoomTo,
  type Viewport,
} from '../../../src/components/trace/viewport';

const image = { width: 1920, height: 1080 };
const canvas = { width: 976, height: 556 };
const wide = { min: 0.01, max: 100 };

describe('viewport coordinates', () => {
  it('maps an image point to the screen and back to the same point when zoomed and panned', () => {
    const view: Viewport = { scale: 3.7, offsetX: -812.25, offsetY: 41.5 };
    for (const p of [{ x: 0, y: 0 }, { x: 123.4, y: 987.6 }, { x: 1919.9, y: 1079.9 }]) {
      const back = screenToImage(view, imageToScreen(view, p));
      expect(back.x).toBeCloseTo(p.x, 10);
      expect(back.y).toBeCloseTo(p.y, 10);
    }
  });

  it('puts image pixel centres where the canvas transform draws them when the scale is 2', () => {
    const view: Viewport = { scale: 2, offsetX: 10, offsetY: 20 };
    // Pixel (3, 4) covers screen [16, 18) × [28, 30); its centre (3.5, 4.5) lands at (17, 29).
    expect(imageToScreen(view, { x: 3.5, y: 4.5 })).toEqual({ x: 17, y: 29 });
    expect(screenToImage(view, { x: 16, y: 28 })).toEqual({ x: 3, y: 4 });
  });
});

describe('fitViewport', () => {
  it('centres the whole frame inside the margin when the canvas is wider than the frame', () => {
    const v = fitViewport(image, canvas, 8);
    const topLeft = imageToScreen(v, { x: 0, y: 0 });
    const bottomRight = imageToScreen(v, { x: image.width, y: image.height });
    expect(topLeft.y).toBeCloseTo(8, 9);
    expect(bottomRight.y).toBeCloseTo(canvas.height - 8, 9);
    expect(topLeft.x).toBeCloseTo(canvas.width - bottomRight.x, 9);
    expect(topLeft.x).toBeGreaterThanOrEqual(8);
  });

  it('falls back to actual size when the canvas has no size yet', () => {
    expect(fitViewport(image, { width: 0, height: 0 })).toEqual({ scale: 1, offsetX: 0, offsetY: 0 });
  });
});

describe('zoomAt', () => {
  it('keeps the image point under the pointer fixed when zooming in and out', () => {
    const start = fitViewport(image, canvas);
    const anchor = { x: 300.5, y: 211.25 };
    const under = screenToImage(start, anchor);
    let v = start;
    for (const f of [1.5, 2, 0.3, 7.25]) {
      v = zoomAt(v, anchor, f, wide);
      const now = screenToImage(v, anchor);
      expect(now.x).toBeCloseTo(under.x, 9);
      expect(now.y).toBeCloseTo(under.y, 9);
    }
  });

  it('stops at the zoom limits and still keeps the pointed pixel fixed when clamped', () => {
    const limits = scaleLimits(image, canvas);
    const start = fitViewport(image, canvas);
    const anchor = { x: 400, y: 300 };
    const under = screenToImage(start, anchor);
    const v = zoomAt(start, anchor, 1e6, limits);
    expect(v.scale).toBe(VIEWPORT_DEFAULTS.maxScale);
    expect(screenToImage(v, anchor).x).toBeCloseTo(under.x, 9);
    const small = zoomAt(start, anchor, 1e-6, limits);
    expect(small.scale).toBeCloseTo(start.scale * VIEWPORT_DEFAULTS.minFitFraction, 12);
  });

  it('returns the view unchanged when the factor is not a positive number', () => {
    const v: Viewport = { scale: 2, offsetX: 5, offsetY: 6 };
    expect(zoomAt(v, { x: 1, y: 1 }, Number.NaN, wide)).toBe(v);
    expect(zoomAt(v, { x: 1, y: 1 }, 0, wide)).toBe(v);
  });

  it('reaches an absolute scale with zoomTo when asked for actual pixels', () => {
    const v = zoomTo(fitViewport(image, canvas), { x: 10, y: 10 }, 1, wide);
    expect(v.scale).toBeCloseTo(1, 12);
  });
});

describe('wheelZoomFactor', () => {
  it('returns to the same scale when the wheel goes forward and back by the same travel', () => {
    const view = fitViewport(image, canvas);
    const anchor = { x: 123, y: 77 };
    const there = zoomAt(view, anchor, wheelZoomFactor(-120), wide);
    const back = zoomAt(there, anchor, wheelZoomFactor(120), wide);
    expect(back.scale).toBeCloseTo(view.scale, 12);
    expect(back.offsetX).toBeCloseTo(view.offsetX, 9);
    expect(back.offsetY).toBeCloseTo(view.offsetY, 9);
  });

  it('zooms in when the wheel moves up and converts line units to pixels when deltaMode is 1', () => {
    expect(wheelZoomFactor(-100)).toBeGreaterThan(1);
    expect(wheelZoomFactor(-3, 1)).toBeCloseTo(wheelZoomFactor(-48), 12);
  });

  it('caps one huge wheel event when a device reports thousands of pixels', () => {
    expect(wheelZoomFactor(-5000)).toBeCloseTo(wheelZoomFactor(-300), 12);
  });
});

describe('panBy and constrainViewport', () => {
  it('moves the image by the screen displacement when panned', () => {
    const v = panBy({ scale: 4, offsetX: 1, offsetY: 2 }, 30, -12);
    expect(v).toEqual({ scale: 4, offsetX: 31, offsetY: -10 });
    expect(screenToImage(v, { x: 31, y: -10 })).toEqual({ x: 0, y: 0 });
  });

  it('keeps part of the frame on screen when panned far away', () => {
    const v = constrainViewport({ scale: 2, offsetX: 1e5, offsetY: -1e5 }, image, canvas, 48);
    expect(v.offsetX).toBe(canvas.width - 48);
    expect(v.offsetY).toBe(48 - image.height * 2);
  });

  it('leaves a view alone when the frame is well inside the canvas', () => {
    const fit = fitViewport(image, canvas);
    expect(constrainViewport(fit, image, canvas)).toEqual(fit);
  });
});

describe('isDrag and pickNearest', () => {
  it('tells a click from a drag by the threshold distance', () => {
    expect(isDrag({ x: 10, y: 10 }, { x: 12, y: 12 })).toBe(false);
    expect(isDrag({ x: 10, y: 10 }, { x: 14, y: 10 })).toBe(true);
  });

  it('picks the nearest point within a screen tolerance that shrinks in image pixels as the zoom grows', () => {
    const points = [{ x: 100, y: 100 }, { x: 104, y: 100 }, { x: 300, y: 50 }];
    const at = { x: 103, y: 100 };
    expect(pickNearest(points, at, { scale: 1, offsetX: 0, offsetY: 0 }, 8)).toBe(1);
    // At scale 8 the tolerance is 1 image pixel: the point 1 px away is still found, 3 px away is not.
    expect(pickNearest(points, { x: 101, y: 100 }, { scale: 8, offsetX: 0, offsetY: 0 }, 8)).toBe(0);
    expect(pickNearest(points, { x: 102, y: 103 }, { scale: 8, offsetX: 0, offsetY: 0 }, 8)).toBe(-1);
  });
});

describe('pinchViewport', () => {
  const start: Viewport = { scale: 0.5, offsetX: 8, offsetY: 8 };
  const under = (v: Viewport, p: { x: number; y: number }) => screenToImage(v, p);

  it('zooms by the ratio of the fingers\' spread and keeps the image point under their midpoint', () => {
    const a0 = { x: 400, y: 300 }, b0 = { x: 500, y: 300 };
    const next = pinchViewport(start, a0, b0, { x: 350, y: 300 }, { x: 550, y: 300 }, wide);
    expect(next.scale).toBeCloseTo(1, 10);
    const before = under(start, { x: 450, y: 300 });
    const after = under(next, { x: 450, y: 300 });
    expect(after.x).toBeCloseTo(before.x, 10);
    expect(after.y).toBeCloseTo(before.y, 10);
  });

  it('pans with the midpoint when the fingers move together without spreading', () => {
    const next = pinchViewport(start, { x: 100, y: 100 }, { x: 200, y: 100 }, { x: 130, y: 60 }, { x: 230, y: 60 }, wide);
    expect(next).toEqual({ scale: 0.5, offsetX: 38, offsetY: -32 });
  });

  it('stays within the zoom limits and ignores fingers on one spot', () => {
    const limits = { min: 0.25, max: 2 };
    expect(pinchViewport(start, { x: 0, y: 0 }, { x: 10, y: 0 }, { x: 0, y: 0 }, { x: 1000, y: 0 }, limits).scale).toBe(2);
    expect(pinchViewport(start, { x: 5, y: 5 }, { x: 5, y: 5 }, { x: 5, y: 5 }, { x: 50, y: 5 }, limits).scale).toBe(0.5);
  });
});

describe('nudgeWithin and loupePlace', () => {
  it('moves a point by whole image pixels, rounded to a tenth, and keeps it on the frame', () => {
    expect(nudgeWithin({ x: 10.04, y: 20 }, 1, -1, image)).toEqual({ x: 11, y: 19 });
    expect(nudgeWithin({ x: 3, y: 1075 }, -10, 10, image)).toEqual({ x: 0, y: 1079.9 });
  });

  it('puts the magnifier above the finger, below it near the top edge, and inside the canvas', () => {
    const c = { width: 390, height: 220 };
    expect(loupePlace({ x: 200, y: 180 }, c, 50, 20)).toEqual({ x: 200, y: 110 });
    expect(loupePlace({ x: 200, y: 40 }, c, 50, 20)).toEqual({ x: 200, y: 110 });
    expect(loupePlace({ x: 5, y: 200 }, c, 50, 20)).toEqual({ x: 50, y: 130 });
  });
});
