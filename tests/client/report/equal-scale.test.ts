import { describe, expect, it } from 'vitest';
import { boxOf, equalScaleAxes, niceStep } from '../../../src/components/report/equal-scale';

describe('niceStep', () => {
  it('rounds up to 1, 2 or 5 times a power of ten when given any positive step', () => {
    expect(niceStep(0.7)).toBe(1);
    expect(niceStep(1.2)).toBe(2);
    expect(niceStep(3)).toBe(5);
    expect(niceStep(7)).toBe(10);
    expect(niceStep(0.031)).toBeCloseTo(0.05, 12);
    expect(niceStep(2)).toBe(2);
  });

  it('falls back to 1 when the step is zero, negative or not finite', () => {
    expect(niceStep(0)).toBe(1);
    expect(niceStep(-3)).toBe(1);
    expect(niceStep(Number.NaN)).toBe(1);
  });
});

describe('boxOf', () => {
  it('skips non-finite points and answers null when none is left', () => {
    expect(boxOf([[1, 2], [Number.NaN, 5], [4, -1]])).toEqual({ xMin: 1, xMax: 4, yMin: -1, yMax: 2 });
    expect(boxOf([[Number.NaN, 1]])).toBeNull();
    expect(boxOf([])).toBeNull();
  });
});

describe('equalScaleAxes', () => {
  const perPixel = (a: ReturnType<typeof equalScaleAxes>, size: { width: number; height: number }) => ({
    x: (a.xMax - a.xMin) / size.width,
    y: (a.yMax - a.yMin) / size.height,
  });

  it('gives x and y the same units per pixel when the flight is long and flat', () => {
    const size = { width: 900, height: 300 };
    const a = equalScaleAxes({ xMin: 0, xMax: 60, yMin: 0, yMax: 12 }, size);
    const s = perPixel(a, size);
    expect(s.x).toBeCloseTo(s.y, 12);
    expect(a.unitsPerPixel).toBeCloseTo(s.x, 12);
  });

  it('gives x and y the same units per pixel when the flight is tall and short', () => {
    const size = { width: 800, height: 400 };
    const a = equalScaleAxes({ xMin: -1.5, xMax: 6, yMin: 0.4, yMax: 22 }, size);
    const s = perPixel(a, size);
    expect(s.x).toBeCloseTo(s.y, 12);
  });

  it('holds every data point inside the ranges when the box is padded and snapped', () => {
    const box = { xMin: 3.3, xMax: 47.9, yMin: 0.2, yMax: 18.4 };
    for (const size of [{ width: 300, height: 600 }, { width: 1200, height: 260 }, { width: 640, height: 640 }]) {
      const a = equalScaleAxes(box, size);
      expect(a.xMin).toBeLessThanOrEqual(box.xMin);
      expect(a.xMax).toBeGreaterThanOrEqual(box.xMax);
      expect(a.yMin).toBeLessThanOrEqual(box.yMin);
      expect(a.yMax).toBeGreaterThanOrEqual(box.yMax);
    }
  });

  it('keeps the ground as the bottom edge when every point lies above it', () => {
    const a = equalScaleAxes({ xMin: 0, xMax: 40, yMin: 0.5, yMax: 15 }, { width: 800, height: 300 });
    expect(a.yMin).toBe(0);
  });

  it('keeps the ground and the origin as edges when the flight ends a hair below the ground', () => {
    const a = equalScaleAxes({ xMin: 0, xMax: 27, yMin: -1e-9, yMax: 10.6 }, { width: 1000, height: 300 });
    expect(a.yMin).toBe(0);
    expect(a.xMin).toBe(0);
  });

  it('snaps the lower edges to a multiple of the tick step when the data start off-grid', () => {
    const a = equalScaleAxes({ xMin: 3.3, xMax: 47.9, yMin: -0.6, yMax: 18.4 }, { width: 800, height: 320 });
    expect(Math.abs(a.xMin / a.step - Math.round(a.xMin / a.step))).toBeLessThan(1e-9);
    expect(Math.abs(a.yMin / a.step - Math.round(a.yMin / a.step))).toBeLessThan(1e-9);
    expect(a.yMin).toBeLessThan(-0.6);
  });

  it('recomputes a wider x range at the same scale when the chart grows wider', () => {
    const box = { xMin: 0, xMax: 30, yMin: 0, yMax: 10 };
    const narrow = equalScaleAxes(box, { width: 600, height: 300 });
    const wide = equalScaleAxes(box, { width: 1200, height: 300 });
    expect(wide.xMax - wide.xMin).toBeGreaterThan(narrow.xMax - narrow.xMin);
    const s = perPixel(wide, { width: 1200, height: 300 });
    expect(s.x).toBeCloseTo(s.y, 12);
  });

  it('gives a single point a visible window when the box has no extent', () => {
    const a = equalScaleAxes({ xMin: 5, xMax: 5, yMin: 2, yMax: 2 }, { width: 400, height: 200 });
    expect(a.xMax).toBeGreaterThan(a.xMin);
    expect(a.yMax).toBeGreaterThan(a.yMin);
    expect(a.xMin).toBeLessThanOrEqual(5);
    expect(a.xMax).toBeGreaterThanOrEqual(5);
  });

  it('throws a RangeError when the plotting area has no size yet', () => {
    expect(() => equalScaleAxes({ xMin: 0, xMax: 1, yMin: 0, yMax: 1 }, { width: 0, height: 200 })).toThrow(RangeError);
  });
});
