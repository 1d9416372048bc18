import { describe, expect, it } from 'vitest';
import { levenbergMarquardt, mulberry32, normalGenerator, type LmProblem, type RobustLoss } from '../../../shared/physics/index';

/** Straight line y = a + b·x as an LmProblem (groups of one residual). */
function lineProblem(x: number[], y: number[]): LmProblem {
  return {
    nParams: 2, nResiduals: x.length, robustResiduals: x.length, groupSize: 1,
    evaluate(p, r, J) {
      for (let i = 0; i < x.length; i++) {
        r[i] = p[0] + p[1] * x[i] - y[i];
        if (J) { J[2 * i] = 1; J[2 * i + 1] = x[i]; }
      }
      return true;
    },
  };
}

describe('levenbergMarquardt', () => {
  it('solves the Rosenbrock problem from the standard start', () => {
    // Moré, Garbow & Hillstrom, ACM TOMS 7 (1981) 17, problem 1: r = (10(x₂ − x₁²), 1 − x₁), start (−1.2, 1), minimum (1, 1).
    const problem: LmProblem = {
      nParams: 2, nResiduals: 2, robustResiduals: 0, groupSize: 1,
      evaluate(p, r, J) {
        r[0] = 10 * (p[1] - p[0] * p[0]); r[1] = 1 - p[0];
        if (J) { J[0] = -20 * p[0]; J[1] = 10; J[2] = -1; J[3] = 0; }
        return true;
      },
    };
    const res = levenbergMarquardt(problem, [-1.2, 1]);
    expect(res.converged).toBe(true);
    expect(res.p[0]).toBeCloseTo(1, 8);
    expect(res.p[1]).toBeCloseTo(1, 8);
    expect(res.iterations).toBeLessThan(40);
  });

  it('reproduces the normal-equation solution of a straight-line fit', () => {
    // Closed form of linear least squares: (XᵀX)β = Xᵀy; the returned JᵀWJ is XᵀX.
    const x = [0, 1, 2, 3, 4, 5], y = [1.1, 2.9, 5.2, 7.1, 8.8, 11.2];
    const n = x.length, sx = x.reduce((a, b) => a + b), sy = y.reduce((a, b) => a + b);
    const sxx = x.reduce((a, b) => a + b * b, 0), sxy = x.reduce((a, v, i) => a + v * y[i], 0);
    const b = (n * sxy - sx * sy) / (n * sxx - sx * sx), a = (sy - b * sx) / n;
    const res = levenbergMarquardt(lineProblem(x, y), [0, 0]);
    // To 1e-8: the damped first step stops a hair short and the cost test (ftol 1e-10) ends the iteration.
    expect(res.p[0]).toBeCloseTo(a, 8);
    expect(res.p[1]).toBeCloseTo(b, 8);
    expect(Array.from(res.jtwj)).toEqual([n, sx, sx, sxx]);
    expect(res.iterations).toBeLessThanOrEqual(4);
  });

  it.each(['soft-l1', 'cauchy', 'huber'] as RobustLoss[])('resists gross outliers with the %s loss where plain least squares does not', (loss) => {
    const rand = mulberry32(7), normal = normalGenerator(rand);
    const x = Array.from({ length: 60 }, (_, i) => i / 10);
    const y = x.map((v) => 2 + 0.5 * v + 0.05 * normal());
    for (const i of [5, 17, 33, 48]) y[i] += 4;
    const plain = levenbergMarquardt(lineProblem(x, y), [0, 0]);
    const robust = levenbergMarquardt(lineProblem(x, y), [plain.p[0], plain.p[1]], { loss, lossScale: 0.125 });
    expect(Math.abs(plain.p[0] - 2)).toBeGreaterThan(0.1);
    expect(Math.abs(robust.p[0] - 2)).toBeLessThan(0.06);
    expect(Math.abs(robust.p[1] - 0.5)).toBeLessThan(0.02);
    expect(robust.weights[5]).toBeLessThan(0.2);
    expect(robust.weights[6]).toBeGreaterThan(0.8);
  });

  it('re-estimates the loss scale when asked and reports the final scale', () => {
    const x = Array.from({ length: 40 }, (_, i) => i);
    const y = x.map((v, i) => 1 + 2 * v + (i % 2 ? 0.01 : -0.01));
    const res = levenbergMarquardt(lineProblem(x, y), [0, 0], { loss: 'soft-l1', lossScale: 10, adaptScale: () => 0.025 });
    expect(res.lossScale).toBeCloseTo(0.025, 12);
    expect(res.converged).toBe(true);
  });

  it('says it did not converge when the iteration limit stops it', () => {
    const problem: LmProblem = {
      nParams: 2, nResiduals: 2, robustResiduals: 0, groupSize: 1,
      evaluate(p, r, J) {
        r[0] = 10 * (p[1] - p[0] * p[0]); r[1] = 1 - p[0];
        if (J) { J[0] = -20 * p[0]; J[1] = 10; J[2] = -1; J[3] = 0; }
        return true;
      },
    };
    const res = levenbergMarquardt(problem, [-1.2, 1], { maxIterations: 2 });
    expect(res.converged).toBe(false);
    expect(res.stopReason).toBe('max-iterations');
  });

  it('refuses trial points the model cannot evaluate and still converges', () => {
    // y = exp(a·x) with the model undefined for a > 3: refused steps raise the damping.
    const x = [0, 0.5, 1, 1.5, 2], y = x.map((v) => Math.exp(1.3 * v));
    const problem: LmProblem = {
      nParams: 1, nResiduals: 5, robustResiduals: 5, groupSize: 1,
      evaluate(p, r, J) {
        if (p[0] > 3) return false;
        for (let i = 0; i < 5; i++) { const e = Math.exp(p[0] * x[i]); r[i] = e - y[i]; if (J) J[i] = x[i] * e; }
        return true;
      },
    };
    const res = levenbergMarquardt(problem, [2.9]);
    expect(res.p[0]).toBeCloseTo(1.3, 9);
  });

  it('throws when the start cannot be evaluated', () => {
    const problem: LmProblem = { nParams: 1, nResiduals: 1, robustResiduals: 0, groupSize: 1, evaluate: () => false };
    expect(() => levenbergMarquardt(problem, [0])).toThrowError(/cannot be evaluated/);
  });
});
