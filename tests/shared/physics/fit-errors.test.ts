import { describe, expect, it } from 'vitest';
import { airFromConditions, fitFlight, generateTrack, isPhysicsError, type FitOptions, type SyntheticTrackSpec, type Track } from '../../../shared/physics/index';

// One test per message a coach or analyst can see when a track cannot be fitted as it is.
const air = airFromConditions({ airTemperatureK: 288.15 });
const punt: SyntheticTrackSpec = {
  launch: { speed: 28, angleDeg: 35, height: 0.2 }, ball: 'football-5', air, aero: { model: 'drag', cd: 0.25 }, fps: 60, noise: 0.02, seed: 21,
};
const good = generateTrack(punt);
const opts: FitOptions = { ball: 'football-5', air };

function codeOf(track: Track, options: FitOptions = opts): { code: string; message: string } {
  try {
    fitFlight(track, options);
  } catch (e) {
    if (isPhysicsError(e)) return { code: e.code, message: e.message };
    throw e;
  }
  throw new Error('expected the fit to fail');
}

describe('fitFlight bad input', () => {
  it('refuses fewer than five points and asks for more frames', () => {
    const r = codeOf({ t: good.t.slice(0, 4), x: good.x.slice(0, 4), y: good.y.slice(0, 4) });
    expect(r.code).toBe('TOO_FEW_POINTS');
    expect(r.message).toMatch(/4 points; a fit needs at least 5/);
  });

  it('refuses unsorted times and names the sample', () => {
    const t = good.t.slice();
    [t[10], t[11]] = [t[11], t[10]];
    const r = codeOf({ t, x: good.x, y: good.y });
    expect(r.code).toBe('UNSORTED_TIMES');
    expect(r.message).toMatch(/Point 12 \(t=0\.166667 s\) comes before point 11 \(t=0\.183333 s\)/);
  });

  it('refuses duplicate times and asks to remove the duplicate', () => {
    const t = good.t.slice();
    t[6] = t[5];
    const r = codeOf({ t, x: good.x, y: good.y });
    expect(r.code).toBe('DUPLICATE_TIMES');
    expect(r.message).toMatch(/Points 6 and 7 have the same time/);
  });

  it('refuses a NaN and names the point', () => {
    const y = good.y.slice();
    y[8] = NaN;
    const r = codeOf({ t: good.t, x: good.x, y });
    expect(r.code).toBe('NON_FINITE');
    expect(r.message).toMatch(/Point 9 has a missing or non-numeric value/);
  });

  it('refuses columns of different lengths', () => {
    expect(codeOf({ t: good.t, x: good.x.slice(1), y: good.y }).code).toBe('LENGTH_MISMATCH');
  });

  it('refuses a flight that never rises, and fits it when descending flights are allowed', () => {
    const down = generateTrack({ ...punt, launch: { speed: 25, angleDeg: -8, height: 2.8 }, ball: 'tennis', aero: { model: 'drag', cd: 0.55 }, fps: 120, noise: 0.005 });
    const r = codeOf(down, { ball: 'tennis', air });
    expect(r.code).toBe('NEVER_RISES');
    expect(r.message).toMatch(/Start the trace at the release frame/);
    const f = fitFlight(down, { ball: 'tennis', air, allowDescending: true, model: 'drag' });
    expect(f.launch.angleDeg).toBeCloseTo(-8, 0);
    expect(f.warnings.map((w) => w.code)).toContain('NEVER_RISES');
    expect(f.flight.apexHeight).toBeCloseTo(f.launch.height, 12);
  });

  it('catches positions entered in millimetres with the scale check', () => {
    const r = codeOf(generateTrack({ ...punt, positionScale: 1000 }));
    expect(r.code).toBe('SCALE_SUSPECT');
    expect(r.message).toMatch(/millimetres: give them in metres/);
  });

  it('catches positions entered in feet with the gravity-free fit', () => {
    const r = codeOf(generateTrack({ ...punt, positionScale: 3.2808 }));
    expect(r.code).toBe('SCALE_SUSPECT');
    expect(r.message).toMatch(/feet/);
    expect(r.message).toMatch(/gravity free/);
  });

  it('catches a slow-motion clip timed at its playback rate', () => {
    const r = codeOf(generateTrack({ ...punt, timeScale: 8 }));
    expect(r.code).toBe('SCALE_SUSPECT');
    expect(r.message).toMatch(/stretched ×8: enter the capture frame rate/);
  });

  it('blames the missing lift, not the calibration, when the drag model is fitted to a topspin ball', () => {
    // A light ball with strong topspin looks 2–3 g heavy to a model without lift.
    const spin = generateTrack({ launch: { speed: 24, angleDeg: 38, height: 2.5 }, ball: 'table-tennis', air, aero: { model: 'drag-lift', cd: 0.45, cl: -0.2 }, fps: 200, noise: 0.01, seed: 26 });
    const f = fitFlight(spin, { ball: 'table-tennis', air, model: 'drag' });
    expect(f.scaleCheck!.factor).toBeGreaterThan(1.2);
    const w = f.warnings.find((x) => x.code === 'SCALE_DISAGREES');
    expect(w!.message).toMatch(/drag-lift model explains the flight as well with standard gravity/);
    expect(fitFlight(spin, { ball: 'table-tennis', air }).model).toBe('drag-lift');
  });

  it('says a track that does not fall at all has its axes or level line wrong', () => {
    const flat = { t: good.t, x: good.x, y: good.t.map((t) => 1.5 + 0.001 * Math.sin(40 * t)) };
    const r = codeOf(flat);
    expect(r.code).toBe('SCALE_SUSPECT');
    expect(r.message).toMatch(/hardly falls at all .* check that y points up/);
  });

  it('warns about an impossible negative C_d and says what to check', () => {
    // A ball that gains speed in flight (here generated with C_d = −0.1) cannot be physical.
    const f = fitFlight(generateTrack({ ...punt, aero: { model: 'drag', cd: -0.1 } }), { ...opts, model: 'drag' });
    expect(f.cd!).toBeLessThan(0);
    const w = f.warnings.find((x) => x.code === 'NEGATIVE_CD');
    expect(w).toBeDefined();
    expect(w!.message).toMatch(/impossible.*calibration scale, the wind/);
    expect(f.terminalSpeed).toBeNull();
  });

  it('asks for the ball when a drag model has none', () => {
    const r = codeOf(good, { air });
    expect(r.code).toBe('MISSING_BALL');
    expect(r.message).toMatch(/mass \(kg\) and diameter \(m\)/);
  });

  it('refuses an unknown model name', () => {
    expect(codeOf(good, { ...opts, model: 'magnus' as never }).code).toBe('BAD_OPTION');
  });

  it('assumes standard air with a warning when none is given', () => {
    const f = fitFlight(good, { ball: 'football-5', model: 'drag' });
    expect(f.warnings.map((w) => w.code)).toContain('AIR_ASSUMED');
    expect(f.setup.air.densityKgM3).toBe(1.225);
  });

  it('flags a C_d far outside the ball\'s range', () => {
    const f = fitFlight(generateTrack({ ...punt, aero: { model: 'drag', cd: 0.6 } }), { ...opts, model: 'drag' });
    expect(f.warnings.map((w) => w.code)).toContain('CD_OUTSIDE_RANGE');
  });

  it('suggests the drag model when linear drag is fitted to a fast ball', () => {
    const f = fitFlight(good, { ...opts, model: 'linear' });
    expect(f.warnings.map((w) => w.code)).toContain('LINEAR_DRAG_UNUSUAL');
  });
});
