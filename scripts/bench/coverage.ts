/**
 * Coverage of the fit's stated errors: over many generated flights with AR(1) track errors of
 * several frame-to-frame correlations φ, the share of true values within 1.96 stated errors (95 %
 * expected), and the CPU time per fit. The test in tests/shared/physics/correlated-errors.test.ts
 * runs one φ over 300 flights; this prints the heavier sweep. Nothing here asserts.
 */
import { coverageOf } from '../fit/coverage';

const FLIGHTS = 600;
const CORRELATIONS = [0, 0.3, 0.5, 0.7, 0.8, 0.9];

export async function run(): Promise<void> {
  console.log(`Share of true values within 1.96 stated errors over ${FLIGHTS} kicks (26 m/s, 32°, σ 2 cm, 60 fps, 1.6 s traced):`);
  console.log('   φ     C_d   speed   angle   carry   mean φ fitted   ms/fit');
  for (const phi of CORRELATIONS) {
    const started = process.cpuUsage();
    const c = coverageOf(phi, FLIGHTS, 9000);
    const cpu = process.cpuUsage(started);
    const pct = (v: number) => `${((100 * v) / FLIGHTS).toFixed(1)} %`.padStart(7);
    console.log(`${phi.toFixed(1).padStart(4)} ${pct(c.cd)} ${pct(c.speed)} ${pct(c.angle)} ${pct(c.carry)}   ${c.meanPhi.toFixed(2).padStart(13)}   ${((cpu.user + cpu.system) / 1000 / FLIGHTS).toFixed(2).padStart(6)}`);
  }
}
