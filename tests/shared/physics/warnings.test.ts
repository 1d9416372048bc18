import { describe, expect, it } from 'vitest';
import { airFromConditions, EXTRAPOLATED_CARRY_SHARE, fitFlight, generateTrack, type SyntheticTrackSpec } from '../../../shared/physics/index';

// Warnings that mean something: flights generated with known parameters (shared/physics/synthetic.ts, seeded).
const air = airFromConditions({ airTemperatureK: 288.15, airPressurePa: 101325, relativeHumidityPct: 50 });
const base: SyntheticTrackSpec = { launch: { speed: 25, angleDeg: 30, height: 0 }, ball: 'football-5', air, aero: { model: 'drag', cd: 0.25 }, fps: 60, noise: 0.01, seed: 21 };

function codes(spec: SyntheticTrackSpec): { codes: string[]; fit: ReturnType<typeof fitFlight> } {
  const track = generateTrack(spec);
  const fit = fitFlight(track, { ball: spec.ball, air, model: 'drag' });
  return { codes: fit.warnings.map((w) => w.code), fit };
}

describe('fitFlight warnings', () => {
  // Crisis band of a size-5 football 1.5e5–3.5e5 (catalogue, after Asai et al., Sports Engineering 10 (2007) 101; from memory).
  it('warns of the drag crisis when the flight’s Reynolds numbers run into the ball’s band', () => {
    const { codes: c, fit } = codes(base);
    expect(fit.reynoldsRange!.max).toBeGreaterThan(3.5e5);
    expect(fit.reynoldsRange!.min).toBeLessThan(3.5e5);
    expect(c).toContain('NEAR_DRAG_CRISIS');
    expect(fit.warnings.find((w) => w.code === 'NEAR_DRAG_CRISIS')!.message).toMatch(/^The Reynolds number runs from .* during the flight, into this ball's drag crisis \(150000–350000\)/);
  });

  it('does not warn of the drag crisis when a slow flight stays below the band, even with launch near it', () => {
    // 9 m/s: Re ≈ 1.35e5 at launch, within a factor 1.25 of the band but never in it.
    const { codes: c, fit } = codes({ ...base, launch: { speed: 9, angleDeg: 45, height: 1 }, aero: { model: 'drag', cd: 0.45 } });
    expect(fit.reynoldsRange!.max).toBeLessThan(1.5e5);
    expect(c).not.toContain('NEAR_DRAG_CRISIS');
  });

  it(`reports an extrapolated landing only past ${EXTRAPOLATED_CARRY_SHARE * 100} % of the carry, saying so`, () => {
    const full = generateTrack(base).truth;
    // Traced to 95 % of the hang time: a few per cent of the carry are extrapolated, not flagged.
    const near = codes({ ...base, endTime: 0.95 * full.flightTime });
    expect(near.fit.extrapolatedCarry / near.fit.flight.carry).toBeLessThan(EXTRAPOLATED_CARRY_SHARE);
    expect(near.codes).not.toContain('EXTRAPOLATED');
    const short = codes({ ...base, endTime: 0.6 * full.flightTime });
    expect(short.fit.extrapolatedCarry / short.fit.flight.carry).toBeGreaterThan(EXTRAPOLATED_CARRY_SHARE);
    expect(short.fit.warnings.find((w) => w.code === 'EXTRAPOLATED')!.message).toMatch(/more than the 10 % flagged\) lies beyond the last traced point/);
  });
});
