import { describe, expect, it } from 'vitest';
import {
  airFromConditions, applyChange, bestAngle, fitFlight, generateTrack, isPhysicsError, planFlight, plannerGrid, sensitivities,
  speedForCarry, standardAir, whatIf, type FlightSetup,
} from '../../../shared/physics/index';
import { flyToGround, initialState, motionCoefficients } from '../../../shared/physics/flight';

const G = 9.80665;
const air = standardAir();
const kick: FlightSetup = { launch: { speed: 28, angleDeg: 35, height: 0.2 }, ball: 'football-5', air, aero: { model: 'drag', cd: 0.25 } };
const vacuum: FlightSetup = { launch: { speed: 14, angleDeg: 40, height: 2 }, air, aero: { model: 'vacuum' } };

describe('bestAngle', () => {
  it('reproduces the shot-put optimum from a height without air', () => {
    // Lichtenberg & Wills, Am. J. Phys. 46 (1978) 546: sin θ* = v/√(2v² + 2gh); v = 14 m/s, h = 2 m → 42.39°.
    const r = bestAngle(vacuum);
    const exact = (Math.asin(14 / Math.sqrt(2 * 196 + 2 * G * 2)) * 180) / Math.PI;
    expect(exact).toBeCloseTo(42.39, 2);
    expect(Math.abs(r.angleDeg - exact)).toBeLessThan(1e-3);
  });

  it('gives 45° from the ground without air', () => {
    // Any mechanics text (Taylor 2005 ch. 2): R = v² sin 2θ / g is largest at 45°.
    expect(bestAngle({ ...vacuum, launch: { ...vacuum.launch, height: 0 } }).angleDeg).toBeCloseTo(45, 3);
  });

  it('lies below 45° once air acts, and lower still from a raised release', () => {
    // Common practice (PRODUCT.md, planner): drag lowers the optimum; so does release height.
    const ground = bestAngle({ ...kick, launch: { ...kick.launch, height: 0 } });
    const raised = bestAngle({ ...kick, launch: { ...kick.launch, height: 2.5 } });
    expect(ground.angleDeg).toBeLessThan(44);
    expect(raised.angleDeg).toBeLessThan(ground.angleDeg);
    const near = planFlight({ ...kick, launch: { ...kick.launch, height: 0, angleDeg: ground.angleDeg + 2 } }).carry;
    expect(ground.carry).toBeGreaterThan(near);
  });
});

describe('sensitivities', () => {
  it('gives the closed-form derivatives of the no-air range from the ground', () => {
    // R = v² sin2θ/g: ∂R/∂v = 2v sin2θ/g; ∂R/∂θ = 2v² cos2θ/g (per radian).
    const s = sensitivities({ ...vacuum, launch: { speed: 14, angleDeg: 30, height: 0 } });
    const th = Math.PI / 6;
    expect(s.carryPerSpeed).toBeCloseTo((2 * 14 * Math.sin(2 * th)) / G, 8);
    expect(s.carryPerDegree).toBeCloseTo(((2 * 196 * Math.cos(2 * th)) / G) * (Math.PI / 180), 8);
  });

  it('matches central differences of the flight with drag and lift', () => {
    const setup: FlightSetup = { ...kick, aero: { model: 'drag-lift', cd: 0.25, cl: 0.1 }, windSpeed: -2 };
    const s = sensitivities(setup);
    const carry = (change: Parameters<typeof applyChange>[1]) => planFlight(applyChange(setup, change)).carry;
    const d = 1e-4;
    expect(s.carryPerSpeed).toBeCloseTo((carry({ speed: 28 + d }) - carry({ speed: 28 - d })) / (2 * d), 4);
    expect(s.carryPerDegree).toBeCloseTo((carry({ angleDeg: 35 + d }) - carry({ angleDeg: 35 - d })) / (2 * d), 4);
    expect(s.carryPerHeight).toBeCloseTo((carry({ height: 0.2 + d }) - carry({ height: 0.2 - d })) / (2 * d), 4);
    expect(s.carryPerWind).toBeCloseTo((carry({ windSpeed: -2 + d }) - carry({ windSpeed: -2 - d })) / (2 * d), 3);
    const apex = (change: Parameters<typeof applyChange>[1]) => planFlight(applyChange(setup, change)).apexHeight;
    expect(s.apexPerDegree).toBeCloseTo((apex({ angleDeg: 35 + d }) - apex({ angleDeg: 35 - d })) / (2 * d), 4);
  });
});

