import { describe, expect, it } from 'vitest';
import { displayUnit, effectiveUnits, formatPixelScale, formatQuantity, fromSi, toSi, unitColumn, type Quantity, type UnitSystem } from '../../src/utils/units';

// Exact factors: International Yard and Pound Agreement (1959); inHg and temperature scales: NIST SP 811 (2008), appendix B.

describe('units', () => {
  it('converts metres to feet with the exact international foot when imperial', () => {
    expect(fromSi(0.3048, 'length', 'imperial')).toBeCloseTo(1, 12);
    expect(fromSi(100, 'length', 'imperial')).toBeCloseTo(328.0839895, 6);
  });

  it('converts m/s to mph with 0.44704 m/s per mph when imperial', () => {
    expect(fromSi(0.44704, 'speed', 'imperial')).toBeCloseTo(1, 12);
    expect(fromSi(26.8224, 'speed', 'imperial')).toBeCloseTo(60, 9);
  });

  it('converts kilograms to pounds and ounces with the exact avoirdupois pound when imperial', () => {
    expect(fromSi(0.45359237, 'mass', 'imperial')).toBeCloseTo(1, 12);
    expect(fromSi(7.26, 'mass', 'imperial')).toBeCloseTo(16.0055, 3);
    expect(fromSi(0.45359237, 'shortMass', 'imperial')).toBeCloseTo(16, 10);
  });

  it('shows kelvin as Celsius when metric and Fahrenheit when imperial', () => {
    expect(fromSi(273.15, 'temperature', 'metric')).toBeCloseTo(0, 12);
    expect(fromSi(373.15, 'temperature', 'imperial')).toBeCloseTo(212, 10);
    expect(fromSi(233.15, 'temperature', 'imperial')).toBeCloseTo(-40, 10);
  });

  it('shows standard sea-level pressure as 1013 hPa when metric and 29.92 inHg when imperial', () => {
    // ISO 2533:1975 standard atmosphere: 101 325 Pa at sea level.
    expect(fromSi(101325, 'pressure', 'metric')).toBeCloseTo(1013.25, 10);
    expect(fromSi(101325, 'pressure', 'imperial')).toBeCloseTo(29.921, 3);
  });

  it('gives back the SI value when a displayed value is converted back, for every quantity and system', () => {
    const quantities: Quantity[] = ['length', 'shortLength', 'altitude', 'speed', 'mass', 'shortMass', 'temperature', 'pressure'];
    const systems: UnitSystem[] = ['metric', 'imperial'];
    for (const quantity of quantities) {
      for (const system of systems) {
        for (const si of [0, 1e-3, 0.4, 17.25, 288.15, 101325]) {
          expect(toSi(fromSi(si, quantity, system), quantity, system)).toBeCloseTo(si, 9);
        }
      }
    }
  });

  it('leaves SI values unchanged when metric units are SI units', () => {
    expect(fromSi(42.5, 'length', 'metric')).toBe(42.5);
    expect(fromSi(24.5, 'speed', 'metric')).toBe(24.5);
    expect(fromSi(0.43, 'mass', 'metric')).toBe(0.43);
  });

  it('formats with the unit symbol and its default digits when no options are given', () => {
    expect(formatQuantity(42, 'length', 'metric')).toBe('42.0 m');
    expect(formatQuantity(42, 'length', 'imperial')).toBe('137.8 ft');
    expect(formatQuantity(26.8224, 'speed', 'imperial')).toBe('60.0 mph');
    expect(formatQuantity(291.15, 'temperature', 'metric')).toBe('18.0 °C');
    expect(formatQuantity(0.43, 'shortMass', 'metric')).toBe('430 g');
  });

  it('formats with given digits and without the symbol when asked', () => {
    expect(formatQuantity(42, 'length', 'imperial', { digits: 3, bare: true })).toBe('137.795');
  });

  it('shows a dash when the value is missing or not finite', () => {
    expect(formatQuantity(null, 'speed', 'metric')).toBe('—');
    expect(formatQuantity(undefined, 'speed', 'metric')).toBe('—');
    expect(formatQuantity(Number.NaN, 'speed', 'metric', { missing: 'unknown' })).toBe('unknown');
  });

  it('never shows a negative zero when a tiny negative value rounds to zero', () => {
    expect(formatQuantity(-1e-6, 'length', 'metric', { digits: 1 })).toBe('0.0 m');
  });

  it('names the display unit of a quantity when asked', () => {
    expect(displayUnit('speed', 'metric').symbol).toBe('m/s');
    expect(displayUnit('temperature', 'imperial').symbol).toBe('°F');
    expect(displayUnit('pressure', 'metric').symbol).toBe('hPa');
  });

  it('stores a typed imperial value in SI when a form converts it back', () => {
    expect(toSi(100, 'length', 'imperial')).toBeCloseTo(30.48, 12);
    expect(toSi(60, 'speed', 'imperial')).toBeCloseTo(26.8224, 12);
    expect(toSi(32, 'temperature', 'imperial')).toBeCloseTo(273.15, 12);
    expect(toSi(1000, 'altitude', 'imperial')).toBeCloseTo(304.8, 12);
    expect(toSi(16, 'shortMass', 'imperial')).toBeCloseTo(0.45359237, 12);
  });
});

describe('effectiveUnits', () => {
  it('takes the member’s own choice over the club’s when they made one', () => {
    expect(effectiveUnits('imperial', 'metric')).toBe('imperial');
    expect(effectiveUnits('metric', 'imperial')).toBe('metric');
  });

  it('follows the club when the member chose club or nothing is known', () => {
    expect(effectiveUnits('club', 'imperial')).toBe('imperial');
    expect(effectiveUnits('club', 'metric')).toBe('metric');
    expect(effectiveUnits(null, 'imperial')).toBe('imperial');
    expect(effectiveUnits(undefined, null)).toBe('metric');
  });
});

describe('unitColumn', () => {
  it('names the unit of an export column in each system', () => {
    expect(unitColumn('carry', 'length', 'metric')).toBe('carry_m');
    expect(unitColumn('carry', 'length', 'imperial')).toBe('carry_ft');
    expect(unitColumn('launch_speed', 'speed', 'metric')).toBe('launch_speed_mps');
    expect(unitColumn('launch_speed', 'speed', 'imperial')).toBe('launch_speed_mph');
    expect(unitColumn('air_temperature', 'temperature', 'imperial')).toBe('air_temperature_f');
    expect(unitColumn('mass', 'shortMass', 'imperial')).toBe('mass_oz');
  });
});

describe('formatPixelScale', () => {
  it('shows the length one pixel covers in mm when metric and in inches when imperial', () => {
    expect(formatPixelScale(0.001875, 'metric')).toBe('1.875 mm');
    // 0.0254 m per inch (International Yard and Pound Agreement, 1959).
    expect(formatPixelScale(0.00254, 'imperial')).toBe('0.1000 in');
    expect(formatPixelScale(null, 'imperial')).toBe('—');
  });
});
