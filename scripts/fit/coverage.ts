/**
 * Coverage of the fit's stated errors on generated kicks (26 m/s, 32°, from 0.3 m, C_d 0.25, 60 fps,
 * 1.6 s traced, σ 2 cm per coordinate) with AR(1) track errors of correlation φ: how many true values
 * of C_d, launch speed, angle and carry lie within 1.96 stated errors. Shared by the recovery test
 * and the coverage benchmark.
 */
import { airFromConditions, fitFlight, generateTrack } from '../../shared/physics';

const air = airFromConditions({ airTemperatureK: 288.15, airPressurePa: 101325, relativeHumidityPct: 50 });

export interface CoverageCounts {
  flights: number;
  cd: number;
  speed: number;
  angle: number;
  carry: number;
  /** Mean of the fitted φ. */
  meanPhi: number;
}

/** Fits `flights` kicks with seeds seedBase + 1 … seedBase + flights and counts the hits. */
export function coverageOf(phi: number, flights: number, seedBase: number): CoverageCounts {
  const out: CoverageCounts = { flights, cd: 0, speed: 0, angle: 0, carry: 0, meanPhi: 0 };
  for (let seed = 1; seed <= flights; seed++) {
    const track = generateTrack({
      launch: { speed: 26, angleDeg: 32, height: 0.3 }, ball: 'football-5', air, aero: { model: 'drag', cd: 0.25 },
      fps: 60, noise: 0.02, noiseCorrelation: phi, seed: seedBase + seed, endTime: 1.6,
    });
    const f = fitFlight(track, { ball: 'football-5', air, model: 'drag' });
    out.meanPhi += f.noiseCorrelation.phi / flights;
    if (Math.abs(f.cd! - 0.25) <= 1.96 * f.cdError!) out.cd++;
    if (Math.abs(f.launch.speed - 26) <= 1.96 * f.launch.speedError!) out.speed++;
    if (Math.abs(f.launch.angleDeg - 32) <= 1.96 * f.launch.angleDegError!) out.angle++;
    if (Math.abs(f.flight.carry - track.truth.carry) <= 1.96 * f.errors.carry!) out.carry++;
  }
  return out;
}
