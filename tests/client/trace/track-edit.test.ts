import { describe, expect, it } from 'vitest';
import {
  deletePoint,
  frameSpan,
  isDoubtful,
  mergePoints,
  nextDoubtfulFrame,
  nextPointFrame,
  placePoint,
  sameTrack,
  setRadius,
  stepFrame,
  truncateAfter,
  type TracePoint,
} from '../../../src/components/trace/track-edit';

const auto = (frame: number, x: number, y: number): TracePoint => ({ frame, x, y, radius: 6, source: 'auto', confidence: 0.9 });

describe('track edits', () => {
  it('keeps one point per frame sorted by frame when points are placed out of order', () => {
    let t: TracePoint[] = [];
    t = placePoint(t, 5, 50, 60);
    t = placePoint(t, 2, 20, 30);
    t = placePoint(t, 5, 51, 61);
    expect(t.map((p) => [p.frame, p.x, p.y])).toEqual([[2, 20, 30], [5, 51, 61]]);
    expect(t[1].source).toBe('manual');
  });

  it('keeps the old radius when a followed point is moved by hand', () => {
    const t = placePoint([auto(3, 1, 2)], 3, 4, 5);
    expect(t[0]).toEqual({ frame: 3, x: 4, y: 5, radius: 6, source: 'manual', confidence: null });
  });

  it('leaves the input array untouched when editing', () => {
    const before = [auto(1, 1, 1), auto(2, 2, 2)];
    const copy = structuredClone(before);
    placePoint(before, 1, 9, 9, 3);
    deletePoint(before, 2);
    setRadius(before, 1, 12);
    expect(before).toEqual(copy);
  });

  it('sets a radius only on the frame that has a point', () => {
    const t = [auto(1, 1, 1)];
    expect(setRadius(t, 1, 9)[0].radius).toBe(9);
    expect(setRadius(t, 2, 9)).toEqual(t);
  });

  it('replaces followed frames and keeps the rest when merging a follow result', () => {
    const t = [auto(1, 1, 1), auto(2, 2, 2), auto(3, 3, 3)];
    const merged = mergePoints(t, [auto(3, 30, 30), auto(4, 40, 40)]);
    expect(merged.map((p) => [p.frame, p.x])).toEqual([[1, 1], [2, 2], [3, 30], [4, 40]]);
  });

  it('drops the points after a frame when truncating for a new follow', () => {
    expect(truncateAfter([auto(1, 1, 1), auto(2, 2, 2), auto(3, 3, 3)], 2).map((p) => p.frame)).toEqual([1, 2]);
  });

  it('finds the neighbouring marked frames and the span of the track', () => {
    const t = [auto(4, 0, 0), auto(9, 0, 0), auto(15, 0, 0)];
    expect(nextPointFrame(t, 9, 1)).toBe(15);
    expect(nextPointFrame(t, 9, -1)).toBe(4);
    expect(nextPointFrame(t, 15, 1)).toBeUndefined();
    expect(frameSpan(t)).toEqual({ first: 4, last: 15 });
    expect(frameSpan([])).toBeNull();
  });

  it('compares tracks regardless of order and notices a moved point', () => {
    const a = [auto(1, 1, 1), auto(2, 2, 2)];
    expect(sameTrack(a, [a[1], a[0]])).toBe(true);
    expect(sameTrack(a, placePoint(a, 2, 2.1, 2))).toBe(false);
    expect(sameTrack(a, a.slice(1))).toBe(false);
  });
});

describe('stepFrame', () => {
  it('clamps to the first and last frame when stepping past either end', () => {
    expect(stepFrame(3, -10, 100)).toBe(0);
    expect(stepFrame(95, 10, 100)).toBe(99);
    expect(stepFrame(50, 10, 100)).toBe(60);
    expect(stepFrame(7, 1, 0)).toBe(0);
  });
});

describe('doubtful marks', () => {
  it('counts only followed marks below the confidence threshold and finds the next one, wrapping round', () => {
    const t: TracePoint[] = [
      { frame: 1, x: 0, y: 0, radius: null, source: 'auto', confidence: 0.9 },
      { frame: 2, x: 0, y: 0, radius: null, source: 'auto', confidence: 0.2 },
      { frame: 3, x: 0, y: 0, radius: null, source: 'manual', confidence: null },
      { frame: 7, x: 0, y: 0, radius: null, source: 'auto', confidence: 0.49 },
    ];
    expect(t.filter(isDoubtful).map((p) => p.frame)).toEqual([2, 7]);
    expect(nextDoubtfulFrame(t, 2)).toBe(7);
    expect(nextDoubtfulFrame(t, 7)).toBe(2);
    expect(nextDoubtfulFrame(t.slice(0, 1), 0)).toBeUndefined();
  });
});
