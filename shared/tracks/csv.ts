/**
 * Track CSV files: the one reader of traced flights in CSV, for the flight import (pixel or metre
 * columns) and for the `fit` command (metre columns, the file's ball and air in comments), and the
 * writers of both.
 *
 * Rules of every track file: an optional byte-order mark; lines end in CRLF, LF or CR; blank lines
 * and lines starting with `#` are skipped, and `# key: value` comments before the header describe
 * the flight ({@link TrackMeta}); the first other line is the header, comma-separated column names
 * (trimmed, any case, each once); then one row per line with as many cells as the header has
 * columns. A number cell is a plain decimal number: an optional sign, digits with an optional `.`
 * fraction, an optional complete exponent (`1.5e-3`, as the writers produce for small values).
 * Hexadecimal (`0x10`), binary (`0b11`) and octal (`0o7`) literals, `Infinity`, an incomplete
 * exponent (`1e`), a decimal comma and any other text are refused, naming the line (1-based,
 * counting comments and blank lines, the header included) and the column by its header name.
 * `NaN` is the one non-number the `fit` command reads, so that the track check names the point.
 */
import type { Conditions } from '../physics/air';
import { CELSIUS_ZERO_K } from '../physics/constants';
import { PhysicsError } from '../physics/errors';
import type { Track } from '../physics/track';

/** A track-file problem at a line (1-based, the header is counted) and column (its header name). */
export class TrackCsvError extends PhysicsError {
  constructor(
    message: string,
    readonly line: number,
    readonly column: string | null,
    code: 'CSV_NO_HEADER' | 'CSV_BAD_ROW' = 'CSV_BAD_ROW',
  ) {
    super(code, message, { line, column });
    this.name = 'TrackCsvError';
  }
}

/**
 * Metadata a track file may carry in its leading comments, in the file's units as named (the
 * temperature in °C, as analysts write it); {@link trackFileConditions} gives the SI conditions.
 */
export interface TrackMeta {
  massKg?: number;
  diameterM?: number;
  ball?: string;
  airDensityKgM3?: number;
  temperatureC?: number;
  pressurePa?: number;
  humidityPct?: number;
  altitudeM?: number;
  windAlongFlightMps?: number;
}

/**
 * The weather of a track file as the engine reads it: kelvin from the file's °C, the other values as written.
 * @returns the conditions, or null when the file names no temperature, pressure, humidity or altitude.
 */
export function trackFileConditions(meta: TrackMeta): Conditions | null {
  if ([meta.temperatureC, meta.pressurePa, meta.humidityPct, meta.altitudeM].every((v) => v === undefined)) return null;
  return {
    airTemperatureK: meta.temperatureC === undefined ? undefined : meta.temperatureC + CELSIUS_ZERO_K,
    airPressurePa: meta.pressurePa,
    relativeHumidityPct: meta.humidityPct,
    altitudeM: meta.altitudeM,
  };
}

/** Comment keys of the metadata, as written in the files. */
const META_KEYS: Record<string, keyof TrackMeta> = {
  mass_kg: 'massKg',
  diameter_m: 'diameterM',
  ball: 'ball',
  air_density_kg_m3: 'airDensityKgM3',
  temperature_c: 'temperatureC',
  pressure_pa: 'pressurePa',
  humidity_pct: 'humidityPct',
  altitude_m: 'altitudeM',
  wind_m_s: 'windAlongFlightMps',
};

