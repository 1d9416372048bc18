import { describe, expect, it } from 'vitest';
import { flightsCsvName } from '../../../src/components/report/flights-csv';

describe('flightsCsvName', () => {
  it('names the file after the local day when exported', () => {
    expect(flightsCsvName(new Date(2026, 2, 4, 23, 30))).toBe('arcwright-flights-2026-03-04.csv');
  });
});
