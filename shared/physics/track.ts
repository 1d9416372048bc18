/**
 * Traced flights: the checks a track passes before a fit. Track files are read by
 * `shared/tracks/csv.ts`.
 */
import { PhysicsError } from './errors';

/** Samples of a traced flight: times (s) and positions (m). */
export interface Track {
  t: ArrayLike<number>;
  x: ArrayLike<number>;
  y: ArrayLike<number>;
}

/** Fewest samples a fit accepts: the drag-lift model has six parameters, so five points leave almost nothing. */
export const MIN_POINTS = 5;

/**
 * Check a track and return its samples as Float64Arrays.
 * @throws PhysicsError `LENGTH_MISMATCH`, `TOO_FEW_POINTS`, `NON_FINITE`, `DUPLICATE_TIMES`,
 *   `UNSORTED_TIMES`, each naming the first offending sample (1-based, as a coach counts).
 */
export function checkTrack(track: Track): { t: Float64Array; x: Float64Array; y: Float64Array } {
  const n = track.t.length;
  if (track.x.length !== n || track.y.length !== n) {
    throw new PhysicsError('LENGTH_MISMATCH', `The track has ${n} times but ${track.x.length} x and ${track.y.length} y values: every sample needs t, x and y.`);
  }
  if (n < MIN_POINTS) {
    throw new PhysicsError('TOO_FEW_POINTS', `The track has ${n} point${n === 1 ? '' : 's'}; a fit needs at least ${MIN_POINTS}. Mark the ball in more frames (the whole flight if you can).`, { points: n });
  }
  const t = Float64Array.from(track.t), x = Float64Array.from(track.x), y = Float64Array.from(track.y);
  for (let i = 0; i < n; i++) {
    if (!Number.isFinite(t[i]) || !Number.isFinite(x[i]) || !Number.isFinite(y[i])) {
      throw new PhysicsError('NON_FINITE', `Point ${i + 1} has a missing or non-numeric value (t=${track.t[i]}, x=${track.x[i]}, y=${track.y[i]}). Remove or re-mark it.`, { index: i });
    }
  }
  for (let i = 1; i < n; i++) {
    if (t[i] === t[i - 1]) {
      throw new PhysicsError('DUPLICATE_TIMES', `Points ${i} and ${i + 1} have the same time ${show(t[i])} s. Each frame may be marked once; remove the duplicate.`, { index: i });
    }
    if (t[i] < t[i - 1]) {
      throw new PhysicsError('UNSORTED_TIMES', `Point ${i + 1} (t=${show(t[i])} s) comes before point ${i} (t=${show(t[i - 1])} s). Sort the samples by time; if the clip was cut, check the frame numbers.`, { index: i });
    }
  }
  return { t, x, y };
}

/** A number for a message: six significant digits, no float noise. */
function show(v: number): string {
  return String(Number(v.toPrecision(6)));
}
