import { describe, expect, it } from 'vitest';
import { airFromConditions, airFromDensity, standardAir } from '../../../shared/physics';
import { airWords } from '../../../src/components/report/air-words';

describe('airWords', () => {
  it('says the air in °F and inHg when imperial and in °C and hPa when metric', () => {
    const air = airFromConditions({ airTemperatureK: 282.15, airPressurePa: 101325, relativeHumidityPct: 60 });
    expect(airWords(air, 'imperial')).toBe('CIPM-2007 from 48.2 °F, 29.92 inHg, 60 % RH');
    expect(airWords(air, 'metric')).toBe('CIPM-2007 from 9.0 °C, 1013 hPa, 60 % RH');
  });

  it('says that values were assumed when the session left some out', () => {
    expect(airWords(airFromConditions({ airTemperatureK: 282.15 }), 'imperial')).toMatch(/^CIPM-2007 from 48\.2 °F, 29\.92 inHg, 0 % RH, some values assumed$/);
  });

  it('names standard air and a given density as they are', () => {
    expect(airWords(standardAir(), 'imperial')).toBe('ISO 2533 standard sea-level air');
    expect(airWords(airFromDensity(1.2), 'imperial')).toBe('given density (viscosity at 59.0 °F)');
  });
});
