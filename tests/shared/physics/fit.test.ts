import { describe, expect, it } from 'vitest';
import {
  airFromConditions, ballProps, fitFlight, fittedPath, generateTrack, type FitResult, type SyntheticTrackSpec,
} from '../../../shared/physics/index';
import { fitDragWithMlLm } from '../../../scripts/fit/reference';

// Recovery tests: flights generated with known parameters by shared/physics/synthetic.ts (seeded),
// fitted back. Tolerances: within 3 standard errors of the truth (and a stated absolute bound).
const air = airFromConditions({ airTemperatureK: 288.15, airPressurePa: 101325, relativeHumidityPct: 50 });
const punt: SyntheticTrackSpec = {
  launch: { speed: 28, angleDeg: 35, height: 0.2 }, ball: 'football-5', air, aero: { model: 'drag', cd: 0.25 }, fps: 60, noise: 0.02, seed: 1,
};

function fit(spec: SyntheticTrackSpec, options: Parameters<typeof fitFlight>[1] = {}): { fit: FitResult; truth: ReturnType<typeof generateTrack> } {
  const truth = generateTrack(spec);
  return { truth, fit: fitFlight(truth, { ball: spec.ball, air: spec.air, windSpeed: spec.windSpeed, ...options }) };
}

function within(value: number | null, truth: number, error: number | null, sigmas = 3): void {
  expect(value).not.toBeNull();
  expect(error).not.toBeNull();
  expect(Math.abs(value! - truth)).toBeLessThanOrEqual(sigmas * error!);
}

