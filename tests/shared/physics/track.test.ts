import { describe, expect, it } from 'vitest';
import { checkTrack, isPhysicsError } from '../../../shared/physics/index';
import { formatTrackCsv, parseFitTrackCsv } from '../../../shared/tracks/csv';

function codeOf(fn: () => unknown): string {
  try { fn(); } catch (e) { if (isPhysicsError(e)) return e.code; throw e; }
  throw new Error('expected a failure');
}

describe('parseFitTrackCsv', () => {
  it('reads samples, comments and the leading metadata', () => {
    const text = '# a punt\r\n# mass_kg: 0.43\n# diameter_m: 0.22\n# air_density_kg_m3: 1.18\n# wind_m_s: -2\n\nt,x,y,confidence\n0,0,1,0.9\n0.1, 2.5 ,2.3,0.8\n# a remark between rows\n0.2,5,3.4,0.95\n';
    const { track, meta, columns } = parseFitTrackCsv(text);
    expect(Array.from(track.t)).toEqual([0, 0.1, 0.2]);
    expect(Array.from(track.x)).toEqual([0, 2.5, 5]);
    expect(meta).toEqual({ massKg: 0.43, diameterM: 0.22, airDensityKgM3: 1.18, windAlongFlightMps: -2 });
    expect(columns.confidence).toEqual([0.9, 0.8, 0.95]);
  });

  it('accepts the columns in any order and a catalogue ball', () => {
    const { track, meta } = parseFitTrackCsv('# ball: tennis\ny,t,x\n1,0,0\n2,0.1,1\n');
    expect(Array.from(track.y)).toEqual([1, 2]);
    expect(Array.from(track.t)).toEqual([0, 0.1]);
    expect(meta.ball).toBe('tennis');
  });

  it('refuses a file without the t, x, y header', () => {
    expect(codeOf(() => parseFitTrackCsv('time,x,y\n0,0,0\n'))).toBe('CSV_NO_HEADER');
    expect(codeOf(() => parseFitTrackCsv('# only comments\n'))).toBe('CSV_NO_HEADER');
  });

  it('names the line of a row with a word in it', () => {
    try {
      parseFitTrackCsv('t,x,y\n0,0,0\n0.1,abc,1\n');
      expect.unreachable();
    } catch (e) {
      expect(isPhysicsError(e) && e.code).toBe('CSV_BAD_ROW');
      expect((e as Error).message).toMatch(/Line 3: "abc" in column x is not a number/);
    }
  });

  it('refuses a row with a missing field and a metadata value that is not a number', () => {
    expect(codeOf(() => parseFitTrackCsv('t,x,y\n0,0\n'))).toBe('CSV_BAD_ROW');
    expect(codeOf(() => parseFitTrackCsv('# mass_kg: heavy\nt,x,y\n0,0,0\n'))).toBe('CSV_BAD_ROW');
  });

  it('reads NaN as a number so that the track check can name the point', () => {
    const { track } = parseFitTrackCsv('t,x,y\n0,0,0\n0.1,NaN,1\n0.2,2,2\n0.3,3,2.5\n0.4,4,2.7\n');
    expect(codeOf(() => checkTrack(track))).toBe('NON_FINITE');
  });
});

describe('formatTrackCsv', () => {
  it('writes a file that reads back to the same samples and metadata', () => {
    const track = { t: [0, 1 / 60, 2 / 60], x: [0.1234567, 0.5, 0.9], y: [1, 1.25, 1.5] };
    const text = formatTrackCsv(track, { ball: 'football-5', temperatureC: 12 }, ['an example']);
    expect(text.startsWith('# an example\n')).toBe(true);
    const back = parseFitTrackCsv(text);
    expect(back.meta).toEqual({ ball: 'football-5', temperatureC: 12 });
    back.track.t.forEach((t, i) => expect(Math.abs(t - track.t[i])).toBeLessThan(1e-7));
    expect(back.track.x[0]).toBe(0.1234567);
  });
});
