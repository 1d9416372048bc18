import { describe, expect, it } from 'vitest';
import { airFromConditions, fitFlight, generateTrack } from '../../../shared/physics/index';
import { coverageOf } from '../../../scripts/fit/coverage';

// Recovery of the stated errors on tracks whose errors are correlated from frame to frame, as a
// follower's are: AR(1) errors (φ = 0.7, σ = 2 cm per coordinate) by shared/physics/synthetic.ts (seeded).
// The share of true values within 1.96 stated errors should be 95 %; over 300 flights its binomial
// spread is ±1.3 %, so 92–98 % is the accepted band (common practice). Heavier runs: `npm run bench coverage`.
const air = airFromConditions({ airTemperatureK: 288.15, airPressurePa: 101325, relativeHumidityPct: 50 });
const N = 300;

describe('fitFlight errors with correlated track errors', () => {
  it('holds about 95 % of true C_d, launch speed, angle and carry within 1.96 stated errors over 300 flights', () => {
    const c = coverageOf(0.7, N, 5000);
    for (const what of ['cd', 'speed', 'angle', 'carry'] as const) {
      expect(c[what] / N, what).toBeGreaterThanOrEqual(0.92);
      expect(c[what] / N, what).toBeLessThanOrEqual(0.98);
    }
    // The correlation itself comes back near the generator's 0.7 on average.
    expect(c.meanPhi).toBeGreaterThan(0.6);
    expect(c.meanPhi).toBeLessThan(0.8);
  });

  it('reports independent errors as such: φ near 0 and every point counting', () => {
    const track = generateTrack({ launch: { speed: 26, angleDeg: 32, height: 0.3 }, ball: 'football-5', air, aero: { model: 'drag', cd: 0.25 }, fps: 60, noise: 0.02, seed: 77, endTime: 1.6 });
    const f = fitFlight(track, { ball: 'football-5', air, model: 'drag' });
    expect(f.noiseCorrelation.phi).toBeLessThan(0.15);
    expect(f.noiseCorrelation.effectivePoints).toBeGreaterThan(0.7 * f.points);
  });
});
