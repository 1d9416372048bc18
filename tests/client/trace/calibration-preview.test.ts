import { describe, expect, it } from 'vitest';
import { isProblem, levelAngleDeg, medianRadius, scalePreview } from '../../../src/components/trace/calibration-preview';

describe('scalePreview', () => {
  it('gives metres per pixel from a 3-4-5 segment and a known distance', () => {
    const s = scalePreview({ x: 10, y: 10 }, { x: 310, y: 410 }, 10);
    expect(isProblem(s)).toBe(false);
    if (!isProblem(s)) {
      expect(s.lengthPx).toBeCloseTo(500, 12);
      expect(s.metresPerPixel).toBeCloseTo(0.02, 15);
    }
  });

  it('says the points coincide when both scale points are the same', () => {
    const s = scalePreview({ x: 5, y: 5 }, { x: 5.2, y: 5 }, 10);
    expect(isProblem(s) && s.problem).toMatch(/on top of each other/);
  });

  it('asks for a positive distance when the distance is zero', () => {
    const s = scalePreview({ x: 0, y: 0 }, { x: 100, y: 0 }, 0);
    expect(isProblem(s) && s.problem).toMatch(/more than 0/);
  });
});

describe('levelAngleDeg', () => {
  it('is positive for a line rising to the right on screen and ignores the order of its points', () => {
    const a = { x: 0, y: 100 };
    const b = { x: 100, y: 100 - 100 * Math.tan((2 * Math.PI) / 180) };
    expect(levelAngleDeg(a, b)).toBeCloseTo(2, 10);
    expect(levelAngleDeg(b, a)).toBeCloseTo(2, 10);
    expect(levelAngleDeg({ x: 0, y: 0 }, { x: 50, y: 0 })).toBe(0);
  });

  it('reports a problem when the two level points coincide', () => {
    expect(isProblem(levelAngleDeg({ x: 1, y: 1 }, { x: 1, y: 1 }))).toBe(true);
  });
});

describe('medianRadius', () => {
  it('takes the median of the radii that exist', () => {
    expect(medianRadius([null, 4, 10, 6, undefined])).toBe(6);
    expect(medianRadius([4, 8])).toBe(6);
    expect(medianRadius([null])).toBeNull();
  });
});
