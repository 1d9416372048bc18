/**
 * Traced flights: checks, and the CSV form read by the `fit` command and by track imports.
 *
 * CSV: a header naming at least `t`, `x`, `y` (seconds; metres; first sample at the release;
 * x along the flight, y up from the ground), one sample per line, comma-separated; lines starting
 * with `#` are comments. Leading comment lines `# key: value` describe the flight: `mass_kg`,
 * `diameter_m`, `ball` (catalogue id), `air_density_kg_m3`, `temperature_c`, `pressure_pa`,
 * `humidity_pct`, `altitude_m`, `wind_m_s`.
 */
import { PhysicsError } from './errors';

/** Samples of a traced flight: times (s) and positions (m). */
export interface Track {
  t: ArrayLike<number>;
  x: ArrayLike<number>;
  y: ArrayLike<number>;
}

/** Metadata a track file may carry in its leading comments (SI, as named). */
export interface TrackMeta {
  massKg?: number;
  diameterM?: number;
  ball?: string;
  airDensityKgM3?: number;
  temperatureC?: number;
  pressurePa?: number;
  humidityPct?: number;
  altitudeM?: number;
  windMS?: number;
}

const META_KEYS: Record<string, keyof TrackMeta> = {
  mass_kg: 'massKg',
  diameter_m: 'diameterM',
  ball: 'ball',
  air_density_kg_m3: 'airDensityKgM3',
  temperature_c: 'temperatureC',
  pressure_pa: 'pressurePa',
  humidity_pct: 'humidityPct',
  altitude_m: 'altitudeM',
  wind_m_s: 'windMS',
};

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

/**
 * Read a track CSV.
 * @param text the file's content.
 * @returns the samples, the metadata of its leading comments, and any extra columns by name.
 * @throws PhysicsError `CSV_NO_HEADER` when no header holds t, x and y; `CSV_BAD_ROW` for a row
 *   with missing or non-numeric fields (`NaN` is read as a number and caught by {@link checkTrack}).
 */
export function parseTrackCsv(text: string): { track: { t: number[]; x: number[]; y: number[] }; meta: TrackMeta; columns: Record<string, number[]> } {
  const lines = text.split(/\r?\n/);
  const meta: TrackMeta = {};
  let header: string[] | null = null;
  const cols: number[][] = [];
  for (let ln = 0; ln < lines.length; ln++) {
    const line = lines[ln].trim();
    if (line === '') continue;
    if (line.startsWith('#')) {
      if (header === null) {
        const m = /^#\s*([A-Za-z0-9_]+)\s*:\s*(.*?)\s*$/.exec(line);
        const key = m ? META_KEYS[m[1].toLowerCase()] : undefined;
        if (m && key) {
          if (key === 'ball') meta.ball = m[2];
          else {
            const v = Number(m[2]);
            if (m[2] === '' || !Number.isFinite(v)) {
              throw new PhysicsError('CSV_BAD_ROW', `Line ${ln + 1}: "${m[1]}" must be a number, got "${m[2]}".`, { line: ln + 1 });
            }
            (meta as Record<string, number>)[key] = v;
          }
        }
      }
      continue;
    }
    const fields = line.split(',').map((f) => f.trim());
    if (header === null) {
      header = fields.map((f) => f.toLowerCase());
      for (const need of ['t', 'x', 'y']) {
        if (!header.includes(need)) {
          throw new PhysicsError('CSV_NO_HEADER', `Line ${ln + 1}: the header must name the columns t, x and y (seconds, metres); found "${line}".`, { line: ln + 1 });
        }
      }
      for (let c = 0; c < header.length; c++) cols.push([]);
      continue;
    }
    if (fields.length !== header.length) {
      throw new PhysicsError('CSV_BAD_ROW', `Line ${ln + 1}: expected ${header.length} fields (${header.join(',')}), found ${fields.length}.`, { line: ln + 1 });
    }
    for (let c = 0; c < fields.length; c++) {
      const f = fields[c];
      const v = /^nan$/i.test(f) ? NaN : Number(f);
      if (f === '' || (Number.isNaN(v) && !/^nan$/i.test(f))) {
        throw new PhysicsError('CSV_BAD_ROW', `Line ${ln + 1}: "${f}" in column ${header[c]} is not a number.`, { line: ln + 1 });
      }
      cols[c].push(v);
    }
  }
  if (header === null) {
    throw new PhysicsError('CSV_NO_HEADER', 'The file has no header line naming the columns t, x and y.');
  }
  const columns: Record<string, number[]> = {};
  header.forEach((h, c) => { columns[h] = cols[c]; });
  return { track: { t: columns.t, x: columns.x, y: columns.y }, meta, columns };
}

/** Write a track (and optional metadata) as CSV with the header `t,x,y`; values to 0.1 µs and 0.1 µm. */
export function formatTrackCsv(track: Track, meta: TrackMeta = {}, comments: string[] = []): string {
  const out: string[] = comments.map((c) => `# ${c}`);
  for (const [file, key] of Object.entries(META_KEYS)) {
    const v = meta[key];
    if (v !== undefined) out.push(`# ${file}: ${v}`);
  }
  out.push('t,x,y');
  for (let i = 0; i < track.t.length; i++) {
    out.push(`${fmt(track.t[i], 7)},${fmt(track.x[i], 7)},${fmt(track.y[i], 7)}`);
  }
  return out.join('\n') + '\n';
}

/** A number for a message: six significant digits, no float noise. */
function show(v: number): string {
  return String(Number(v.toPrecision(6)));
}

function fmt(v: number, decimals: number): string {
  if (!Number.isFinite(v)) return String(v);
  return String(Number(v.toFixed(decimals)));
}
