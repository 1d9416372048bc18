/**
 * Traced ball positions of a flight, and the track CSV format (import and export).
 * Pixels are measured from the top-left corner of the frame as served (after rotation), y down; frames are 0-based.
 */
import { z } from 'zod';

export const POINT_SOURCES = ['manual', 'auto'] as const;
export type PointSource = (typeof POINT_SOURCES)[number];

/** Most points one flight may hold (a 10 s clip at 960 fps). */
export const MAX_TRACK_POINTS = 10_000;

const finite = (what: string) =>
  z.number({ error: `${what} must be a number.` }).refine(Number.isFinite, { error: `${what} must be a finite number.` });

export const trackPointInputSchema = z.object({
  frame: z.number({ error: 'Frame must be a whole number.' }).int({ error: 'Frame must be a whole number.' }).min(0, { error: 'Frame must be 0 or more.' }),
  xPx: finite('x (px)'),
  yPx: finite('y (px)'),
  radiusPx: z.number().positive({ error: 'Radius must be more than 0 pixels.' }).nullable().optional(),
  source: z.enum(POINT_SOURCES).optional(),
  confidence: z.number().min(0, { error: 'Confidence must be between 0 and 1.' }).max(1, { error: 'Confidence must be between 0 and 1.' }).nullable().optional(),
});
export type TrackPointInput = z.infer<typeof trackPointInputSchema>;

export const trackPointsBodySchema = z
  .object({
    points: z.array(trackPointInputSchema).max(MAX_TRACK_POINTS, { error: `A flight holds at most ${MAX_TRACK_POINTS} points.` }),
  })
  .superRefine((value, ctx) => {
    const seen = new Set<number>();
    value.points.forEach((p, i) => {
      if (seen.has(p.frame)) {
        ctx.addIssue({ code: 'custom', path: ['points', i, 'frame'], message: `Frame ${p.frame} has two points: keep one point per frame.` });
      }
      seen.add(p.frame);
    });
  });
export type TrackPointsBody = z.infer<typeof trackPointsBodySchema>;

export const followBodySchema = z.object({
  frame: z.number().int({ error: 'Frame must be a whole number.' }).min(0, { error: 'Frame must be 0 or more.' }),
  xPx: finite('x (px)'),
  yPx: finite('y (px)'),
  radiusPx: z.number().positive({ error: 'Radius must be more than 0 pixels.' }).nullable().optional(),
});
export type FollowBody = z.infer<typeof followBodySchema>;

export const trackImportBodySchema = z.object({
  csv: z.string({ error: 'Send the CSV text in "csv".' }).min(1, { error: 'The CSV is empty.' }).max(5_000_000, { error: 'The CSV is larger than 5 MB.' }),
});

export interface TrackPoint {
  frame: number;
  xPx: number;
  yPx: number;
  radiusPx: number | null;
  source: PointSource;
  confidence: number | null;
  /** frame / captureFps, seconds. */
  tS: number;
  /** Metres along the flight and up from the ground; null until the clip is calibrated. */
  xM: number | null;
  yM: number | null;
}

/** Header of the exported track CSV. */
export const TRACK_CSV_COLUMNS = ['frame', 't', 'x_px', 'y_px', 'radius_px', 'source', 'confidence', 'x_m', 'y_m'] as const;

export type ParsedTrackCsv =
  | { kind: 'pixels'; rows: { line: number; frame: number; xPx: number; yPx: number; radiusPx: number | null; confidence: number | null }[] }
  | { kind: 'metres'; rows: { line: number; tS: number; xM: number; yM: number }[] };

/** A CSV problem at a line (1-based, the header is line 1) and column (its header name). */
export class TrackCsvError extends Error {
  constructor(
    message: string,
    readonly line: number,
    readonly column: string | null,
  ) {
    super(message);
    this.name = 'TrackCsvError';
  }
}