describe('fitFlight recovery', () => {
  it('recovers launch and C_d of a full drag flight', () => {
    const { fit: f, truth } = fit(punt, { model: 'drag' });
    expect(f.converged).toBe(true);
    within(f.cd, 0.25, f.cdError);
    expect(Math.abs(f.cd! - 0.25)).toBeLessThan(0.005);
    within(f.launch.speed, 28, f.launch.speedError);
    within(f.launch.angleDeg, 35, f.launch.angleDegError);
    within(f.launch.height, 0.2, f.launch.heightError);
    within(f.flight.carry, truth.truth.carry, f.errors.carry);
    within(f.flight.apexHeight, truth.truth.apexHeight, f.errors.apexHeight);
    within(f.flight.flightTime, truth.truth.flightTime, f.errors.flightTime);
    expect(f.rms).toBeGreaterThan(0.02);
    expect(f.rms).toBeLessThan(0.04); // 2 cm per coordinate: rms distance ≈ 2·√2 cm
    expect(f.noise).toBeCloseTo(0.02, 2);
    expect(f.extrapolated).toBe(false);
  });

  it('recovers launch and C_d from a track that ends long before landing, and extrapolates the carry', () => {
    // 0.8 s of a 2.8 s flight.
    const { fit: f, truth } = fit({ ...punt, endTime: 0.8, seed: 2 }, { model: 'drag' });
    within(f.cd, 0.25, f.cdError);
    within(f.launch.speed, 28, f.launch.speedError);
    within(f.flight.carry, truth.truth.carry, f.errors.carry);
    expect(f.errors.carry!).toBeGreaterThan(0.05);
    expect(f.extrapolated).toBe(true);
    expect(f.warnings.map((w) => w.code)).toContain('EXTRAPOLATED');
    expect(f.trackEnd).toBeCloseTo(0.8, 10);
  });

  it('sets outliers aside with the robust loss and names them', () => {
    const spec = { ...punt, seed: 3, outliers: { count: 5, size: 1.5 } };
    const { fit: robust, truth } = fit(spec, { model: 'drag' });
    const { fit: plain } = fit(spec, { model: 'drag', loss: 'linear' });
    within(robust.cd, 0.25, robust.cdError);
    within(robust.launch.speed, 28, robust.launch.speedError);
    expect(robust.outliers).toEqual(truth.outlierIndices.map((i) => i + 1));
    expect(robust.warnings.map((w) => w.code)).toContain('OUTLIERS_DOWNWEIGHTED');
    // Plain least squares is pulled by the same points: its error is larger and its noise estimate inflated.
    expect(Math.abs(plain.cd! - 0.25)).toBeGreaterThan(Math.abs(robust.cd! - 0.25));
    expect(plain.rms).toBeGreaterThan(3 * robust.noise);
  });

  it('recovers a light ball whose flight is strongly asymmetric', () => {
    // Table tennis ball (2.7 g): descent much longer than ascent; common practice (REFERENCES: light balls depart far from the parabola).
    const { fit: f, truth } = fit({ launch: { speed: 20, angleDeg: 50, height: 1 }, ball: 'table-tennis', air, aero: { model: 'drag', cd: 0.47 }, fps: 120, noise: 0.005, seed: 4 }, { model: 'drag' });
    expect(truth.truth.timeDown / truth.truth.timeUp).toBeGreaterThan(1.5);
    within(f.cd, 0.47, f.cdError);
    expect(Math.abs(f.cd! - 0.47)).toBeLessThan(0.01);
    within(f.launch.speed, 20, f.launch.speedError);
    within(f.flight.carry, truth.truth.carry, f.errors.carry);
    expect(f.vacuum.carry).toBeGreaterThan(2 * f.flight.carry);
  });

  it.each([
    ['backspin', 0.15],
    ['topspin', -0.12],
  ])('recovers C_d and C_L of a %s flight with the drag-lift model, and auto picks it', (_name, cl) => {
    const spec: SyntheticTrackSpec = { ...punt, aero: { model: 'drag-lift', cd: 0.25, cl }, seed: 5 };
    const { fit: f } = fit(spec, { model: 'drag-lift' });
    within(f.cd, 0.25, f.cdError);
    within(f.cl, cl, f.clError);
    expect(Math.sign(f.cl!)).toBe(Math.sign(cl));
    const { fit: auto } = fit(spec);
    expect(auto.model).toBe('drag-lift');
    // Either the drag fit lost by more than 2 in BIC, or the lift term was so decisive that it was skipped.
    const sel = auto.modelSelection!;
    if (sel.drag === null) expect(Math.abs(auto.cl! / auto.clError!)).toBeGreaterThan(6);
    else expect(sel.dragLift).toBeLessThan(sel.drag - 2);
  });

  it('keeps the drag model when the flight carries no lift', () => {
    // Information criterion (BIC, Schwarz 1978): lift must improve the fit by more than its parameter costs.
    const { fit: auto } = fit({ ...punt, seed: 6 });
    expect(auto.model).toBe('drag');
    expect(auto.modelSelection!.chosen).toBe('drag');
  });

  it('recovers a linear-drag flight of a slow light object', () => {
    const { fit: f } = fit({ launch: { speed: 3, angleDeg: 60, height: 0.5 }, aero: { model: 'linear', dragRate: 0.8 }, fps: 120, noise: 0.002, seed: 7 }, { model: 'linear' });
    within(f.dragRate, 0.8, f.dragRateError);
    within(f.launch.speed, 3, f.launch.speedError);
    expect(f.cd).toBeNull();
    expect(f.terminalSpeed).toBeCloseTo(9.80665 / f.dragRate!, 10);
  });

  it('recovers a shot put with the vacuum model', () => {
    const { fit: f, truth } = fit({ launch: { speed: 13.5, angleDeg: 38, height: 2.1 }, ball: 'shot-men', air, aero: { model: 'vacuum' }, fps: 60, noise: 0.01, seed: 8 }, { model: 'vacuum' });
    within(f.launch.speed, 13.5, f.launch.speedError);
    within(f.launch.angleDeg, 38, f.launch.angleDegError);
    within(f.flight.carry, truth.truth.carry, f.errors.carry);
    expect(f.flight.carry).toBeCloseTo(f.vacuum.carry, 10);
  });

  it('recovers C_d when the wind is given', () => {
    const { fit: f } = fit({ ...punt, windSpeed: -4, seed: 9 }, { model: 'drag' });
    within(f.cd, 0.25, f.cdError);
    expect(f.setup.windSpeed).toBe(-4);
  });

  it('gives the same flight for a track filmed the other way round and on another clock', () => {
    const a = fit({ ...punt, seed: 10 }, { model: 'drag' }).fit;
    const b = fit({ ...punt, seed: 10, direction: -1, x0: 50, t0: 12.5 }, { model: 'drag' }).fit;
    expect(b.track.direction).toBe(-1);
    expect(b.track.t0).toBeCloseTo(12.5, 12);
    expect(b.launch.x).toBeCloseTo(50, 1);
    expect(b.cd!).toBeCloseTo(a.cd!, 8);
    expect(b.flight.carry).toBeCloseTo(a.flight.carry, 6);
    expect(b.launch.speed).toBeCloseTo(a.launch.speed, 7);
  });

  it('draws a fitted path through the traced points, in the track\'s own coordinates', () => {
    const { fit: f, truth } = fit({ ...punt, seed: 11, direction: -1, x0: 40, t0: 3 }, { model: 'drag' });
    const path = fittedPath(f, 201);
    expect(path.t[0]).toBeCloseTo(3, 12);
    expect(path.x[0]).toBeCloseTo(truth.x[0], 1);
    expect(path.x[200]).toBeLessThan(path.x[0]);
    expect(Math.abs(path.y[200])).toBeLessThan(1e-6);
  });

  it('returns plain data without NaN or Infinity for every model', () => {
    // Convention (CONVENTIONS.md, numerical code): never a silent NaN; unknowns are null.
    const finiteEverywhere = (v: unknown): boolean => typeof v === 'number' ? Number.isFinite(v)
      : Array.isArray(v) ? v.every(finiteEverywhere) : v && typeof v === 'object' ? Object.values(v).every(finiteEverywhere) : true;
    const track = generateTrack({ ...punt, endTime: 0.4, seed: 41 });
    for (const model of ['auto', 'vacuum', 'linear', 'drag', 'drag-lift'] as const) {
      const f = fitFlight(track, { ball: 'football-5', air, model });
      expect(finiteEverywhere(f)).toBe(true);
      expect(JSON.parse(JSON.stringify(f)).model).toBe(f.model);
    }
  });

  it('gives standard errors that match the scatter of repeated fits', () => {
    // Property of least squares (Seber & Wild 1989 §5.2): over repeated noisy tracks, the spread of C_d and
    // of the launch speed agrees with the reported standard error (within 35 % for 40 fits) and 2σ covers ≥ 85 %.
    const cds: number[] = [], speeds: number[] = [], cdErr: number[] = [], spErr: number[] = [];
    let covered = 0;
    const N = 40;
    for (let s = 0; s < N; s++) {
      const { fit: f } = fit({ ...punt, fps: 30, noise: 0.03, seed: 1000 + s }, { model: 'drag', scaleCheck: false });
      cds.push(f.cd!); speeds.push(f.launch.speed); cdErr.push(f.cdError!); spErr.push(f.launch.speedError!);
      if (Math.abs(f.cd! - 0.25) < 2 * f.cdError!) covered++;
    }
    const sd = (v: number[]) => { const m = v.reduce((a, b) => a + b) / v.length; return Math.sqrt(v.reduce((a, b) => a + (b - m) ** 2, 0) / (v.length - 1)); };
    const mean = (v: number[]) => v.reduce((a, b) => a + b) / v.length;
    expect(sd(cds) / mean(cdErr)).toBeGreaterThan(0.65);
    expect(sd(cds) / mean(cdErr)).toBeLessThan(1.35);
    expect(sd(speeds) / mean(spErr)).toBeGreaterThan(0.65);
    expect(sd(speeds) / mean(spErr)).toBeLessThan(1.35);
    expect(covered / N).toBeGreaterThanOrEqual(0.85);
  });

  it('agrees with ml-levenberg-marquardt on odex-integrated flights', () => {
    // Reference: ml-levenberg-marquardt v5.1 with central-difference Jacobian on odex v2.0.4 trajectories
    // (scripts/fit/reference.ts): no code shared with the engine. Plain least squares on both sides.
    const truth = generateTrack({ ...punt, fps: 20, seed: 12 });
    const ours = fitFlight(truth, { ball: 'football-5', air, model: 'drag', loss: 'linear', scaleCheck: false, rtol: 1e-11 });
    const ref = fitDragWithMlLm(truth, ballProps('football-5'), air, [0, 0.3, 22, 15, 0.3], 'odex', { maxIterations: 40 });
    const mine = [ours.launch.x, ours.launch.height, ours.launch.vx, ours.launch.vy, ours.cd!];
    expect(ours.covariance!.params).toEqual(['x0', 'y0', 'vx0', 'vy0', 'cd']);
    // Agreement to a thousandth of each parameter's standard error: the same minimum, found twice.
    mine.forEach((v, i) => expect(Math.abs(v - ref.params[i])).toBeLessThan(1e-3 * Math.sqrt(ours.covariance!.matrix[i][i])));
  });
});

