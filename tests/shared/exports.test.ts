import { describe, expect, it } from 'vitest';
import { csvDocument, csvFileName, defuseFormula, roundCell, UTF8_BOM } from '../../shared/exports/csv';
import { flightCsvColumns, flightCsvRow, flightsCsv, type FlightCsvRow } from '../../shared/exports/flights';
import type { Flight } from '../../shared/schemas/flight';
import { exportRecords } from '../support/csv';

const row = (over: Partial<FlightCsvRow> = {}): FlightCsvRow => ({
  id: 7,
  sessionDate: '2026-03-14',
  venue: 'Harrowmere Fields',
  athleteName: 'Isla Brackwater',
  actionLabel: 'Punt',
  ballName: 'Rugby union ball',
  statusLabel: 'fitted',
  launchSpeedMps: 24.12345,
  launchAngleDeg: 51.234,
  carryM: 41.98765,
  standardCarryM: 42.5,
  cd: 0.23456,
  cdError: 0.01234,
  model: 'drag',
  fittedAt: '2026-03-14T18:02:00.000Z',
  ...over,
});

function parseCsv(withBom: string): string[][] {
  expect(withBom.startsWith(UTF8_BOM)).toBe(true);
  return exportRecords(withBom);
}

describe('flightsCsv', () => {
  const METRIC = flightCsvColumns('metric');
  const cellOf = (record: string[], columns: string[], name: string) => record[columns.indexOf(name)];

  it('writes the BOM, the metric header and one record per flight when the member sees metric', () => {
    const text = flightsCsv([row(), row({ id: 8 })], 'metric');
    expect(text.charCodeAt(0)).toBe(0xfeff);
    const records = parseCsv(text);
    expect(records[0]).toEqual([
      'flight_id', 'session_date', 'venue', 'athlete', 'action', 'ball', 'status', 'launch_speed_mps', 'launch_angle_deg',
      'carry_m', 'standard_carry_m', 'cd', 'cd_error', 'model', 'fitted_at',
    ]);
    expect(records).toHaveLength(3);
    expect(records.every((r) => r.length === METRIC.length)).toBe(true);
    expect(text.endsWith('\r\n')).toBe(true);
  });

  it('rounds numbers to their column precision without trailing zeros when metric', () => {
    const [, record] = parseCsv(flightsCsv([row()], 'metric'));
    expect(cellOf(record, METRIC, 'launch_speed_mps')).toBe('24.123');
    expect(cellOf(record, METRIC, 'launch_angle_deg')).toBe('51.23');
    expect(cellOf(record, METRIC, 'carry_m')).toBe('41.988');
    expect(cellOf(record, METRIC, 'standard_carry_m')).toBe('42.5');
    expect(cellOf(record, METRIC, 'cd')).toBe('0.2346');
    expect(cellOf(record, METRIC, 'cd_error')).toBe('0.0123');
  });

  it('names feet and mph in the header and converts the values when imperial', () => {
    // Exact factors: 0.3048 m per ft, 0.44704 m/s per mph (International Yard and Pound Agreement, 1959).
    const columns = flightCsvColumns('imperial');
    expect(columns).toContain('carry_ft');
    expect(columns).toContain('standard_carry_ft');
    expect(columns).toContain('launch_speed_mph');
    expect(columns.some((c) => c.endsWith('_m') || c.endsWith('_mps'))).toBe(false);
    const [header, record] = parseCsv(flightsCsv([row({ carryM: 30.48, launchSpeedMps: 26.8224, standardCarryM: 3.048 })], 'imperial'));
    expect(header).toEqual(columns);
    expect(cellOf(record, columns, 'carry_ft')).toBe('100');
    expect(cellOf(record, columns, 'launch_speed_mph')).toBe('60');
    expect(cellOf(record, columns, 'standard_carry_ft')).toBe('10');
    expect(cellOf(record, columns, 'launch_angle_deg')).toBe('51.23');
  });

  it('leaves cells empty when a flight has no fit yet', () => {
    const [, record] = parseCsv(
      flightsCsv([row({ launchSpeedMps: null, launchAngleDeg: null, carryM: null, standardCarryM: null, cd: null, cdError: null, model: null, fittedAt: null, statusLabel: 'traced' })], 'metric'),
    );
    expect(record.slice(7)).toEqual(['', '', '', '', '', '', '', '']);
    expect(record[6]).toBe('traced');
  });

  it('quotes fields holding commas, quotes and line breaks when names are free text', () => {
    const text = flightsCsv([row({ venue: 'Pitch 2, "north" end', athleteName: 'Ana\nBell' })], 'metric');
    const [, record] = parseCsv(text);
    expect(record[2]).toBe('Pitch 2, "north" end');
    expect(record[3]).toBe('Ana\nBell');
    expect(text).toContain('"Pitch 2, ""north"" end"');
  });

  it('keeps accented names intact after the BOM when names are not ASCII', () => {
    const [, record] = parseCsv(flightsCsv([row({ athleteName: 'Sølvi Ærendal-Çelik', venue: 'Prés du Lac' })], 'metric'));
    expect(record[3]).toBe('Sølvi Ærendal-Çelik');
    expect(record[2]).toBe('Prés du Lac');
  });

  it('defuses names that a spreadsheet would run as formulas but keeps negative numbers when exporting', () => {
    const text = flightsCsv([row({ athleteName: '=HYPERLINK("http://x.example","y")', venue: '@SUM(A1)', actionLabel: '+1', ballName: '-2', launchAngleDeg: -3.5 })], 'metric');
    const [, record] = parseCsv(text);
    expect(record[3]).toBe("'=HYPERLINK(\"http://x.example\",\"y\")");
    expect(record[2]).toBe("'@SUM(A1)");
    expect(record[4]).toBe("'+1");
    expect(record[5]).toBe("'-2");
    expect(cellOf(record, METRIC, 'launch_angle_deg')).toBe('-3.5');
  });
});

