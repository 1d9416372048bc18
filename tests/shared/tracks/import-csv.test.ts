import { describe, expect, it } from 'vitest';
import { csvCell, parseTrackCsv, TrackCsvError } from '../../../shared/tracks/csv';

function errorOf(text: string): TrackCsvError {
  try {
    parseTrackCsv(text);
  } catch (err) {
    if (err instanceof TrackCsvError) return err;
    throw err;
  }
  throw new Error('expected a TrackCsvError');
}

describe('parseTrackCsv', () => {
  it('reads pixel columns in any order, with optional radius and confidence', () => {
    const parsed = parseTrackCsv('y_px,frame,x_px,confidence\r\n10,0,5,0.5\r\n11.5,1,6,\r\n');
    expect(parsed).toEqual({
      kind: 'pixels',
      rows: [
        { line: 2, frame: 0, xPx: 5, yPx: 10, radiusPx: null, confidence: 0.5 },
        { line: 3, frame: 1, xPx: 6, yPx: 11.5, radiusPx: null, confidence: null },
      ],
    });
  });

  it('reads metre columns and counts comment lines in the line numbers', () => {
    const parsed = parseTrackCsv('# mass_kg: 0.43\nt,x,y\n0,0,1.8\n0.05,0.6,2.1\n');
    expect(parsed).toEqual({ kind: 'metres', rows: [{ line: 3, tS: 0, xM: 0, yM: 1.8 }, { line: 4, tS: 0.05, xM: 0.6, yM: 2.1 }] });
  });

  it('accepts its own export (extra t, source and metre columns are ignored)', () => {
    const parsed = parseTrackCsv('frame,t,x_px,y_px,radius_px,source,confidence,x_m,y_m\n3,0.1,10.5,200,6,manual,,,\n');
    expect(parsed.kind).toBe('pixels');
    expect(parsed.rows).toHaveLength(1);
  });

  it('names the line and column of a decimal comma', () => {
    const err = errorOf('frame,x_px,y_px\n1,10,20\n2,12,5\n3,"12,5",7\n');
    expect(err.message).toMatch(/^Line 4/);
    expect(err.line).toBe(4);
  });

  it('names the column of a negative time and an out-of-range confidence', () => {
    expect(errorOf('t,x,y\n-0.1,0,0\n')).toMatchObject({ line: 2, column: 't', message: 'Line 2, column "t": the time must be 0 s or more.' });
    expect(errorOf('frame,x_px,y_px,confidence\n1,1,1,1.5\n')).toMatchObject({ line: 2, column: 'confidence' });
  });

  it('refuses an empty file and a header repeated column', () => {
    expect(errorOf('\n\n').message).toMatch(/The CSV is empty/);
    expect(errorOf('frame,x_px,y_px,x_px\n').message).toMatch(/"x_px" appears twice/);
  });
});

describe('csvCell', () => {
  it('writes numbers plainly at ten significant digits, null as empty, and quotes text with commas', () => {
    expect(csvCell(1 / 3)).toBe('0.3333333333');
    expect(csvCell(42)).toBe('42');
    expect(csvCell(null)).toBe('');
    expect(csvCell('a,b')).toBe('"a,b"');
  });
});
