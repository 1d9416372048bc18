import { describe, expect, it } from 'vitest';
import { ageBandOf, cautionLine } from '../../../shared/workload/cautions';

describe('ageBandOf', () => {
  it('puts an athlete in the band of the age reached this calendar year', () => {
    expect(ageBandOf(2016, 2026)).toBe('u11');
    expect(ageBandOf(2015, 2026)).toBe('11-12');
    expect(ageBandOf(2012, 2026)).toBe('13-14');
    expect(ageBandOf(2008, 2026)).toBe('17-18');
  });

  it('gives no band to an adult or to an athlete without a birth year', () => {
    expect(ageBandOf(2007, 2026)).toBeNull();
    expect(ageBandOf(null, 2026)).toBeNull();
  });
});

describe('cautionLine', () => {
  it('names the action, the count, today or this week, and the club threshold', () => {
    expect(cautionLine({ athleteId: 1, action: 'punt', period: 'day', when: '2026-03-04', count: 36, limit: 30 }, 'Punt')).toBe('Punt: 36 today (club threshold 30 a day)');
    expect(cautionLine({ athleteId: 1, action: 'punt', period: 'week', when: '2026-W10', count: 95, limit: 90 }, 'Punt')).toBe('Punt: 95 this week (club threshold 90 a week)');
  });
});