describe('csvDocument', () => {
  it('defuses a leading tab or carriage return and quotes the field when text could split a record', () => {
    const text = csvDocument(['a', 'b'], [['\tcmd', '\r=1+1']]);
    expect(text).toBe(`${UTF8_BOM}a,b\r\n"'\tcmd","'\r=1+1"\r\n`);
  });

  it('writes nothing for null and undefined cells when values are unknown', () => {
    expect(csvDocument(['a', 'b', 'c'], [[null, undefined, 0]])).toBe(`${UTF8_BOM}a,b,c\r\n,,0\r\n`);
  });
});

describe('defuseFormula', () => {
  it('prefixes a quote only when the text starts with a formula character', () => {
    expect(defuseFormula('=SUM(A1)')).toBe("'=SUM(A1)");
    expect(defuseFormula('@home')).toBe("'@home");
    expect(defuseFormula('+44')).toBe("'+44");
    expect(defuseFormula('-x')).toBe("'-x");
    expect(defuseFormula('Harrowmere')).toBe('Harrowmere');
    expect(defuseFormula('a=b')).toBe('a=b');
  });
});

describe('roundCell', () => {
  it('writes no negative zero and no cell for non-finite values when rounding', () => {
    expect(roundCell(-0.00001, 3)).toBe(0);
    expect(Object.is(roundCell(-0.00001, 3), -0)).toBe(false);
    expect(roundCell(Number.NaN, 3)).toBeNull();
    expect(roundCell(Number.POSITIVE_INFINITY, 3)).toBeNull();
    expect(roundCell(null, 3)).toBeNull();
    expect(roundCell(-1.26, 1)).toBe(-1.3);
  });
});

describe('csvFileName', () => {
  it('keeps only lower-case letters, digits and dashes when names hold spaces or accents', () => {
    expect(csvFileName('session', '2026-03-14', 'Prés du Lac, pitch 2')).toBe('arcwright-session-2026-03-14-pr-s-du-lac-pitch-2.csv');
    expect(csvFileName('flights', '2026-03-14')).toBe('arcwright-flights-2026-03-14.csv');
  });
});

describe('flightCsvRow', () => {
  const flight = {
    id: 3, clubId: 1, sessionId: 2, clipId: 4, athleteId: 5, athleteName: 'Juno Pelham', action: 'punt', ballId: 'club:9',
    frameStart: 0, frameEnd: 40, releaseFrame: null, releaseHeightM: null, status: 'traced', attentionReason: null, notes: null,
    pointCount: 30, latestFit: null, job: null, createdAt: '2026-03-14T18:00:00.000Z', updatedAt: '2026-03-14T18:00:00.000Z',
  } as unknown as Flight;

  it("names a club's own ball by the name the caller looked up, and a catalogue ball by the catalogue", () => {
    expect(flightCsvRow(flight, { session: null, actionLabel: 'Punt', ballName: 'Fennick play ball' }).ballName).toBe('Fennick play ball');
    expect(flightCsvRow({ ...flight, ballId: 'rugby' }, { session: null, actionLabel: 'Punt' }).ballName).toBe('Rugby union ball');
    expect(flightCsvRow(flight, { session: null, actionLabel: 'Punt' }).ballName).toBe('club:9');
  });
});
