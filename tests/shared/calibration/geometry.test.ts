import { describe, expect, it } from 'vitest';
import { ballCheck, computeCalibration, metresToPixel, pixelToMetres } from '../../../shared/calibration/geometry';
import { calibrationInputSchema, type ScaleCalibrationInput } from '../../../shared/schemas/calibration';

const base: ScaleCalibrationInput = {
  method: 'scale',
  scale: { a: { xPx: 100, yPx: 400 }, b: { xPx: 300, yPx: 400 }, distanceM: 10 },
  origin: { xPx: 100, yPx: 400 },
  direction: 'right',
};

describe('computeCalibration', () => {
  it('gives metres per pixel as the known distance over the pixel distance', () => {
    expect(computeCalibration(base).metresPerPixel).toBe(10 / 200);
    const diagonal = computeCalibration({ ...base, scale: { a: { xPx: 0, yPx: 0 }, b: { xPx: 30, yPx: 40 }, distanceM: 5 } });
    expect(diagonal.metresPerPixel).toBe(5 / 50);
  });

  it('maps x along the flight and y up from the origin when the camera is level', () => {
    const cal = computeCalibration(base);
    expect(pixelToMetres(cal, { xPx: 300, yPx: 400 })).toEqual({ xM: 10, yM: 0 });
    expect(pixelToMetres(cal, { xPx: 100, yPx: 300 })).toEqual({ xM: 0, yM: 5 });
  });

  it('counts heights from the ground below the origin when the origin is on a line H m up', () => {
    const cal = computeCalibration({ ...base, groundOffsetM: 2 });
    expect(cal.originHeightM).toBe(2);
    expect(pixelToMetres(cal, { xPx: 100, yPx: 400 })).toEqual({ xM: 0, yM: 2 });
    expect(pixelToMetres(cal, { xPx: 100, yPx: 300 })).toEqual({ xM: 0, yM: 7 });
    expect(metresToPixel(cal, { xM: 0, yM: 2 })).toEqual({ xPx: 100, yPx: 400 });
  });

  it('maps an origin off the picture like any other (the ground 40 px below a 360 px frame)', () => {
    const cal = computeCalibration({ ...base, origin: { xPx: 100, yPx: 400 }, scale: { a: { xPx: 100, yPx: 400 }, b: { xPx: 300, yPx: 400 }, distanceM: 10 } });
    // The bottom edge of a 360 px picture lies 40 px, 2 m, above that ground.
    expect(pixelToMetres(cal, { xPx: 100, yPx: 360 }).yM).toBeCloseTo(2, 12);
  });

  it('refuses a marked line below the ground', () => {
    const res = calibrationInputSchema.safeParse({ ...base, groundOffsetM: -0.5 });
    expect(res.success).toBe(false);
    expect(res.error!.issues[0]!.message).toBe('The marked line cannot be below the ground: mark the ground itself, or a line above it and give its height.');
  });

  it('mirrors x when the ball flies to the left', () => {
    const cal = computeCalibration({ ...base, direction: 'left' });
    const m = pixelToMetres(cal, { xPx: 60, yPx: 380 });
    expect(m.xM).toBeCloseTo(2, 12);
    expect(m.yM).toBeCloseTo(1, 12);
  });

  it('takes the horizontal from a tilted level line, whichever end is clicked first', () => {
    // A camera rolled 10° clockwise: the ground line rises to the left on screen.
    const tilt = (10 * Math.PI) / 180;
    const level = { a: { xPx: 0, yPx: 0 }, b: { xPx: 100 * Math.cos(tilt), yPx: 100 * Math.sin(tilt) } };
    const forward = computeCalibration({ ...base, level });
    const backward = computeCalibration({ ...base, level: { a: level.b, b: level.a } });
    expect(forward.levelAngleDeg).toBeCloseTo(-10, 10);
    expect(backward.levelAngleDeg).toBeCloseTo(-10, 10);
    // A point 2 m (40 px) along the tilted ground and 1 m (20 px) square to it, upwards.
    const p = { xPx: 100 + 40 * Math.cos(tilt) + 20 * Math.sin(tilt), yPx: 400 + 40 * Math.sin(tilt) - 20 * Math.cos(tilt) };
    const m = pixelToMetres(forward, p);
    expect(m.xM).toBeCloseTo(2, 10);
    expect(m.yM).toBeCloseTo(1, 10);
    expect(pixelToMetres(backward, p).xM).toBeCloseTo(2, 10);
  });

  it('round-trips metres to pixels and back (property: the mapping is a similarity)', () => {
    const cal = computeCalibration({ ...base, level: { a: { xPx: 10, yPx: 20 }, b: { xPx: 400, yPx: -35 } }, direction: 'left' });
    for (const [x, y] of [[0, 0], [12.5, 3.25], [-4, 17], [40, -1]] as const) {
      const px = metresToPixel(cal, { xM: x, yM: y });
      const back = pixelToMetres(cal, px);
      expect(back.xM).toBeCloseTo(x, 10);
      expect(back.yM).toBeCloseTo(y, 10);
    }
    // Distances scale by metres per pixel in every direction (square pixels).
    const a = metresToPixel(cal, { xM: 0, yM: 0 });
    const b = metresToPixel(cal, { xM: 3, yM: 4 });
    expect(Math.hypot(b.xPx - a.xPx, b.yPx - a.yPx) * cal.metresPerPixel).toBeCloseTo(5, 10);
  });
});

describe('calibrationInputSchema', () => {
  it('refuses identical scale points, naming scale.b', () => {
    const r = calibrationInputSchema.safeParse({ ...base, scale: { ...base.scale, b: base.scale.a } });
    expect(r.success).toBe(false);
    expect(r.error!.issues[0]).toMatchObject({ path: ['scale', 'b'], message: 'The two scale points are the same pixel: put them at the two ends of the known distance.' });
  });

  it('refuses a zero or negative distance', () => {
    for (const distanceM of [0, -3]) {
      const r = calibrationInputSchema.safeParse({ ...base, scale: { ...base.scale, distanceM } });
      expect(r.error!.issues[0]).toMatchObject({ path: ['scale', 'distanceM'], message: 'The known distance must be more than 0 m.' });
    }
  });

  it('refuses a level line whose ends coincide', () => {
    const r = calibrationInputSchema.safeParse({ ...base, level: { a: { xPx: 5, yPx: 5 }, b: { xPx: 5, yPx: 5 } } });
    expect(r.error!.issues[0]!.path).toEqual(['level', 'b']);
  });
});

describe('ballCheck', () => {
  it('reports the apparent over catalogue diameter and whether it is within 15 %', () => {
    const c = ballCheck('football-5', 0.01, 24, 0.22);
    expect(c.apparentDiameterM).toBeCloseTo(0.24, 12);
    expect(c.ratio).toBeCloseTo(0.24 / 0.22, 12);
    expect(c.ok).toBe(true);
    expect(ballCheck('football-5', 0.01, 30, 0.22).ok).toBe(false);
  });
});
