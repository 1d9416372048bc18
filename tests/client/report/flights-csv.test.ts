import { describe, expect, it } from 'vitest';
import { csvNumber, csvText, FLIGHT_CSV_COLUMNS, flightsCsv, flightsCsvName, type FlightCsvRow } from '../../../src/components/report/flights-csv';

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

/** Splits RFC 4180 text into records of fields (quoted fields may hold commas, quotes and line breaks). */
function parseCsv(text: string): string[][] {
  const records: string[][] = [];
  let field = '';
  let fields: string[] = [];
  let quoted = false;
  for (let i = 0; i < text.length; i++) {
    const c = text[i];
    if (quoted) {
      if (c === '"' && text[i + 1] === '"') { field += '"'; i++; }
      else if (c === '"') quoted = false;
      else field += c;
    } else if (c === '"') quoted = true;
    else if (c === ',') { fields.push(field); field = ''; }
    else if (c === '\r' && text[i + 1] === '\n') { fields.push(field); records.push(fields); fields = []; field = ''; i++; }
    else field += c;
  }
  return records;
}

describe('flightsCsv', () => {
  it('writes the documented header and one record per flight when given rows', () => {
    const text = flightsCsv([row(), row({ id: 8 })]);
    const records = parseCsv(text);
    expect(records[0]).toEqual([...FLIGHT_CSV_COLUMNS]);
    expect(records).toHaveLength(3);
    expect(records.every((r) => r.length === FLIGHT_CSV_COLUMNS.length)).toBe(true);
    expect(text.endsWith('\r\n')).toBe(true);
  });

  it('rounds numbers to their column precision without trailing zeros when values are SI', () => {
    const [, record] = parseCsv(flightsCsv([row()]));
    const cell = (name: (typeof FLIGHT_CSV_COLUMNS)[number]) => record[FLIGHT_CSV_COLUMNS.indexOf(name)];
    expect(cell('launch_speed_mps')).toBe('24.123');
    expect(cell('launch_angle_deg')).toBe('51.23');
    expect(cell('carry_m')).toBe('41.988');
    expect(cell('standard_carry_m')).toBe('42.5');
    expect(cell('cd')).toBe('0.2346');
    expect(cell('cd_error')).toBe('0.0123');
  });

  it('leaves cells empty when a flight has no fit yet', () => {
    const [, record] = parseCsv(
      flightsCsv([row({ launchSpeedMps: null, launchAngleDeg: null, carryM: null, standardCarryM: null, cd: null, cdError: null, model: null, fittedAt: null, statusLabel: 'traced' })]),
    );
    expect(record.slice(7)).toEqual(['', '', '', '', '', '', '', '']);
    expect(record[6]).toBe('traced');
  });

  it('quotes fields holding commas, quotes and line breaks when names are free text', () => {
    const text = flightsCsv([row({ venue: 'Pitch 2, "north" end', athleteName: 'Ana\nBell' })]);
    const [, record] = parseCsv(text);
    expect(record[2]).toBe('Pitch 2, "north" end');
    expect(record[3]).toBe('Ana\nBell');
    expect(text).toContain('"Pitch 2, ""north"" end"');
  });
});

describe('csvText', () => {
  it('defuses a leading formula character when a name could run as a spreadsheet formula', () => {
    expect(csvText('=SUM(A1)')).toBe("'=SUM(A1)");
    expect(csvText('@home')).toBe("'@home");
    expect(csvText('+44')).toBe("'+44");
    expect(csvText('Harrowmere')).toBe('Harrowmere');
    expect(csvText(null)).toBe('');
  });
});

describe('csvNumber', () => {
  it('writes no negative zero and no cell for non-finite values when rounding', () => {
    expect(csvNumber(-0.00001, 3)).toBe('0');
    expect(csvNumber(Number.NaN, 3)).toBe('');
    expect(csvNumber(Number.POSITIVE_INFINITY, 3)).toBe('');
    expect(csvNumber(-1.25, 1)).toBe('-1.3');
  });
});

describe('flightsCsvName', () => {
  it('names the file after the local day when exported', () => {
    expect(flightsCsvName(new Date(2026, 2, 4, 23, 30))).toBe('arcwright-flights-2026-03-04.csv');
  });
});