/** A plain decimal number: sign, digits, optional fraction, optional complete exponent. */
const DECIMAL = /^[+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?$/;

/** True when a cell is a plain decimal number (see the module's rules). */
export function isDecimalCell(cell: string): boolean {
  return DECIMAL.test(cell);
}

/** The wording of the problems every track file can have; the import and the `fit` command each keep theirs. */
interface TableWording {
  /** No header line at all. */
  empty: string;
  /** A row whose number of cells differs from the header's. */
  cellCount: (line: number, found: number, header: string[]) => string;
  /** A cell that is not a plain decimal number. */
  notANumber: (line: number, column: string, cell: string) => string;
}

/** The lines of a track file after the shared rules: header, rows of trimmed cells, metadata. */
interface TrackTable {
  header: string[];
  headerLine: number;
  rows: { line: number; cells: string[] }[];
  meta: TrackMeta;
}

/**
 * Reads the structure every track file shares: comments and metadata, the header, rows of cells.
 * @param checkHeader the reader's own header rule, applied before any row is read.
 * @throws TrackCsvError `CSV_NO_HEADER` without a header; `CSV_BAD_ROW` for a repeated column, a
 *   metadata value that is not a number, or a row with the wrong number of cells.
 */
function readTrackTable(text: string, wording: TableWording, checkHeader: (header: string[], headerLine: number) => void): TrackTable {
  const lines = text.replace(/^\uFEFF/, '').split(/\r\n|\n|\r/);
  const meta: TrackMeta = {};
  let header: string[] | null = null;
  let headerLine = 0;
  const rows: TrackTable['rows'] = [];
  for (let i = 0; i < lines.length; i++) {
    const trimmed = lines[i].trim();
    const line = i + 1;
    if (trimmed === '') continue;
    if (trimmed.startsWith('#')) {
      if (header === null) readMeta(trimmed, line, meta);
      continue;
    }
    const cells = trimmed.split(',').map((c) => c.trim());
    if (header === null) {
      header = cells.map((h) => h.toLowerCase());
      headerLine = line;
      const dup = header.find((h, k) => header!.indexOf(h) !== k);
      if (dup !== undefined) throw new TrackCsvError(`Line ${line}: the column "${dup}" appears twice in the header.`, line, dup);
      checkHeader(header, line);
      continue;
    }
    if (cells.length !== header.length) throw new TrackCsvError(wording.cellCount(line, cells.length, header), line, null);
    rows.push({ line, cells });
  }
  if (header === null) throw new TrackCsvError(wording.empty, 1, null, 'CSV_NO_HEADER');
  return { header, headerLine, rows, meta };
}

/** Adds a leading `# key: value` comment to the metadata when the key is known; other comments are remarks. */
function readMeta(comment: string, line: number, meta: TrackMeta): void {
  const m = /^#\s*([A-Za-z0-9_]+)\s*:\s*(.*?)\s*$/.exec(comment);
  const key = m ? META_KEYS[m[1].toLowerCase()] : undefined;
  if (!m || !key) return;
  if (key === 'ball') {
    meta.ball = m[2];
    return;
  }
  if (!isDecimalCell(m[2])) throw new TrackCsvError(`Line ${line}: "${m[1]}" must be a number, got "${m[2]}".`, line, m[1]);
  meta[key] = Number(m[2]);
}

// ---------------------------------------------------------------------------------------------
// The flight import: pixel or metre columns.

export type ParsedTrackCsv =
  | { kind: 'pixels'; rows: { line: number; frame: number; xPx: number; yPx: number; radiusPx: number | null; confidence: number | null }[] }
  | { kind: 'metres'; rows: { line: number; tS: number; xM: number; yM: number }[] };

const PIXEL_REQUIRED = ['frame', 'x_px', 'y_px'] as const;
const PIXEL_OPTIONAL = ['radius_px', 'confidence'] as const;
const METRE_REQUIRED = ['t', 'x', 'y'] as const;
/** Columns the export writes that an import of pixel columns ignores. */
const IGNORED = ['t', 't_s', 'source', 'x_m', 'y_m', 'x_ft', 'y_ft'];

/** The import's header: the pixel or the metre columns, and no column it does not know. */
function checkImportHeader(header: string[], headerLine: number): void {
  const hasPixels = PIXEL_REQUIRED.every((c) => header.includes(c));
  const hasMetres = METRE_REQUIRED.every((c) => header.includes(c));
  if (!hasPixels && !hasMetres) {
    throw new TrackCsvError(
      `Line ${headerLine}: the header must name either the pixel columns frame,x_px,y_px or the metre columns t,x,y (found: ${header.join(',')}).`,
      headerLine,
      null,
    );
  }
  const known: string[] = hasPixels ? [...PIXEL_REQUIRED, ...PIXEL_OPTIONAL, ...IGNORED] : [...METRE_REQUIRED];
  const unknown = header.find((h) => !known.includes(h));
  if (unknown !== undefined) {
    throw new TrackCsvError(
      `Line ${headerLine}: unknown column "${unknown}". Use ${hasPixels ? 'frame,x_px,y_px[,radius_px,confidence]' : 't,x,y'}.`,
      headerLine,
      unknown,
    );
  }
}

const IMPORT_WORDING: TableWording = {
  empty: 'The CSV is empty: it needs a header row and at least one row of points.',
  cellCount: (line, found, header) => `Line ${line}: ${found} cells where the header has ${header.length}.`,
  notANumber: (line, column, cell) => `Line ${line}, column "${column}": "${cell}" is not a number.`,
};

/**
 * Reads a track CSV for the flight import: pixel columns `frame,x_px,y_px` (optional `radius_px`,
 * `confidence`; the export's `t_s`, `source`, `x_m`/`x_ft`, `y_m`/`y_ft` (and a plain `t`) are ignored) or metre columns `t,x,y`
 * (s, m). Frames are whole numbers from 0, radii above 0 px, confidences 0…1, times 0 s or more.
 * @param text the file's content; rules in the module comment.
 * @returns the rows with their line numbers, in pixels or in metres.
 * @throws TrackCsvError naming the line and column of the first problem
 */
export function parseTrackCsv(text: string): ParsedTrackCsv {
  const { header, headerLine, rows } = readTrackTable(text, IMPORT_WORDING, checkImportHeader);
  const kind: 'pixels' | 'metres' = PIXEL_REQUIRED.every((c) => header.includes(c)) ? 'pixels' : 'metres';
  const col = (name: string) => header.indexOf(name);
  const pixelRows: Extract<ParsedTrackCsv, { kind: 'pixels' }>['rows'] = [];
  const metreRows: Extract<ParsedTrackCsv, { kind: 'metres' }>['rows'] = [];
  for (const { line, cells } of rows) {
    const num = (name: string, optional = false): number | null => {
      const cell = cells[col(name)];
      if (cell === '' && optional) return null;
      if (!isDecimalCell(cell)) throw new TrackCsvError(IMPORT_WORDING.notANumber(line, name, cell), line, name);
      return Number(cell);
    };
    if (kind === 'pixels') {
      const frame = num('frame') as number;
      if (!Number.isInteger(frame) || frame < 0) {
        throw new TrackCsvError(`Line ${line}, column "frame": "${cells[col('frame')]}" is not a frame index (a whole number from 0).`, line, 'frame');
      }
      const radiusPx = col('radius_px') >= 0 ? num('radius_px', true) : null;
      if (radiusPx !== null && radiusPx <= 0) throw new TrackCsvError(`Line ${line}, column "radius_px": the radius must be more than 0.`, line, 'radius_px');
      const confidence = col('confidence') >= 0 ? num('confidence', true) : null;
      if (confidence !== null && (confidence < 0 || confidence > 1)) {
        throw new TrackCsvError(`Line ${line}, column "confidence": "${cells[col('confidence')]}" must be between 0 and 1.`, line, 'confidence');
      }
      pixelRows.push({ line, frame, xPx: num('x_px') as number, yPx: num('y_px') as number, radiusPx, confidence });
    } else {
      const tS = num('t') as number;
      if (tS < 0) throw new TrackCsvError(`Line ${line}, column "t": the time must be 0 s or more.`, line, 't');
      metreRows.push({ line, tS, xM: num('x') as number, yM: num('y') as number });
    }
  }
  if (pixelRows.length + metreRows.length === 0) throw new TrackCsvError('The CSV has a header but no rows of points.', headerLine, null);
  return kind === 'pixels' ? { kind, rows: pixelRows } : { kind, rows: metreRows };
}

/** Writes one CSV cell: numbers plainly (ten significant digits), null as an empty cell, text quoted when it holds `,`, `"` or a line break. */
export function csvCell(value: number | string | null): string {
  if (value === null) return '';
  if (typeof value === 'number') return Number.isInteger(value) ? String(value) : String(Number(value.toPrecision(10)));
  return /[",\n]/.test(value) ? `"${value.replace(/"/g, '""')}"` : value;
}

// ---------------------------------------------------------------------------------------------
// The `fit` command's track files: metre columns and the flight's metadata.

const FIT_WORDING: TableWording = {
  empty: 'The file has no header line naming the columns t, x and y.',
  cellCount: (line, found, header) => `Line ${line}: expected ${header.length} fields (${header.join(',')}), found ${found}.`,
  notANumber: (line, column, cell) => `Line ${line}: "${cell}" in column ${column} is not a number.`,
};

/**
 * Reads a track file of the `fit` command: a header naming at least `t`, `x`, `y` (seconds from the
 * release; metres along the flight and up from the ground), any further number columns, and
 * leading `# key: value` comments with the ball and the air ({@link TrackMeta}).
 * @param text the file's content; rules in the module comment.
 * @returns the samples, the metadata of its leading comments, and every column by name.
 * @throws TrackCsvError `CSV_NO_HEADER` when no header holds t, x and y; `CSV_BAD_ROW` for a row
 *   with missing or non-numeric cells (`NaN` is read as a number and caught by `checkTrack`).
 */
export function parseFitTrackCsv(text: string): { track: { t: number[]; x: number[]; y: number[] }; meta: TrackMeta; columns: Record<string, number[]> } {
  const { header, rows, meta } = readTrackTable(text, FIT_WORDING, (names, headerLine) => {
    if (!['t', 'x', 'y'].every((c) => names.includes(c))) {
      throw new TrackCsvError(`Line ${headerLine}: the header must name the columns t, x and y (seconds, metres); found "${names.join(',')}".`, headerLine, null, 'CSV_NO_HEADER');
    }
  });
  const cols: number[][] = header.map(() => []);
  for (const { line, cells } of rows) {
    cells.forEach((cell, c) => {
      if (/^nan$/i.test(cell)) cols[c].push(NaN);
      else if (isDecimalCell(cell)) cols[c].push(Number(cell));
      else throw new TrackCsvError(FIT_WORDING.notANumber(line, header[c], cell), line, header[c]);
    });
  }
  const columns: Record<string, number[]> = {};
  header.forEach((h, c) => { columns[h] = cols[c]; });
  return { track: { t: columns.t, x: columns.x, y: columns.y }, meta, columns };
}

/**
 * Writes a track (and optional metadata and comments) as a `fit` command file with the header
 * `t,x,y`; times and positions to 1e-7 (0.1 µs, 0.1 µm).
 */
export function formatTrackCsv(track: Track, meta: TrackMeta = {}, comments: string[] = []): string {
  const out: string[] = comments.map((c) => `# ${c}`);
  for (const [file, key] of Object.entries(META_KEYS)) {
    const v = meta[key];
    if (v !== undefined) out.push(`# ${file}: ${v}`);
  }
  out.push('t,x,y');
  for (let i = 0; i < track.t.length; i++) {
    out.push(`${fixed(track.t[i], 7)},${fixed(track.x[i], 7)},${fixed(track.y[i], 7)}`);
  }
  return out.join('\n') + '\n';
}

function fixed(v: number, decimals: number): string {
  if (!Number.isFinite(v)) return String(v);
  return String(Number(v.toFixed(decimals)));
}
