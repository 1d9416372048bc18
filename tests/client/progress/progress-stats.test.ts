import { describe, expect, it } from 'vitest';
import type { FitSummary, Flight, FlightStatus } from '../../../shared/schemas/flight';
import {
  MIN_FLIGHTS_TO_JUDGE,
  SERIES_PALETTE,
  actionSeries,
  consistencyRows,
  mean,
  measuredFlights,
  progressSummary,
  sampleStdDev,
  scatterSeries,
  seriesColour,
  type MeasuredFlight,
} from '../../../src/components/progress/progress-stats';

function measured(over: Partial<MeasuredFlight> & { flightId: number }): MeasuredFlight {
  return {
    athleteId: 1,
    athleteName: 'Isla Brackwater',
    action: 'punt',
    date: '2026-03-14',
    launchSpeedMps: 25,
    launchAngleDeg: 45,
    standardCarryM: 50,
    ...over,
  };
}

function flight(id: number, status: FlightStatus, fit: Partial<FitSummary> | null, sessionId = 1): Flight {
  const latestFit: FitSummary | null = fit && {
    id: id * 10,
    model: 'drag',
    status: 'fitted',
    createdAt: '2026-03-14T18:00:00.000Z',
    launchSpeedMps: 24,
    launchAngleDeg: 50,
    carryM: 48,
    cd: 0.25,
    cdError: 0.02,
    standardCarryM: 49,
    release: null,
    warnings: [],
    ...fit,
  };
  return {
    id,
    clubId: 1,
    sessionId,
    clipId: 1,
    athleteId: 7,
    athleteName: 'Isla Brackwater',
    action: 'punt',
    ballId: 'rugby',
    frameStart: 0,
    frameEnd: 100,
    releaseFrame: null,
    releaseHeightM: null,
    status,
    attentionReason: null,
    notes: null,
    pointCount: 40,
    latestFit,
    job: null,
    createdAt: '2026-03-14T17:00:00.000Z',
    updatedAt: '2026-03-14T17:00:00.000Z',
  } as Flight;
}

describe('mean', () => {
  it('returns the arithmetic mean when given values', () => {
    expect(mean([2, 4, 9])).toBeCloseTo(5, 12);
  });

  it('returns null when given no values', () => {
    expect(mean([])).toBeNull();
  });
});

describe('sampleStdDev', () => {
  it('divides by n − 1 when computing the spread of a sample', () => {
    // Σ(x − 5)² = 9 + 1 + 1 + 1 + 0 + 0 + 4 + 16 = 32 over 8 values: s = √(32 / 7).
    expect(sampleStdDev([2, 4, 4, 4, 5, 5, 7, 9])).toBeCloseTo(Math.sqrt(32 / 7), 12);
  });

  it('is zero when every value is the same', () => {
    expect(sampleStdDev([27.3, 27.3, 27.3])).toBe(0);
  });

  it('returns null when there is only one value', () => {
    expect(sampleStdDev([31])).toBeNull();
    expect(sampleStdDev([])).toBeNull();
  });

  it('keeps its digits when the values are large and their spread small', () => {
    // A one-pass Σx² − n·x̄² loses every digit here; the two-pass sum keeps them (Chan, Golub & LeVeque 1983).
    const base = 1e9;
    expect(sampleStdDev([base + 4, base + 7, base + 13, base + 16])).toBeCloseTo(Math.sqrt(90 / 3), 6);
  });
});

describe('consistencyRows', () => {
  it('groups by athlete and action and flags groups under three flights when some are small', () => {
    const rows = consistencyRows([
      measured({ flightId: 1, launchSpeedMps: 24, launchAngleDeg: 40 }),
      measured({ flightId: 2, launchSpeedMps: 26, launchAngleDeg: 44 }),
      measured({ flightId: 3, launchSpeedMps: 28, launchAngleDeg: 48 }),
      measured({ flightId: 4, action: 'drop_kick', launchSpeedMps: 20, launchAngleDeg: 30 }),
      measured({ flightId: 5, athleteId: 2, athleteName: 'Corin Ashdown', launchSpeedMps: 22, launchAngleDeg: 35 }),
      measured({ flightId: 6, athleteId: 2, athleteName: 'Corin Ashdown', launchSpeedMps: 23, launchAngleDeg: 37 }),
    ]);
    expect(rows.map((r) => [r.athleteName, r.action, r.count, r.tooFew])).toEqual([
      ['Corin Ashdown', 'punt', 2, true],
      ['Isla Brackwater', 'drop_kick', 1, true],
      ['Isla Brackwater', 'punt', 3, false],
    ]);
    const punts = rows[2];
    expect(punts.speed.mean).toBeCloseTo(26, 12);
    expect(punts.speed.stdDev).toBeCloseTo(2, 12);
    expect(punts.angle.mean).toBeCloseTo(44, 12);
    expect(punts.angle.stdDev).toBeCloseTo(4, 12);
    // One flight: a mean but no spread.
    expect(rows[1].speed).toEqual({ mean: 20, stdDev: null });
    expect(rows[0].speed.stdDev).toBeCloseTo(Math.SQRT1_2, 12);
  });

  it('judges a group of exactly three flights when the threshold is three', () => {
    expect(MIN_FLIGHTS_TO_JUDGE).toBe(3);
    const rows = consistencyRows([1, 2, 3].map((id) => measured({ flightId: id })));
    expect(rows).toHaveLength(1);
    expect(rows[0].tooFew).toBe(false);
  });
});

