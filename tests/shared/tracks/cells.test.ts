import { describe, expect, it } from 'vitest';
import { isDecimalCell, parseFitTrackCsv, parseTrackCsv, TrackCsvError } from '../../../shared/tracks/csv';

function errorOf(read: () => unknown): TrackCsvError {
  try {
    read();
  } catch (err) {
    if (err instanceof TrackCsvError) return err;
    throw err;
  }
  throw new Error('expected a TrackCsvError');
}

describe('isDecimalCell', () => {
  it.each(['0', '12', '-3', '+2', '3.', '.5', '-0.25', '1.5e-3', '2E+4', '7e0'])('accepts the plain decimal number %s', (cell) => {
    expect(isDecimalCell(cell)).toBe(true);
  });

  it.each(['', '0x10', '0b11', '0o7', '1e', '1e+', 'e5', 'Infinity', '-Infinity', 'NaN', '1_000', '12,5', '1.2.3', '5 m', '--1', '.'])('refuses %j', (cell) => {
    expect(isDecimalCell(cell)).toBe(false);
  });
});

describe('parseTrackCsv cells', () => {
  it.each([
    ['a hexadecimal frame', 'frame,x_px,y_px\n0x10,1,2\n', 'frame', '0x10'],
    ['a binary pixel', 'frame,x_px,y_px\n1,0b11,2\n', 'x_px', '0b11'],
    ['an incomplete exponent', 'frame,x_px,y_px\n1,2,1e\n', 'y_px', '1e'],
    ['an infinite radius', 'frame,x_px,y_px,radius_px\n1,2,3,Infinity\n', 'radius_px', 'Infinity'],
    ['a NaN confidence', 'frame,x_px,y_px,confidence\n1,2,3,NaN\n', 'confidence', 'NaN'],
    ['an octal time', 't,x,y\n0o7,1,2\n', 't', '0o7'],
    ['an empty metre cell', 't,x,y\n0,,2\n', 'x', ''],
  ])('refuses %s, naming the header column and the row', (_what, text, column, cell) => {
    const err = errorOf(() => parseTrackCsv(text));
    expect(err).toMatchObject({ line: 2, column, code: 'CSV_BAD_ROW' });
    expect(err.message).toBe(`Line 2, column "${column}": "${cell}" is not a number.`);
  });

  it('counts comment and blank lines when naming the row', () => {
    const err = errorOf(() => parseTrackCsv('# from the touchline camera\n\nframe,x_px,y_px\n1,2,3\n\n2,0x1F,3\n'));
    expect(err).toMatchObject({ line: 6, column: 'x_px' });
  });

  it.each([
    ['a frame that is not whole', 'frame,x_px,y_px\n2.5,1,1\n', 'frame', 'Line 2, column "frame": "2.5" is not a frame index (a whole number from 0).'],
    ['a radius of 0', 'frame,x_px,y_px,radius_px\n1,1,1,0\n', 'radius_px', 'Line 2, column "radius_px": the radius must be more than 0.'],
    ['a confidence above 1', 'frame,x_px,y_px,confidence\n1,1,1,1.5\n', 'confidence', 'Line 2, column "confidence": "1.5" must be between 0 and 1.'],
    ['a negative time', 't,x,y\n-0.1,0,0\n', 't', 'Line 2, column "t": the time must be 0 s or more.'],
    ['a metadata value that is not a number', '# mass_kg: 0x1\nt,x,y\n0,0,0\n', 'mass_kg', 'Line 1: "mass_kg" must be a number, got "0x1".'],
    ['a repeated column', 'frame,x_px,y_px,frame\n', 'frame', 'Line 1: the column "frame" appears twice in the header.'],
    ['an unknown column', 't,x,y,spin\n0,0,0,1\n', 'spin', 'Line 1: unknown column "spin". Use t,x,y.'],
  ])('refuses %s with a message naming its column', (_what, text, column, message) => {
    expect(errorOf(() => parseTrackCsv(text))).toMatchObject({ column, message });
  });

  it.each([
    ['an empty file', '', 'The CSV is empty: it needs a header row and at least one row of points.'],
    ['a header without rows', 'frame,x_px,y_px\n', 'The CSV has a header but no rows of points.'],
    ['a header without known columns', 'when,where\n1,2\n', 'Line 1: the header must name either the pixel columns frame,x_px,y_px or the metre columns t,x,y (found: when,where).'],
    ['a row with too many cells', 'frame,x_px,y_px\n1,2,3,4\n', 'Line 2: 4 cells where the header has 3.'],
  ])('refuses %s with a message for the whole file or row', (_what, text, message) => {
    expect(errorOf(() => parseTrackCsv(text))).toMatchObject({ column: null, message });
  });

  it('reads exponents as the writers produce them', () => {
    expect(parseTrackCsv('t,x,y\n0,1.5e-7,2E+1\n')).toEqual({ kind: 'metres', rows: [{ line: 2, tS: 0, xM: 1.5e-7, yM: 20 }] });
  });
});

describe('parseFitTrackCsv cells', () => {
  it.each([
    ['0x10', 'x'],
    ['0b11', 'y'],
    ['1e', 'x'],
    ['Infinity', 'y'],
  ])('refuses %s, naming the header column and the row', (cell, column) => {
    const row = column === 'x' ? `0.1,${cell},1` : `0.1,1,${cell}`;
    const err = errorOf(() => parseFitTrackCsv(`# ball: tennis\nt,x,y\n0,0,0\n${row}\n`));
    expect(err).toMatchObject({ line: 4, column, code: 'CSV_BAD_ROW' });
    expect(err.message).toBe(`Line 4: "${cell}" in column ${column} is not a number.`);
  });

  it.each([
    ['an empty file', '\n', 'CSV_NO_HEADER', 'The file has no header line naming the columns t, x and y.'],
    ['a header without t, x, y', 'time,x,y\n0,0,0\n', 'CSV_NO_HEADER', 'Line 1: the header must name the columns t, x and y (seconds, metres); found "time,x,y".'],
    ['a row with a missing cell', 't,x,y\n0,0\n', 'CSV_BAD_ROW', 'Line 2: expected 3 fields (t,x,y), found 2.'],
    ['a metadata value that is not a number', '# wind_m_s: Infinity\nt,x,y\n', 'CSV_BAD_ROW', 'Line 1: "wind_m_s" must be a number, got "Infinity".'],
  ])('refuses %s with its message', (_what, text, code, message) => {
    expect(errorOf(() => parseFitTrackCsv(text))).toMatchObject({ code, message });
  });
});