describe('fitFlight prior and scale check', () => {
  it('falls back on the catalogue C_d range when a short noisy track cannot determine it, and says so', () => {
    const { fit: f } = fit({ ...punt, endTime: 0.35, noise: 0.04, fps: 30, seed: 13 }, { model: 'drag' });
    expect(f.cdPrior!.used).toBe(true);
    expect(f.warnings.map((w) => w.code)).toContain('CD_PRIOR_USED');
    expect(f.warnings.find((w) => w.code === 'CD_PRIOR_USED')!.message).toMatch(/0\.2–0\.3/);
    expect(f.cd!).toBeGreaterThan(0.15);
    expect(f.cd!).toBeLessThan(0.35);
    expect(f.cdError!).toBeLessThanOrEqual(0.025 + 1e-9);
  });

  it('recognises a ball given by mass and diameter alone and takes its catalogue C_d range as the prior, naming it', () => {
    // 0.43 kg and 0.22 m lie within IFAB Law 2 (410–450 g, 68–70 cm circumference, from memory); football C_d 0.2–0.3
    // above the crisis (Asai et al., Sports Engineering 10 (2007) 101, from memory).
    const truth = generateTrack({ ...punt, endTime: 0.35, noise: 0.04, fps: 30, seed: 13 });
    const f = fitFlight(truth, { ball: { massKg: 0.43, diameterM: 0.22, name: 'the ball' }, air, model: 'drag' });
    expect(f.cdPrior).toMatchObject({ mean: 0.25, used: true, assumedBall: { id: 'football-5', name: 'Association football, size 5' } });
    expect(f.cdPrior!.sd).toBeCloseTo(0.025, 12);
    const warning = f.warnings.find((w) => w.code === 'CD_PRIOR_USED')!.message;
    expect(warning).toMatch(/0\.2–0\.3 for Association football, size 5/);
    expect(warning).toMatch(/assumed to be one: its 0\.43 kg and 0\.22 m lie within that ball's rulebook ranges/);
    // The same prior as the catalogue ball's own: the same C_d to the fit's own precision.
    const named = fitFlight(truth, { ball: 'football-5', air, model: 'drag' });
    expect(Math.abs(f.cd! - named.cd!)).toBeLessThan(0.1 * f.cdError!);
  });

  it('keeps the generic prior for a ball whose mass and diameter match no catalogue ball', () => {
    const truth = generateTrack({ ...punt, endTime: 0.35, noise: 0.04, fps: 30, seed: 13 });
    const f = fitFlight(truth, { ball: { massKg: 0.3, diameterM: 0.22, name: 'the ball' }, air, model: 'drag' });
    expect(f.cdPrior!.assumedBall).toBeNull();
    expect(f.cdPrior!.source).toMatch(/generic ball range 0\.1–0\.6/);
  });

  it('prefers a ball’s own C_d range to a catalogue ball its mass and diameter match', () => {
    const truth = generateTrack({ ...punt, endTime: 0.35, noise: 0.04, fps: 30, seed: 13 });
    const f = fitFlight(truth, { ball: { massKg: 0.43, diameterM: 0.22, cdRange: { min: 0.3, max: 0.4 }, name: 'Club size 5' }, air, model: 'drag' });
    expect(f.cdPrior).toMatchObject({ mean: 0.35, assumedBall: null });
    expect(f.cdPrior!.source).toMatch(/0\.3–0\.4 for Club size 5/);
  });

  it('does not use the prior when the track determines C_d', () => {
    const { fit: f } = fit(punt, { model: 'drag' });
    expect(f.cdPrior!.used).toBe(false);
  });

  it('agrees with gravity when the calibration is right', () => {
    const { fit: f } = fit(punt, { model: 'drag' });
    expect(f.scaleCheck!.status).toBe('agrees');
    expect(Math.abs(f.scaleCheck!.factor - 1)).toBeLessThan(3 * f.scaleCheck!.error! + 1e-3);
  });

  it('warns when the calibration scale is 6 % off', () => {
    const { fit: f } = fit({ ...punt, positionScale: 1.06, seed: 14 }, { model: 'drag' });
    expect(f.scaleCheck!.factor).toBeCloseTo(1.06, 2);
    expect(f.warnings.map((w) => w.code)).toContain('SCALE_DISAGREES');
    expect(f.warnings.find((w) => w.code === 'SCALE_DISAGREES')!.message).toMatch(/calibration scale/);
  });
});