describe('measuredFlights', () => {
  it('keeps only fitted and reviewed flights with a fit and a known session when the list is mixed', () => {
    const list = [
      flight(1, 'fitted', {}),
      flight(2, 'reviewed', { launchSpeedMps: 30 }),
      flight(3, 'traced', {}),
      flight(4, 'needs_attention', {}),
      flight(5, 'uploaded', null),
      flight(6, 'fitted', {}, 99),
      flight(7, 'fitted', { launchSpeedMps: null }),
    ];
    const out = measuredFlights(list, (id) => (id === 1 ? '2026-03-14' : null));
    expect(out.map((f) => f.flightId)).toEqual([1, 2]);
    expect(out[1]).toMatchObject({ launchSpeedMps: 30, launchAngleDeg: 50, standardCarryM: 49, date: '2026-03-14', athleteId: 7 });
  });
});

describe('scatterSeries', () => {
  it('makes one series per athlete ordered by name when several athletes threw', () => {
    const s = scatterSeries([
      measured({ flightId: 1 }),
      measured({ flightId: 2, athleteId: 2, athleteName: 'Corin Ashdown', launchSpeedMps: 21, launchAngleDeg: 33 }),
      measured({ flightId: 3 }),
    ]);
    expect(s.map((x) => x.athleteName)).toEqual(['Corin Ashdown', 'Isla Brackwater']);
    expect(s[0].points).toEqual([{ flightId: 2, speedMps: 21, angleDeg: 33 }]);
    expect(s[1].points.map((p) => p.flightId)).toEqual([1, 3]);
  });
});

describe('actionSeries', () => {
  const flights = [
    measured({ flightId: 9, date: '2026-04-02', launchSpeedMps: 27 }),
    measured({ flightId: 4, date: '2026-03-14', launchSpeedMps: 25 }),
    measured({ flightId: 3, date: '2026-04-02', launchSpeedMps: 26 }),
    measured({ flightId: 5, action: 'drop_kick', date: '2026-03-14', launchSpeedMps: 19, standardCarryM: null }),
  ];

  it('makes one line per action with points ordered by date then flight when flights come unordered', () => {
    const s = actionSeries(flights, 'launchSpeed');
    expect(s.map((x) => x.action)).toEqual(['drop_kick', 'punt']);
    expect(s[1].points).toEqual([
      { date: '2026-03-14', value: 25, flightId: 4 },
      { date: '2026-04-02', value: 26, flightId: 3 },
      { date: '2026-04-02', value: 27, flightId: 9 },
    ]);
  });

  it('leaves out flights without a standard carry when drawing standard carry', () => {
    const s = actionSeries(flights, 'standardCarry');
    expect(s.map((x) => x.action)).toEqual(['punt']);
    expect(s[0].points).toHaveLength(3);
  });
});

describe('progressSummary', () => {
  it('finds the best standard carry and the first and latest flights per action when given several sessions', () => {
    const summary = progressSummary([
      measured({ flightId: 7, date: '2026-04-02', standardCarryM: 52 }),
      measured({ flightId: 2, date: '2026-03-14', standardCarryM: 47 }),
      measured({ flightId: 5, date: '2026-03-20', standardCarryM: 55 }),
      measured({ flightId: 8, action: 'drop_kick', date: '2026-03-20', standardCarryM: null }),
    ]);
    expect(summary.map((s) => s.action)).toEqual(['drop_kick', 'punt']);
    const punt = summary[1];
    expect(punt.count).toBe(3);
    expect(punt.best).toEqual({ date: '2026-03-20', value: 55, flightId: 5 });
    expect(punt.first.flightId).toBe(2);
    expect(punt.latest.flightId).toBe(7);
    expect(summary[0].best).toBeNull();
  });
});

describe('seriesColour', () => {
  it('starts with the field teal and never uses the caution colours when cycling', () => {
    expect(seriesColour(0)).toBe('#0F766E');
    const used = Array.from({ length: 20 }, (_, i) => seriesColour(i).toUpperCase());
    expect(used).not.toContain('#D97706');
    expect(used).not.toContain('#B91C1C');
    expect(seriesColour(SERIES_PALETTE.length)).toBe(seriesColour(0));
  });
});