describe('speedForCarry', () => {
  it('inverts the no-air range from the ground', () => {
    // v = √(gR / sin 2θ).
    const r = speedForCarry({ ...vacuum, launch: { speed: 10, angleDeg: 40, height: 0 } }, 30);
    expect(r.speed).toBeCloseTo(Math.sqrt((G * 30) / Math.sin((80 * Math.PI) / 180)), 8);
  });

  it('finds the speed that carries a target with drag, and flies it back to the target', () => {
    const r = speedForCarry(kick, 50);
    expect(r.flight.carry).toBeCloseTo(50, 6);
    expect(planFlight({ ...kick, launch: { ...kick.launch, speed: r.speed } }).carry).toBeCloseTo(50, 6);
    expect(r.iterations).toBeLessThan(12);
  });

  it('says when a target is out of reach', () => {
    try {
      speedForCarry({ ...kick, ball: 'table-tennis', aero: { model: 'drag', cd: 0.47 } }, 200);
      expect.unreachable();
    } catch (e) {
      expect(isPhysicsError(e) && e.code).toBe('TARGET_OUT_OF_REACH');
      expect((e as Error).message).toMatch(/even 150 m\/s carries/);
    }
  });
});

describe('plannerGrid', () => {
  it('fills a 61 × 61 grid that agrees with single flights and a 1e-12 reference', () => {
    const g = plannerGrid(kick, { min: 10, max: 40 }, { min: 10, max: 70 });
    expect(g.speeds).toHaveLength(61);
    expect(g.anglesDeg).toHaveLength(61);
    expect(g.carry).toHaveLength(61);
    expect(g.carry[0]).toHaveLength(61);
    const { c, kappa } = motionCoefficients(kick.aero, { massKg: 0.43, diameterM: 0.69 / Math.PI }, air, 0, G);
    for (const [i, j] of [[0, 0], [30, 45], [60, 60], [12, 7]]) {
      const th = (g.anglesDeg[i] * Math.PI) / 180, v = g.speeds[j];
      const ref = flyToGround(c, kappa, initialState(0, 0.2, v * Math.cos(th), v * Math.sin(th)), [], 1e-12, true);
      expect(Math.abs(g.carry[i][j] - ref.landing.y[0])).toBeLessThan(1e-4);
      expect(Math.abs(g.flightTime[i][j] - ref.landing.t)).toBeLessThan(1e-6);
    }
    for (const row of g.carry) for (let j = 1; j < row.length; j++) expect(row[j]).toBeGreaterThan(row[j - 1]);
  });

  it('refuses an empty axis', () => {
    expect(() => plannerGrid(kick, { min: 20, max: 10 }, { min: 10, max: 70 })).toThrowError(/min < max/);
  });
});

describe('whatIf', () => {
  it('carries farther on a warm upland day than on a cool sea-level evening', () => {
    // Common practice: thinner air, less drag.
    const evening = { ...kick, air: airFromConditions({ airTemperatureK: 283.15, airPressurePa: 101500, relativeHumidityPct: 80 }) };
    const r = whatIf(evening, { conditions: { airTemperatureK: 300.15, altitudeM: 1600, relativeHumidityPct: 30 } });
    expect(r.delta.carry).toBeGreaterThan(2);
    expect(r.delta.carry).toBeCloseTo(r.changed.carry - r.base.carry, 12);
    expect(r.changed.flightTime).toBeGreaterThan(r.base.flightTime);
  });

  it('moves carry, apex and hang time with the launch speed', () => {
    const r = whatIf(kick, { speed: 30 });
    expect(r.delta.carry).toBeGreaterThan(0);
    expect(r.delta.apexHeight).toBeGreaterThan(0);
    expect(r.delta.flightTime).toBeGreaterThan(0);
  });

  it('flies a fitted flight again from its setup', () => {
    const track = generateTrack({ launch: kick.launch, ball: 'football-5', air, aero: kick.aero, fps: 60, noise: 0.01, seed: 31 });
    const fit = fitFlight(track, { ball: 'football-5', air, model: 'drag' });
    const again = planFlight(fit.setup);
    expect(again.carry).toBeCloseTo(fit.flight.carry, 5);
    expect(sensitivities(fit.setup).carryPerSpeed).toBeGreaterThan(1);
  });
});
