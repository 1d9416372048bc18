import { describe, expect, it } from 'vitest';
import { integrate, isPhysicsError, type OdeRhs } from '../../../shared/physics/index';
import { flightRhs, initialState, type MotionCoefficients } from '../../../shared/physics/flight';
import { odexStates } from '../../../scripts/fit/reference';

const G = 9.80665;
const kicked: MotionCoefficients = { model: 'drag-lift', k: 0.0533 * 0.25, kl: 0.0533 * 0.12, beta: 0, g: G, wind: -3 };
const s0 = [0, 0.3, 24, 17];

function relErr(a: ArrayLike<number>, b: ArrayLike<number>): number {
  let m = 0;
  for (let i = 0; i < a.length; i++) m = Math.max(m, Math.abs(a[i] - b[i]) / Math.max(1, Math.abs(b[i])));
  return m;
}

describe('integrate', () => {
  it('agrees with odex to 1e-8 relative on a kicked ball with lift and headwind', () => {
    // Reference: odex v2.0.4 (Hairer & Wanner's ODEX, Gragg–Bulirsch–Stoer), tolerance 1e-13.
    const times = [0.25, 0.5, 1, 1.5, 2, 2.5, 3];
    const ref = odexStates(kicked, s0, times, 1e-13);
    const out = new Float64Array(times.length * 4);
    integrate(flightRhs(kicked, 0.0533), 0, s0, { tEnd: 3, rtol: 1e-11, atol: 1e-11, outputTimes: times, output: out });
    for (let k = 0; k < times.length; k++) expect(relErr(out.subarray(4 * k, 4 * k + 4), ref[k])).toBeLessThan(1e-8);
  });

  it('shows fifth-order convergence when the step is held fixed', () => {
    // Property: Dormand–Prince 5(4) propagates with order 5 (Dormand & Prince 1980): halving h divides the
    // error by ~2⁵; the observed order log₂(e(h)/e(h/2)) must come out near 5 (4.5…6, pre-asymptotic terms).
    const ref = odexStates(kicked, s0, [2], 1e-14)[0];
    const errAt = (h: number) => {
      const r = integrate(flightRhs(kicked, 0.0533), 0, s0, { tEnd: 2, rtol: 1e6, atol: 1e6, hInitial: h, hMax: h });
      return relErr(r.y, ref);
    };
    const e = [0.2, 0.1, 0.05].map(errAt);
    for (const order of [Math.log2(e[0] / e[1]), Math.log2(e[1] / e[2])]) {
      expect(order).toBeGreaterThan(4.5);
      expect(order).toBeLessThan(6);
    }
  });

  it('interpolates between steps with the accuracy of a fourth-order continuous extension', () => {
    // Property: DOPRI5's dense output has order 4 (Hairer, Nørsett & Wanner I, §II.6): halving h divides its error by ≥ ~16.
    const times = Array.from({ length: 39 }, (_, i) => 0.05 + i * 0.05);
    const ref = odexStates(kicked, s0, times, 1e-14);
    const errAt = (h: number) => {
      const out = new Float64Array(times.length * 4);
      integrate(flightRhs(kicked, 0.0533), 0, s0, { tEnd: 2, rtol: 1e6, atol: 1e6, hInitial: h, hMax: h, outputTimes: times, output: out });
      let m = 0;
      for (let k = 0; k < times.length; k++) m = Math.max(m, relErr(out.subarray(4 * k, 4 * k + 4), ref[k]));
      return m;
    };
    expect(errAt(0.3) / errAt(0.15)).toBeGreaterThan(14);
  });

  it('keeps the global error in proportion to the tolerance', () => {
    // Property (tolerance proportionality, HNW I §II.4): ten times tighter, several times more accurate.
    const ref = odexStates(kicked, s0, [3], 1e-14)[0];
    const e6 = relErr(integrate(flightRhs(kicked, 0.0533), 0, s0, { tEnd: 3, rtol: 1e-6, atol: 1e-6 }).y, ref);
    const e9 = relErr(integrate(flightRhs(kicked, 0.0533), 0, s0, { tEnd: 3, rtol: 1e-9, atol: 1e-9 }).y, ref);
    expect(e6).toBeLessThan(1e-5);
    expect(e9).toBeLessThan(1e-8);
    expect(e6 / e9).toBeGreaterThan(100);
  });

  it('returns to the start when the reversed flight is integrated back', () => {
    // Property: time reversibility of the exact flow (y' = −f(y) from the end state).
    const fwd = integrate(flightRhs(kicked, 0.0533), 0, s0, { tEnd: 2.5, rtol: 1e-12, atol: 1e-12 });
    const f = flightRhs(kicked, 0.0533);
    const back: OdeRhs = (t, y, d) => { f(t, y, d); for (let i = 0; i < 4; i++) d[i] = -d[i]; };
    const r = integrate(back, 0, fwd.y, { tEnd: 2.5, rtol: 1e-12, atol: 1e-12 });
    expect(relErr(r.y, s0)).toBeLessThan(1e-9);
  });

  it('locates the apex and the landing of a flight without air to 1e-12 s', () => {
    // Closed form (Taylor, Classical Mechanics (2005) ch. 2): t_apex = v_y/g; t_land = (v_y + √(v_y² + 2gh))/g.
    const vac: MotionCoefficients = { model: 'drag', k: 0, kl: 0, beta: 0, g: G, wind: 0 };
    const r = integrate(flightRhs(vac, 0), 0, [0, 2, 10, 12], {
      tEnd: 100,
      events: [
        { name: 'apex', g: (_t, y) => y[3], direction: -1, terminal: false },
        { name: 'landing', g: (_t, y) => y[1], direction: -1, terminal: true },
      ],
    });
    expect(r.status).toBe('event');
    expect(r.events.map((e) => e.name)).toEqual(['apex', 'landing']);
    expect(Math.abs(r.events[0].t - 12 / G)).toBeLessThan(1e-12);
    expect(Math.abs(r.t - (12 + Math.sqrt(144 + 4 * G)) / G)).toBeLessThan(1e-12);
    expect(Math.abs(r.y[1])).toBeLessThan(1e-12);
  });

  it('integrates variational equations that match finite differences of the flight', () => {
    // Property: S = ∂state/∂p from S' = (∂f/∂s)S + ∂f/∂p (HNW I §I.14) against central differences.
    const sens = ['vx0', 'vy0', 'cd', 'cl'] as const;
    const kappa = 0.0533;
    const run = (cd: number, cl: number, vx: number, vy: number) => integrate(
      flightRhs({ ...kicked, k: kappa * cd, kl: kappa * cl }, kappa), 0, [0, 0.3, vx, vy], { tEnd: 2, rtol: 1e-12, atol: 1e-12 }).y;
    const r = integrate(flightRhs({ ...kicked, k: kappa * 0.25, kl: kappa * 0.12 }, kappa, sens), 0, initialState(0, 0.3, 24, 17, sens), { tEnd: 2, rtol: 1e-12, atol: 1e-12, errorDim: 4 });
    const h = 1e-5;
    const fd = [
      [run(0.25, 0.12, 24 + h, 17), run(0.25, 0.12, 24 - h, 17)],
      [run(0.25, 0.12, 24, 17 + h), run(0.25, 0.12, 24, 17 - h)],
      [run(0.25 + h, 0.12, 24, 17), run(0.25 - h, 0.12, 24, 17)],
      [run(0.25, 0.12 + h, 24, 17), run(0.25, 0.12 - h, 24, 17)],
    ];
    fd.forEach(([a, b], j) => {
      for (let c = 0; c < 4; c++) {
        const num = (a[c] - b[c]) / (2 * h);
        expect(Math.abs(r.y[4 + 4 * j + c] - num)).toBeLessThan(1e-5 * Math.max(1, Math.abs(num)));
      }
    });
  });

  it('stops with INTEGRATION_FAILED when the state becomes non-finite', () => {
    const blowUp: OdeRhs = (_t, y, d) => { d[0] = y[0] * y[0]; };
    try {
      integrate(blowUp, 0, [1], { tEnd: 2 });
      expect.unreachable();
    } catch (e) {
      expect(isPhysicsError(e) && e.code).toBe('INTEGRATION_FAILED');
      expect(String((e as Error).message)).toMatch(/non-finite|round-off|step limit/);
    }
  });

  it('stops with INTEGRATION_FAILED at its step limit', () => {
    const fast: OdeRhs = (t, _y, d) => { d[0] = Math.cos(1000 * t); };
    try {
      integrate(fast, 0, [0], { tEnd: 10, maxSteps: 50 });
      expect.unreachable();
    } catch (e) {
      expect(isPhysicsError(e) && e.code).toBe('INTEGRATION_FAILED');
      expect((e as { details?: { reason?: string } }).details?.reason).toBe('max-steps');
    }
  });

  it('refuses an empty interval', () => {
    expect(() => integrate((_t, _y, d) => { d[0] = 1; }, 1, [0], { tEnd: 1 })).toThrowError(/empty/);
  });

  it('reports outputs at the start and the end of the interval', () => {
    const r = integrate((_t, y, d) => { d[0] = -y[0]; }, 0, [1], { tEnd: 1, outputTimes: [0, 0.5, 1], rtol: 1e-12, atol: 1e-12 });
    expect(r.outputCount).toBe(3);
    expect(r.output![0]).toBe(1);
    expect(r.output![1]).toBeCloseTo(Math.exp(-0.5), 11);
    expect(r.output![2]).toBeCloseTo(Math.exp(-1), 11);
  });
});
