import { describe, expect, it } from 'vitest';
import { integrate, isPhysicsError } from '../../../shared/physics/index';
import { flightRhs, type MotionCoefficients } from '../../../shared/physics/flight';
import { flyKernel } from '../../../shared/physics/kernel';
import { odexStates } from '../../../scripts/fit/reference';

const G = 9.80665;
const cases: [string, MotionCoefficients, number[]][] = [
  ['drag', { model: 'drag', k: 0.0533 * 0.25, kl: 0, beta: 0, g: G, wind: 0 }, [0, 0.2, 23, 16]],
  ['drag-lift with headwind', { model: 'drag-lift', k: 0.0533 * 0.25, kl: 0.0533 * 0.12, beta: 0, g: G, wind: -4 }, [0, 0.1, 25, 14]],
  ['topspin tennis', { model: 'drag-lift', k: 0.0337 * 0.55, kl: -0.0337 * 0.15, beta: 0, g: G, wind: 2 }, [0, 1, 21, 6]],
  ['linear', { model: 'linear', k: 0, kl: 0, beta: 0.8, g: G, wind: 0.5 }, [0, 0.5, 1.5, 2.6]],
  ['light ball', { model: 'drag', k: 0.28 * 0.47, kl: 0, beta: 0, g: G, wind: 0 }, [0, 1, 12.9, 15.3]],
];

describe('flyKernel', () => {
  it.each(cases)('takes the same steps and finds the same apex and landing as the generic integrator (%s)', (_name, c, s0) => {
    // The kernel is the generic Dormand–Prince code written out on scalars: results agree to rounding.
    const kernel = flyKernel(c, s0[0], s0[1], s0[2], s0[3], 1e-8, true, 120);
    const generic = integrate(flightRhs(c, 0.0533), 0, s0, {
      tEnd: 120, rtol: 1e-8, atol: 1e-8, errorDim: 4,
      events: [
        { name: 'apex', g: (_t, y) => y[3], direction: -1, terminal: false },
        { name: 'landing', g: (_t, y) => y[1], direction: -1, terminal: true },
      ],
    });
    expect(kernel.steps).toBe(generic.acceptedSteps);
    expect(Math.abs(kernel.landing.t - generic.t)).toBeLessThan(1e-12);
    expect(Math.abs(kernel.landing.x - generic.y[0])).toBeLessThan(1e-10);
    expect(Math.abs(kernel.landing.vx - generic.y[2])).toBeLessThan(1e-10);
    expect(Math.abs(kernel.landing.vy - generic.y[3])).toBeLessThan(1e-10);
    const apex = generic.events.find((e) => e.name === 'apex')!;
    expect(Math.abs(kernel.apex!.t - apex.t)).toBeLessThan(1e-12);
    expect(Math.abs(kernel.apex!.y - apex.y[1])).toBeLessThan(1e-10);
  });

  it('lands where odex says the ball is at the landing time', () => {
    // Reference: odex v2.0.4 at 1e-13; the landing height there must be zero to the kernel's tolerance.
    const [, c, s0] = cases[1];
    const f = flyKernel(c, s0[0], s0[1], s0[2], s0[3], 1e-10, true, 120);
    const [at] = odexStates(c, s0, [f.landing.t], 1e-13);
    expect(Math.abs(at[1])).toBeLessThan(1e-8);
    expect(Math.abs(at[0] - f.landing.x)).toBeLessThan(1e-8 * Math.abs(f.landing.x));
  });

  it('lands as accurately in fewer steps when it starts with the step a slightly slower flight settled on', () => {
    // Reference: odex v2.0.4 at 1e-13 (as above); tolerance: the kernel's own 1e-8 carried over a 3 s flight.
    const [, c, s0] = cases[0];
    const slower = flyKernel(c, s0[0], s0[1], 0.98 * s0[2], 0.98 * s0[3], 1e-8, true, 120);
    const cold = flyKernel(c, s0[0], s0[1], s0[2], s0[3], 1e-8, true, 120);
    const warm = flyKernel(c, s0[0], s0[1], s0[2], s0[3], 1e-8, true, 120, slower.hSettled);
    expect(warm.steps).toBeLessThan(cold.steps);
    const [at] = odexStates(c, s0, [warm.landing.t], 1e-13);
    expect(Math.abs(at[1])).toBeLessThan(1e-6);
    expect(Math.abs(warm.landing.x - cold.landing.x)).toBeLessThan(1e-6);
    expect(Math.abs(warm.landing.t - cold.landing.t)).toBeLessThan(1e-7);
  });

  it('still finds the landing of a ball launched from the ground when the borrowed first step is longer than the flight', () => {
    // A grazing kick along the ground: 14 m/s at 1.33°, in the air for about 0.07 s.
    const [, c] = cases[0];
    const th = (1.3333 * Math.PI) / 180;
    const cold = flyKernel(c, 0, 0, 14 * Math.cos(th), 14 * Math.sin(th), 1e-8, true, 120);
    const warm = flyKernel(c, 0, 0, 14 * Math.cos(th), 14 * Math.sin(th), 1e-8, true, 120, 1.1 * cold.landing.t);
    expect(Math.abs(warm.landing.t - cold.landing.t)).toBeLessThan(1e-7);
    expect(Math.abs(warm.landing.x - cold.landing.x)).toBeLessThan(1e-6);
  });

  it('reports no apex for a ball launched downward', () => {
    const f = flyKernel(cases[0][1], 0, 2.5, 20, -3, 1e-8, true, 120);
    expect(f.apex).toBeNull();
    expect(f.landing.t).toBeGreaterThan(0);
  });

  it('stops with NO_LANDING when the ball stays up past the time limit', () => {
    try {
      flyKernel({ model: 'drag-lift', k: 0, kl: 0.3, beta: 0, g: G, wind: 0 }, 0, 1, 30, 0, 1e-8, true, 5);
      expect.unreachable();
    } catch (e) {
      expect(isPhysicsError(e) && ['NO_LANDING', 'INTEGRATION_FAILED'].includes(e.code)).toBe(true);
    }
  });
});
