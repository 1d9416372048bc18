import { describe, expect, it } from 'vitest';
import { flightFitOptionsSchema, toFitOptions } from '../../shared/schemas/flight-fit';
import { fitFlight, generateTrack, standardAir } from '../../shared/physics/index';

describe('flightFitOptionsSchema', () => {
  it('fills the defaults and gives options the engine fits with', () => {
    const parsed = flightFitOptionsSchema.parse({ ballId: 'football-5', conditions: { airTemperatureK: 291.15, altitudeM: 300 } });
    expect(parsed).toMatchObject({ model: 'auto', windAlongFlightMps: 0, loss: 'soft-l1', allowDescending: false });
    const options = toFitOptions(parsed);
    expect(options.air!.densityKgM3).toBeGreaterThan(1.1);
    const track = generateTrack({ launch: { speed: 25, angleDeg: 40, height: 0.2 }, ball: 'football-5', air: standardAir(), aero: { model: 'drag', cd: 0.25 }, fps: 50, noise: 0.02, seed: 3 });
    expect(fitFlight(track, options).converged).toBe(true);
  });

  it.each([
    [{ model: 'spin' }, /Model must be one of/],
    [{ ballId: 'beachball' }, /Unknown ball/],
    [{ massKg: 0.43 }, /mass and diameter together/],
    [{ ballId: 'tennis', massKg: 0.06, diameterM: 0.067 }, /either a catalogue ball/],
    [{ airDensityKgM3: 1.2, conditions: { airTemperatureK: 283.15 } }, /either the air density or the weather/],
    [{ conditions: { airPressurePa: 1013 } }, /Air pressure \(Pa\) must be at least 50000/],
    [{ windAlongFlightMps: 99 }, /Wind must lie within/],
  ])('refuses %j with a message naming the problem', (body, message) => {
    const r = flightFitOptionsSchema.safeParse(body);
    expect(r.success).toBe(false);
    expect(r.error!.issues.map((i) => i.message).join(' ')).toMatch(message);
  });
});