const PIXEL_REQUIRED = ['frame', 'x_px', 'y_px'] as const;
const PIXEL_OPTIONAL = ['radius_px', 'confidence'] as const;
const METRE_REQUIRED = ['t', 'x', 'y'] as const;
/** Columns our own export writes that an import of pixel columns ignores. */
const IGNORED = ['t', 'source', 'x_m', 'y_m'];

/**
 * Reads a track CSV: a header row, then either pixel columns `frame,x_px,y_px` (optional `radius_px`,
 * `confidence`) or metre columns `t,x,y`. Comma separated, `.` decimals, blank and `#` comment lines skipped.
 * @throws TrackCsvError naming the line and column of the first unreadable cell
 */
export function parseTrackCsv(text: string): ParsedTrackCsv {
  const lines = text.replace(/^\uFEFF/, '').split(/\r\n|\n|\r/);
  // `#` lines are comments (the fit command's track files carry their ball and air there).
  const skip = (l: string) => l.trim() === '' || l.trim().startsWith('#');
  const headerIndex = lines.findIndex((l) => !skip(l));
  if (headerIndex < 0) throw new TrackCsvError('The CSV is empty: it needs a header row and at least one row of points.', 1, null);
  const header = lines[headerIndex].split(',').map((h) => h.trim().toLowerCase());
  const headerLine = headerIndex + 1;
  const dup = header.find((h, i) => header.indexOf(h) !== i);
  if (dup !== undefined) throw new TrackCsvError(`Line ${headerLine}: the column "${dup}" appears twice in the header.`, headerLine, dup);
  const hasPixels = PIXEL_REQUIRED.every((c) => header.includes(c));
  const hasMetres = METRE_REQUIRED.every((c) => header.includes(c));
  if (!hasPixels && !hasMetres) {
    throw new TrackCsvError(
      `Line ${headerLine}: the header must name either the pixel columns frame,x_px,y_px or the metre columns t,x,y (found: ${header.join(',')}).`,
      headerLine,
      null,
    );
  }
  const kind: 'pixels' | 'metres' = hasPixels ? 'pixels' : 'metres';
  const known = kind === 'pixels' ? [...PIXEL_REQUIRED, ...PIXEL_OPTIONAL, ...IGNORED] : [...METRE_REQUIRED];
  const unknown = header.find((h) => !known.includes(h));
  if (unknown !== undefined) {
    throw new TrackCsvError(
      `Line ${headerLine}: unknown column "${unknown}". Use ${kind === 'pixels' ? 'frame,x_px,y_px[,radius_px,confidence]' : 't,x,y'}.`,
      headerLine,
      unknown,
    );
  }
  const col = (name: string) => header.indexOf(name);
  const pixelRows: Extract<ParsedTrackCsv, { kind: 'pixels' }>['rows'] = [];
  const metreRows: Extract<ParsedTrackCsv, { kind: 'metres' }>['rows'] = [];
  for (let i = headerIndex + 1; i < lines.length; i++) {
    const raw = lines[i];
    if (skip(raw)) continue;
    const line = i + 1;
    const cells = raw.split(',').map((c) => c.trim());
    if (cells.length !== header.length) {
      throw new TrackCsvError(`Line ${line}: ${cells.length} cells where the header has ${header.length}.`, line, null);
    }
    const num = (name: string, optional = false): number | null => {
      const cell = cells[col(name)];
      if (cell === '' && optional) return null;
      const value = cell === '' ? NaN : Number(cell);
      if (!Number.isFinite(value)) {
        throw new TrackCsvError(`Line ${line}, column "${name}": "${cell}" is not a number.`, line, name);
      }
      return value;
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

/** Writes one CSV cell: numbers plainly, null as an empty cell. */
export function csvCell(value: number | string | null): string {
  if (value === null) return '';
  if (typeof value === 'number') return Number.isInteger(value) ? String(value) : String(Number(value.toPrecision(10)));
  return /[",\n]/.test(value) ? `"${value.replace(/"/g, '""')}"` : value;
}
