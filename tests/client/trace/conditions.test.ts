import { describe, expect, it } from 'vitest';
import type { Conditions } from '../../../shared/schemas/session';
import {
  conditionsSummary,
  conditionsToForm,
  formToConditions,
  fromIsoDate,
  rangeMessage,
  siRange,
  toIsoDate,
  windWords,
} from '../../../src/components/sessions/conditions';

const coolEvening: Conditions = {
  airTemperatureK: 283.15,
  airPressurePa: 101_325,
  altitudeM: null,
  relativeHumidityPct: 70,
  windSpeedMps: 3,
  windDirectionDeg: 180,
};

describe('session conditions in display units', () => {
  it('shows kelvin as °C and pascals as hPa when the club is metric', () => {
    const form = conditionsToForm(coolEvening, 'metric');
    expect(form.temperature).toBeCloseTo(10, 9);
    expect(form.pressure).toBeCloseTo(1013.25, 9);
    expect(form.humidity).toBe(70);
    expect(form.altitude).toBeNull();
  });

  it('gives back the stored SI values when a form is opened and saved unchanged in either unit system', () => {
    for (const system of ['metric', 'imperial'] as const) {
      const back = formToConditions(conditionsToForm(coolEvening, system), system);
      expect(back.airTemperatureK).toBeCloseTo(283.15, 2);
      expect(back.airPressurePa).toBeCloseTo(101_325, 1);
      expect(back.windSpeedMps).toBeCloseTo(3, 2);
      expect(back.windDirectionDeg).toBe(180);
      expect(back.altitudeM).toBeNull();
    }
  });

  it('converts °F typed by an imperial club into kelvin when saving', () => {
    const form = conditionsToForm({ ...coolEvening, airTemperatureK: null }, 'imperial');
    form.temperature = 50;
    expect(formToConditions(form, 'imperial').airTemperatureK).toBeCloseTo(283.15, 9);
  });

  it('words the shared schema range in the units the coach typed in when a value is out of range', () => {
    expect(siRange('airTemperatureK')).toEqual({ min: 200, max: 340 });
    expect(rangeMessage('airTemperatureK', 'metric')).toBe('Air temperature must be between -73.1 °C and 66.9 °C.');
    expect(rangeMessage('airTemperatureK', 'imperial')).toBe('Air temperature must be between -99.7 °F and 152.3 °F.');
    expect(rangeMessage('relativeHumidityPct', 'metric')).toBe('Relative humidity must be between 0 and 100%.');
  });
});

describe('windWords and conditionsSummary', () => {
  it('names the wind relative to the direction of play', () => {
    expect(windWords(0)).toBe('tailwind');
    expect(windWords(180)).toBe('headwind');
    expect(windWords(90)).toBe('across from the left');
    expect(windWords(270)).toBe('across from the right');
    expect(windWords(-10)).toBe('tailwind');
  });

  it('summarises the known conditions on one line and says "—" when none is known', () => {
    expect(conditionsSummary(coolEvening, 'metric')).toBe('10.0 °C · 1013 hPa · 70 % RH · wind 3.0 m/s headwind');
    const none = { airTemperatureK: null, airPressurePa: null, altitudeM: null, relativeHumidityPct: null, windSpeedMps: null, windDirectionDeg: null };
    expect(conditionsSummary(none, 'metric')).toBe('—');
    expect(conditionsSummary({ ...none, altitudeM: 1600 }, 'imperial')).toBe('5249 ft up');
  });
});

describe('toIsoDate and fromIsoDate', () => {
  it('keeps the picked calendar day whatever the time of day when converting', () => {
    const d = new Date(2026, 2, 14, 23, 30);
    expect(toIsoDate(d)).toBe('2026-03-14');
    expect(toIsoDate(fromIsoDate('2026-03-14') as Date)).toBe('2026-03-14');
    expect(fromIsoDate('14/03/2026')).toBeNull();
  });
});
