import { describe, expect, it } from 'vitest';
import {
  airFromDensity, ballProps, crossSectionArea, isPhysicsError, simulateFlight, standardAir, vacuumFlight, type BallProps,
} from '../../../shared/physics/index';

const G = 9.80665;
const air = standardAir();

/** No-air range from height h (Taylor, Classical Mechanics (2005) ch. 1–2). */
function vacuumRange(v: number, deg: number, h: number): number {
  const th = (deg * Math.PI) / 180;
  return ((v * Math.cos(th)) / G) * (v * Math.sin(th) + Math.sqrt((v * Math.sin(th)) ** 2 + 2 * G * h));
}

describe('vacuumFlight and the vacuum model', () => {
  it.each([[14, 42, 2], [25, 30, 0.5], [8, 60, 0], [30, -10, 3]])('reproduces the no-air range from a height (v=%d m/s, θ=%d°, h=%d m)', (v, deg, h) => {
    // Taylor (2005) ch. 1–2: R = (v cosθ/g)(v sinθ + √(v² sin²θ + 2gh)).
    const f = vacuumFlight({ speed: v, angleDeg: deg, height: h });
    expect(f.carry).toBeCloseTo(vacuumRange(v, deg, h), 10);
    expect(f.timeUp).toBeCloseTo(Math.max(0, (v * Math.sin((deg * Math.PI) / 180)) / G), 12);
  });

  it('gives the same flight through the integrator when C_d is zero', () => {
    // The closed form against the Dormand–Prince integration of the same equations (drag model, C_d = 0), 1e-8 m.
    const launch = { speed: 14, angleDeg: 42, height: 2 };
    const closed = vacuumFlight(launch);
    const integrated = simulateFlight(launch, 'football-5', air, { model: 'drag', cd: 0 }, { rtol: 1e-12 });
    expect(Math.abs(integrated.carry - closed.carry)).toBeLessThan(1e-8);
    expect(Math.abs(integrated.apexHeight - closed.apexHeight)).toBeLessThan(1e-8);
    expect(Math.abs(integrated.flightTime - closed.flightTime)).toBeLessThan(1e-10);
  });
});

describe('simulateFlight with linear drag', () => {
  it('follows the closed-form trajectory of linear drag', () => {
    // Taylor (2005) §2.3–2.4: τ = 1/β, v_ter = gτ; x = v₀ₓτ(1 − e^(−t/τ)); y = h + (v₀ᵧ + v_ter)τ(1 − e^(−t/τ)) − v_ter t.
    const beta = 0.8, tau = 1 / beta, vter = G * tau;
    const f = simulateFlight({ speed: 3, angleDeg: 60, height: 0.5 }, undefined, undefined, { model: 'linear', dragRate: beta }, { rtol: 1e-12, pathPoints: 41 });
    const vx = 3 * Math.cos(Math.PI / 3), vy = 3 * Math.sin(Math.PI / 3);
    f.path!.t.forEach((t, i) => {
      const e = 1 - Math.exp(-t / tau);
      expect(Math.abs(f.path!.x[i] - vx * tau * e)).toBeLessThan(1e-10);
      expect(Math.abs(f.path!.y[i] - (0.5 + (vy + vter) * tau * e - vter * t))).toBeLessThan(1e-10);
    });
  });
});

