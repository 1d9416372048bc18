import { describe, expect, it } from 'vitest';
import { ballCheck, computeCalibration, metresToPixel, pixelToMetres } from '../../../shared/calibration/geometry';
import { cornerProblem, planeHomography, type PlanePoint } from '../../../shared/calibration/plane';
import { calibrationInputSchema, type PlaneCalibrationInput } from '../../../shared/schemas/calibration';

/**
 * A pinhole camera (Hartley & Zisserman, "Multiple View Geometry", 2nd ed., §6.1) turned `yawDeg` about the vertical
 * from square to the plane of flight, `distanceM` from the point it looks at, focal length `focalPx`: maps a point
 * of the plane (x along it, y up, metres) to image pixels with the picture centre at (cx, cy).
 */
function camera(yawDeg: number, distanceM: number, focalPx: number, cx: number, cy: number, lookAt: { x: number; y: number }) {
  const t = (yawDeg * Math.PI) / 180;
  return (x: number, y: number): PlanePoint => {
    // World: X along the plane, Y up, Z towards the plane from the camera's side; camera at C = (lookAt.x + D sinθ, lookAt.y, −D cosθ).
    const px = x - lookAt.x - distanceM * Math.sin(t);
    const py = y - lookAt.y;
    const pz = distanceM * Math.cos(t);
    // Rotate into the camera: its axis points back at lookAt.
    const camX = Math.cos(t) * px + Math.sin(t) * pz;
    const camZ = -Math.sin(t) * px + Math.cos(t) * pz;
    return { xPx: cx + (focalPx * camX) / camZ, yPx: cy - (focalPx * py) / camZ };
  };
}

const view = camera(30, 20, 900, 480, 270, { x: 10, y: 2 });
const W = 7.32;
const H = 2.44;
const corners = [view(12, 0), view(12 + W, 0), view(12 + W, H), view(12, H)];
const plane: PlaneCalibrationInput = {
  method: 'plane',
  plane: { corners, widthM: W, heightM: H },
  origin: view(2, 0),
  direction: 'right',
};

describe('planeHomography', () => {
  it('maps the corners onto the rectangle and any other point of the plane onto its place', () => {
    const h = planeHomography(corners, W, H);
    const frame = computeCalibration({ ...plane, origin: corners[0]! });
    expect(frame.method).toBe('plane');
    for (const [x, y] of [[0, 0], [W, 0], [W, H], [0, H], [-10, 5], [3.3, 9]] as const) {
      const m = pixelToMetres(frame, view(12 + x, y));
      expect(m.xM).toBeCloseTo(x, 9);
      expect(m.yM).toBeCloseTo(y, 9);
    }
    expect(h[8]).toBe(1);
  });
});

describe('computeCalibration with the plane method', () => {
  it('measures from the origin along the flight, and back from metres to pixels', () => {
    const frame = computeCalibration(plane);
    const m = pixelToMetres(frame, view(9, 4.5));
    expect(m.xM).toBeCloseTo(7, 9);
    expect(m.yM).toBeCloseTo(4.5, 9);
    const p = metresToPixel(frame, { xM: 7, yM: 4.5 });
    expect(p.xPx).toBeCloseTo(view(9, 4.5).xPx, 6);
    expect(p.yPx).toBeCloseTo(view(9, 4.5).yPx, 6);
  });

  it('counts x the other way for a flight to the left and heights from a marked line', () => {
    const frame = computeCalibration({ ...plane, direction: 'left', origin: view(20, 1), groundOffsetM: 1 });
    const m = pixelToMetres(frame, view(15, 3));
    expect(m.xM).toBeCloseTo(5, 9);
    expect(m.yM).toBeCloseTo(3, 9);
  });

  it('gives the local scale at the origin for the ball check', () => {
    const frame = computeCalibration(plane);
    // One metre along the ground at the origin, in pixels, against the frame's metres per pixel.
    const a = view(2, 0), b = view(2.001, 0), c = view(2, 0.001);
    const area = Math.abs((b.xPx - a.xPx) * (c.yPx - a.yPx) - (b.yPx - a.yPx) * (c.xPx - a.xPx)) / 1e-6;
    expect(frame.metresPerPixel).toBeCloseTo(1 / Math.sqrt(area), 6);
    expect(frame.h.x).toBeGreaterThan(0.99);
    expect(frame.u.y).toBeLessThan(-0.99);
    expect(ballCheck('football-5', frame.metresPerPixel, 0.22 / frame.metresPerPixel, 0.22).ratio).toBeCloseTo(1, 12);
  });
});

describe('cornerProblem and the plane schema', () => {
  const rect: PlanePoint[] = [{ xPx: 100, yPx: 400 }, { xPx: 500, yPx: 420 }, { xPx: 480, yPx: 150 }, { xPx: 120, yPx: 180 }];

  it('accepts four corners in order round a convex outline', () => {
    expect(cornerProblem(rect)).toBeNull();
    expect(calibrationInputSchema.safeParse({ ...plane, plane: { corners: rect, widthM: 5, heightM: 3 } }).success).toBe(true);
  });

  it('refuses three corners on one line', () => {
    const r = calibrationInputSchema.safeParse({ ...plane, plane: { corners: [rect[0], { xPx: 300, yPx: 410 }, rect[1], rect[3]], widthM: 5, heightM: 3 } });
    expect(r.error!.issues[0]).toMatchObject({
      path: ['plane', 'corners'],
      message: "Corners 1, 2 and 3 lie on one line, so they cannot be three corners of a rectangle: move them onto the rectangle's corners (bottom left, bottom right, top right, top left).",
    });
  });

  it('refuses corners in a crossed order', () => {
    const r = calibrationInputSchema.safeParse({ ...plane, plane: { corners: [rect[0], rect[2], rect[1], rect[3]], widthM: 5, heightM: 3 } });
    expect(r.error!.issues[0]).toMatchObject({
      path: ['plane', 'corners'],
      message: 'The outline of the four corners crosses itself or bends inwards, so they are not in order round the rectangle: click them in turn, bottom left, bottom right, top right, top left.',
    });
  });

  it('refuses corners that start at the top or go round the wrong way', () => {
    expect(cornerProblem([rect[2]!, rect[3]!, rect[0]!, rect[1]!])).toMatch(/^Corners 1 and 2 must be the bottom edge/);
    expect(cornerProblem([rect[1]!, rect[0]!, rect[3]!, rect[2]!])).toMatch(/^The corners go round the wrong way/);
  });

  it('refuses a rectangle of zero or negative size, naming the side', () => {
    const wide = calibrationInputSchema.safeParse({ ...plane, plane: { corners: rect, widthM: 0, heightM: 3 } });
    expect(wide.error!.issues[0]).toMatchObject({
      path: ['plane', 'widthM'],
      message: "The rectangle's width must be more than 0 m: measure the bottom edge, from corner 1 to corner 2, and enter it.",
    });
    const tall = calibrationInputSchema.safeParse({ ...plane, plane: { corners: rect, widthM: 5, heightM: -1 } });
    expect(tall.error!.issues[0]).toMatchObject({
      path: ['plane', 'heightM'],
      message: "The rectangle's height must be more than 0 m: measure a side edge, from corner 2 to corner 3, and enter it.",
    });
  });

  it('reads a body without a method as the two-point scale', () => {
    const r = calibrationInputSchema.parse({ scale: { a: { xPx: 0, yPx: 0 }, b: { xPx: 10, yPx: 0 }, distanceM: 1 }, origin: { xPx: 0, yPx: 0 }, direction: 'right' });
    expect(r.method).toBe('scale');
  });
});
