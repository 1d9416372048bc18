import { describe, expect, it } from 'vitest';
import {
  airFromConditions, airFromDensity, dragRegime, humidAirDensity, isPhysicsError, reynoldsNumber, standardAir,
  standardAtmosphere, sutherlandViscosity,
} from '../../../shared/physics/index';

describe('standardAtmosphere', () => {
  it('gives the sea-level standard values when the altitude is 0', () => {
    // ISO 2533:1975 / ICAO: 288.15 K, 101 325 Pa, 1.2250 kg/m³.
    const s = standardAtmosphere(0);
    expect(s.temperatureK).toBe(288.15);
    expect(s.pressurePa).toBeCloseTo(101325, 6);
    expect(s.densityKgM3).toBeCloseTo(1.225, 4);
  });

  it('matches the ISO 2533 table at 1 000 m and 2 000 m', () => {
    // ISO 2533:1975 tables: 89 875 Pa, 1.1116 kg/m³ at 1 000 m; 79 495 Pa, 1.0065 kg/m³ at 2 000 m.
    // Tolerance 10 Pa: the function takes geometric altitude, the tables are by geopotential altitude (0.3 m apart at 2 km).
    const a = standardAtmosphere(1000), b = standardAtmosphere(2000);
    expect(Math.abs(a.pressurePa - 89875)).toBeLessThan(10);
    expect(a.densityKgM3).toBeCloseTo(1.1116, 3);
    expect(Math.abs(b.pressurePa - 79495)).toBeLessThan(10);
    expect(b.densityKgM3).toBeCloseTo(1.0065, 3);
  });

  it('refuses an altitude above the troposphere with BAD_AIR', () => {
    expect(() => standardAtmosphere(12000)).toThrowError(/outside/);
    try { standardAtmosphere(12000); } catch (e) { expect(isPhysicsError(e) && e.code).toBe('BAD_AIR'); }
  });
});

describe('humidAirDensity', () => {
  it('gives the dry-air density at 20 °C and 101 325 Pa', () => {
    // Published: 1.2041 kg/m³ as an ideal-gas mixture (CIPM-2007 tables, Picard et al., Metrologia 45 (2008) 149);
    // CIPM-2007 adds the compressibility Z ≈ 0.9996, so 0.05 % is the honest tolerance.
    expect(Math.abs(humidAirDensity(293.15, 101325, 0) / 1.2041 - 1)).toBeLessThan(5e-4);
  });

  it('gives about 1.1993 kg/m³ at 20 °C, 101 325 Pa and 50 % humidity', () => {
    // From memory: the worked example of the CIPM-2007 paper (Picard et al. 2008), ±0.0002 kg/m³.
    expect(humidAirDensity(293.15, 101325, 50)).toBeCloseTo(1.1993, 3);
  });

  it('falls as humidity rises at equal pressure and temperature', () => {
    // Published: water vapour is lighter than dry air (CIPM-2007).
    const dry = humidAirDensity(303.15, 100000, 0), wet = humidAirDensity(303.15, 100000, 90);
    expect(wet).toBeLessThan(dry);
    expect(dry - wet).toBeGreaterThan(0.01);
  });
});

describe('sutherlandViscosity', () => {
  it('gives 1.789e-5 Pa·s at 15 °C', () => {
    // Sutherland (1893) with the ISA constants; ISA tables list 1.7894e-5 Pa·s at sea level.
    expect(sutherlandViscosity(288.15)).toBeCloseTo(1.7894e-5, 8);
  });
});

describe('airFromConditions', () => {
  it('fills pressure and temperature from the standard atmosphere when only the altitude is known', () => {
    const a = airFromConditions({ altitudeM: 1000 });
    // ISO 2533: 1.1116 kg/m³ at 1 000 m, dry; CIPM-2007 differs from the ISA ideal gas by < 0.1 %.
    expect(a.densityKgM3).toBeCloseTo(1.1116, 2);
    expect(a.source).toMatch(/standard pressure at 1000 m/);
  });

  it('gives thinner air on a warm upland day than on a cool sea-level evening', () => {
    // Common practice: density falls with altitude and temperature.
    const upland = airFromConditions({ airTemperatureK: 300.15, altitudeM: 1600, relativeHumidityPct: 30 });
    const coast = airFromConditions({ airTemperatureK: 283.15, airPressurePa: 101500, relativeHumidityPct: 80 });
    expect(upland.densityKgM3).toBeLessThan(coast.densityKgM3 * 0.82);
  });

  it('refuses a humidity above 100 % with a message naming the field', () => {
    expect(() => airFromConditions({ relativeHumidityPct: 140 })).toThrowError(/Relative humidity 140 % is outside 0…100/);
  });

  it('refuses a pressure given in hectopascals', () => {
    expect(() => airFromConditions({ airPressurePa: 1013 })).toThrowError(/Pressure 1013 Pa is outside/);
  });
});

describe('airFromDensity', () => {
  it('keeps the given density and takes the viscosity at 15 °C', () => {
    const a = airFromDensity(1.18);
    expect(a.densityKgM3).toBe(1.18);
    expect(a.viscosityPaS).toBeCloseTo(1.7894e-5, 8);
  });
});

describe('reynoldsNumber and dragRegime', () => {
  it('places a kicked football near its drag crisis and a slow tennis ball below it', () => {
    // Re = ρVD/μ; drag crisis of balls near 1e5–4e5 (Achenbach, J. Fluid Mech. 54 (1972) 565; Asai et al. 2007).
    const air = standardAir();
    const re = reynoldsNumber(25, 0.22, air);
    expect(re).toBeCloseTo((1.225 * 25 * 0.22) / 1.7894e-5, -2);
    expect(dragRegime(re, [1.5e5, 3.5e5]).nearDragCrisis).toBe(true);
    expect(dragRegime(reynoldsNumber(5, 0.067, air)).regime).toBe('subcritical');
  });

  it('calls Re < 1 creeping flow, where drag is linear in speed', () => {
    // Stokes (1851): F = 3πμDv for Re ≪ 1.
    expect(dragRegime(0.2).regime).toBe('creeping');
    expect(dragRegime(500).regime).toBe('intermediate');
    expect(dragRegime(1e6).regime).toBe('supercritical');
  });
});