describe('simulateFlight with quadratic drag', () => {
  it('matches the closed forms of a vertical throw: time up, height and time down', () => {
    // Taylor (2005) §2.4; Lindemuth, Am. J. Phys. 39 (1971) 757: k = ρC_dA/(2m), v_t = √(g/k);
    // t_up = (v_t/g) atan(v₀/v_t); H = (v_t²/2g) ln(1 + v₀²/v_t²); t_down = (v_t/g) acosh(exp(gH/v_t²)).
    const ball: BallProps = { massKg: 0.0577, diameterM: 0.067 };
    const cd = 0.55, v0 = 30;
    const k = (air.densityKgM3 * cd * crossSectionArea(ball.diameterM)) / (2 * ball.massKg);
    const vt = Math.sqrt(G / k);
    const tUp = (vt / G) * Math.atan(v0 / vt);
    const H = ((vt * vt) / (2 * G)) * Math.log(1 + (v0 * v0) / (vt * vt));
    const tDown = (vt / G) * Math.acosh(Math.exp((G * H) / (vt * vt)));
    const f = simulateFlight({ speed: v0, angleDeg: 90, height: 0 }, ball, air, { model: 'drag', cd }, { rtol: 1e-12 });
    expect(Math.abs(f.timeUp / tUp - 1)).toBeLessThan(1e-9);
    expect(Math.abs(f.apexHeight / H - 1)).toBeLessThan(1e-9);
    expect(Math.abs(f.timeDown / tDown - 1)).toBeLessThan(1e-9);
    expect(Math.abs(f.carry)).toBeLessThan(1e-9);
  });

  it.each([
    ['football-5', 28, 35, 0.2, 0.25],
    ['tennis', 25, 20, 1, 0.55],
    ['table-tennis', 15, 50, 1, 0.47],
    ['baseball', 38, 30, 1.8, 0.35],
  ])('descends longer and steeper than it rises, below the parabola (%s)', (id, v, deg, h, cd) => {
    // Common practice, from the closed forms above: t_down > t_up; apex and range below the no-air flight;
    // the descent is steeper than the ascent.
    const launch = { speed: v, angleDeg: deg, height: h };
    const f = simulateFlight(launch, id, air, { model: 'drag', cd });
    const vac = vacuumFlight(launch);
    expect(f.timeDown).toBeGreaterThan(f.timeUp + (h > 0 ? 0 : 1e-3));
    expect(f.apexHeight).toBeLessThan(vac.apexHeight);
    expect(f.carry).toBeLessThan(vac.carry);
    expect(f.landingAngleDeg).toBeGreaterThan(deg);
    expect(f.landingSpeed).toBeLessThan(Math.hypot(v, Math.sqrt(2 * G * h)));
  });

  it('departs far more from the parabola for a light ball of the same size', () => {
    // Common practice: drag per unit mass scales as ρC_dA/2m.
    const launch = { speed: 20, angleDeg: 45, height: 1 };
    const heavy = simulateFlight(launch, { massKg: 0.43, diameterM: 0.22 }, air, { model: 'drag', cd: 0.25 });
    const light = simulateFlight(launch, { massKg: 0.043, diameterM: 0.22 }, air, { model: 'drag', cd: 0.25 });
    const vac = vacuumFlight(launch).carry;
    expect(1 - light.carry / vac).toBeGreaterThan(2 * (1 - heavy.carry / vac));
    expect(light.timeDown / light.timeUp).toBeGreaterThan(heavy.timeDown / heavy.timeUp);
  });

  it('carries farther with a tailwind and shorter into a headwind', () => {
    // Common practice: wind enters through the air-relative velocity.
    const launch = { speed: 25, angleDeg: 40, height: 0 };
    const calm = simulateFlight(launch, 'football-5', air, { model: 'drag', cd: 0.25 });
    const tail = simulateFlight(launch, 'football-5', air, { model: 'drag', cd: 0.25 }, { windSpeed: 5 });
    const head = simulateFlight(launch, 'football-5', air, { model: 'drag', cd: 0.25 }, { windSpeed: -5 });
    expect(tail.carry).toBeGreaterThan(calm.carry + 2);
    expect(head.carry).toBeLessThan(calm.carry - 2);
  });

  it('stays up longer with backspin and comes down sooner with topspin', () => {
    // Lift from spin (Nathan, Am. J. Phys. 76 (2008) 119): backspin C_L > 0 lifts, topspin C_L < 0 dips.
    const launch = { speed: 25, angleDeg: 25, height: 0.2 };
    const none = simulateFlight(launch, 'football-5', air, { model: 'drag-lift', cd: 0.25, cl: 0 });
    const back = simulateFlight(launch, 'football-5', air, { model: 'drag-lift', cd: 0.25, cl: 0.15 });
    const top = simulateFlight(launch, 'football-5', air, { model: 'drag-lift', cd: 0.25, cl: -0.15 });
    expect(back.flightTime).toBeGreaterThan(none.flightTime);
    expect(back.apexHeight).toBeGreaterThan(none.apexHeight);
    expect(top.flightTime).toBeLessThan(none.flightTime);
  });

  it('carries farther in thin air than in dense air', () => {
    // Common practice: drag ∝ ρ.
    const launch = { speed: 28, angleDeg: 38, height: 0 };
    const thin = simulateFlight(launch, 'football-5', airFromDensity(0.95), { model: 'drag', cd: 0.25 });
    const dense = simulateFlight(launch, 'football-5', airFromDensity(1.28), { model: 'drag', cd: 0.25 });
    expect(thin.carry).toBeGreaterThan(dense.carry + 2);
  });

  it('returns an evenly timed path that starts at the release and ends on the ground', () => {
    const f = simulateFlight({ speed: 20, angleDeg: 45, height: 1.5 }, ballProps('handball-3'), air, { model: 'drag', cd: 0.4 }, { pathPoints: 11 });
    expect(f.path!.t).toHaveLength(11);
    expect(f.path!.y[0]).toBeCloseTo(1.5, 12);
    expect(Math.abs(f.path!.y[10])).toBeLessThan(1e-7);
    expect(f.path!.x[10]).toBeCloseTo(f.carry, 6);
  });
});

describe('simulateFlight input checks', () => {
  it.each([
    [{ speed: -1, angleDeg: 30, height: 1 }, /Launch speed -1/],
    [{ speed: 10, angleDeg: 120, height: 1 }, /Launch angle 120/],
    [{ speed: 10, angleDeg: 30, height: -2 }, /Release height -2/],
    [{ speed: 10, angleDeg: -5, height: 0 }, /ground level must be launched upward/],
  ])('refuses an impossible launch with BAD_LAUNCH (%j)', (launch, message) => {
    try {
      simulateFlight(launch, 'football-5', air, { model: 'drag', cd: 0.25 });
      expect.unreachable();
    } catch (e) {
      expect(isPhysicsError(e) && e.code).toBe('BAD_LAUNCH');
      expect((e as Error).message).toMatch(message);
    }
  });

  it('asks for the ball when a drag model has none', () => {
    expect(() => simulateFlight({ speed: 10, angleDeg: 30, height: 1 }, undefined, air, { model: 'drag', cd: 0.25 })).toThrowError(/needs the ball/);
  });

  it('stops with a coded error, not NaN, when a negative C_d makes the ball run away', () => {
    try {
      simulateFlight({ speed: 30, angleDeg: 10, height: 1 }, 'table-tennis', air, { model: 'drag', cd: -1 });
      expect.unreachable();
    } catch (e) {
      expect(isPhysicsError(e) && e.code).toBe('INTEGRATION_FAILED');
    }
  });
});
