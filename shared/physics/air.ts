/**
 * Air: density from weather, the standard atmosphere, viscosity, Reynolds number and drag regime.
 *
 * Density of humid air: the CIPM-2007 equation, Picard, Davis, Gläser & Fujii, "Revised formula
 * for the density of moist air (CIPM-2007)", Metrologia 45 (2008) 149–155. Pressure and
 * temperature from altitude: ISO 2533:1975 standard atmosphere (troposphere). Viscosity:
 * Sutherland (1893).
 */
import { CELSIUS_ZERO_K, ISA, STANDARD_GRAVITY, SUTHERLAND } from './constants';
import { PhysicsError } from './errors';

/** The air a flight happens in. */
export interface Air {
  /** Density ρ (kg/m³). */
  densityKgM3: number;
  /** Dynamic viscosity μ (Pa·s). */
  viscosityPaS: number;
  /** Temperature T (K), when known. */
  temperatureK?: number;
  /** Pressure p (Pa), when known. */
  pressurePa?: number;
  /** Relative humidity (0–100 %), when known. */
  relativeHumidityPct?: number;
  /** How the values were obtained, for reports ("CIPM-2007 from 18 °C, 101 000 Pa, 60 %", …). */
  source: string;
}

/**
 * Weather at the field, with the names and units of a session's stored conditions; every field may
 * be missing (undefined or null).
 */
export interface Conditions {
  /** Air temperature T (K), 233.15…333.15 (−40…60 °C). */
  airTemperatureK?: number | null;
  /** Station pressure p (Pa), 30 000…110 000 (not the sea-level-reduced pressure of weather reports). */
  airPressurePa?: number | null;
  /** Relative humidity h (%), 0…100. */
  relativeHumidityPct?: number | null;
  /** Altitude of the field above sea level (m), −500…10 000; gives p (and T) from the standard atmosphere when they are missing. */
  altitudeM?: number | null;
  /** Mole fraction of CO₂ (mol/mol); default 0.0004 as in CIPM-2007. */
  co2MoleFraction?: number | null;
}

/** Lowest and highest air temperature (K) the density and viscosity formulas here are used for: −40…60 °C. */
export const AIR_TEMPERATURE_RANGE_K: readonly [number, number] = [233.15, 333.15];

/**
 * Geopotential altitude H (m) of a geometric altitude z (m): H = r z / (r + z), r the ISA Earth radius.
 * Source: ISO 2533:1975.
 */
export function geopotentialAltitude(altitudeM: number): number {
  return (ISA.earthRadiusM * altitudeM) / (ISA.earthRadiusM + altitudeM);
}

/**
 * Standard atmosphere (ISO 2533:1975) at a geometric altitude in the troposphere.
 * @param altitudeM z (m), −500…11 000.
 * @returns temperature T (K), pressure p (Pa) and density ρ (kg/m³) with
 *   T = T₀ − L·H, p = p₀ (T/T₀)^(g₀M/(R*L)), ρ = pM/(R*T).
 */
export function standardAtmosphere(altitudeM: number): { temperatureK: number; pressurePa: number; densityKgM3: number } {
  if (!Number.isFinite(altitudeM) || altitudeM < -500 || altitudeM > ISA.tropopauseM) {
    throw new PhysicsError('BAD_AIR', `Altitude ${altitudeM} m is outside −500…11 000 m, where the standard atmosphere formulas here hold.`);
  }
  const h = geopotentialAltitude(altitudeM);
  const temperatureK = ISA.temperatureK - ISA.lapseRateKPerM * h;
  const exponent = (STANDARD_GRAVITY * ISA.molarMassKgPerMol) / (ISA.gasConstant * ISA.lapseRateKPerM);
  const pressurePa = ISA.pressurePa * Math.pow(temperatureK / ISA.temperatureK, exponent);
  const densityKgM3 = (pressurePa * ISA.molarMassKgPerMol) / (ISA.gasConstant * temperatureK);
  return { temperatureK, pressurePa, densityKgM3 };
}

/**
 * Dynamic viscosity of air by Sutherland's law, μ = μ₀ (T/T₀)^{3/2} (T₀ + S)/(T + S).
 * @param temperatureK T (K), 150…400.
 * @returns μ (Pa·s); 1.789e-5 at 288.15 K. Source: Sutherland, Phil. Mag. 36 (1893) 507; ISA tables.
 */
export function sutherlandViscosity(temperatureK: number): number {
  const { mu0PaS, t0K, sK } = SUTHERLAND;
  return mu0PaS * Math.pow(temperatureK / t0K, 1.5) * ((t0K + sK) / (temperatureK + sK));
}

// CIPM-2007 constants (Picard et al. 2008, section 2 and Appendix A).
const CIPM = {
  R: 8.314472, // J/(mol·K), the CODATA 2006 value adopted by CIPM-2007
  MV: 18.01528e-3, // kg/mol, water
  A: 1.2378847e-5, B: -1.9121316e-2, C: 33.93711047, D: -6.3431645e3, // saturation vapour pressure
  ALPHA: 1.00062, BETA: 3.14e-8, GAMMA: 5.6e-7, // enhancement factor
  a0: 1.58123e-6, a1: -2.9331e-8, a2: 1.1043e-10, b0: 5.707e-6, b1: -2.051e-8,
  c0: 1.9898e-4, c1: -2.376e-6, d: 1.83e-11, e: -0.765e-8, // compressibility factor
} as const;

/**
 * Saturation vapour pressure of water over a plane liquid surface (CIPM-2007, eq. A1.1).
 * @param temperatureK T (K). @returns p_sv (Pa).
 */
export function saturationVapourPressure(temperatureK: number): number {
  const T = temperatureK;
  return Math.exp(CIPM.A * T * T + CIPM.B * T + CIPM.C + CIPM.D / T);
}

/**
 * Density of humid air by the CIPM-2007 equation:
 * ρ = (p M_a / (Z R T)) [1 − x_v (1 − M_v/M_a)], with x_v = h f p_sv / p, the enhancement factor f,
 * the compressibility Z and M_a = [28.96546 + 12.011 (x_CO2 − 0.0004)]·10⁻³ kg/mol.
 * @param temperatureK T (K), 233…333 (the equation's stated range is 15–27 °C for full accuracy; outside it the error grows slowly and stays far below what a flight fit can see).
 * @param pressurePa p (Pa), 30 000…110 000.
 * @param relativeHumidityPct h (%), 0…100.
 * @param co2MoleFraction x_CO2 (mol/mol), default 0.0004.
 * @returns ρ (kg/m³). Source: Picard, Davis, Gläser & Fujii, Metrologia 45 (2008) 149.
 */
export function humidAirDensity(temperatureK: number, pressurePa: number, relativeHumidityPct: number, co2MoleFraction = 0.0004): number {
  const T = temperatureK;
  const t = T - CELSIUS_ZERO_K;
  const p = pressurePa;
  const h = relativeHumidityPct / 100;
  const ma = (28.96546 + 12.011 * (co2MoleFraction - 0.0004)) * 1e-3;
  const f = CIPM.ALPHA + CIPM.BETA * p + CIPM.GAMMA * t * t;
  const xv = (h * f * saturationVapourPressure(T)) / p;
  const z = 1
    - (p / T) * (CIPM.a0 + CIPM.a1 * t + CIPM.a2 * t * t + (CIPM.b0 + CIPM.b1 * t) * xv + (CIPM.c0 + CIPM.c1 * t) * xv * xv)
    + ((p * p) / (T * T)) * (CIPM.d + CIPM.e * xv * xv);
  return ((p * ma) / (z * CIPM.R * T)) * (1 - xv * (1 - CIPM.MV / ma));
}

function checkRange(name: string, value: number | null | undefined, lo: number, hi: number, unit: string): void {
  if (value === undefined || value === null) return;
  if (!Number.isFinite(value) || value < lo || value > hi) {
    throw new PhysicsError('BAD_AIR', `${name} ${value} ${unit} is outside ${lo}…${hi} ${unit}: check the value and its unit.`, { field: name });
  }
}

/**
 * Air from the weather at the field.
 *
 * Missing values are filled in this order: pressure from the altitude through the standard
 * atmosphere (or 101 325 Pa without an altitude); temperature from the standard atmosphere at the
 * altitude (15 °C at sea level); humidity 0 %. Density by CIPM-2007 ({@link humidAirDensity}),
 * viscosity by Sutherland ({@link sutherlandViscosity}).
 * @param conditions the weather (K, Pa, %, m); see {@link Conditions} for ranges.
 * @returns the air with ρ (kg/m³) and μ (Pa·s), and a `source` line (in °C, for people) that says what was assumed.
 */
export function airFromConditions(conditions: Conditions = {}): Air {
  const [tLo, tHi] = AIR_TEMPERATURE_RANGE_K;
  checkRange('Temperature', conditions.airTemperatureK, tLo, tHi, 'K');
  checkRange('Pressure', conditions.airPressurePa, 30000, 110000, 'Pa');
  checkRange('Relative humidity', conditions.relativeHumidityPct, 0, 100, '%');
  checkRange('Altitude', conditions.altitudeM, -500, 10000, 'm');
  checkRange('CO2 mole fraction', conditions.co2MoleFraction, 0, 0.01, 'mol/mol');
  const assumed: string[] = [];
  const altitudeM = conditions.altitudeM ?? undefined;
  const std = standardAtmosphere(altitudeM ?? 0);
  let pressurePa = conditions.airPressurePa ?? undefined;
  if (pressurePa === undefined) {
    pressurePa = std.pressurePa;
    assumed.push(altitudeM === undefined ? 'pressure 101 325 Pa' : `standard pressure at ${altitudeM} m`);
  }
  let temperatureK = conditions.airTemperatureK ?? undefined;
  if (temperatureK === undefined) {
    temperatureK = std.temperatureK;
    assumed.push(`standard temperature ${(std.temperatureK - CELSIUS_ZERO_K).toFixed(1)} °C`);
  }
  const relativeHumidityPct = conditions.relativeHumidityPct ?? 0;
  if (conditions.relativeHumidityPct === undefined || conditions.relativeHumidityPct === null) assumed.push('dry air');
  const densityKgM3 = humidAirDensity(temperatureK, pressurePa, relativeHumidityPct, conditions.co2MoleFraction ?? undefined);
  const what = `CIPM-2007 from ${(temperatureK - CELSIUS_ZERO_K).toFixed(1)} °C, ${Math.round(pressurePa)} Pa, ${relativeHumidityPct} % RH`;
  return {
    densityKgM3,
    viscosityPaS: sutherlandViscosity(temperatureK),
    temperatureK,
    pressurePa,
    relativeHumidityPct,
    source: assumed.length > 0 ? `${what} (assumed: ${assumed.join(', ')})` : what,
  };
}

/**
 * Still, dry standard sea-level air of ISO 2533:1975: ρ = 1.225 kg/m³, 15 °C, 101 325 Pa,
 * μ = 1.789e-5 Pa·s. The reference for "standard carry".
 */
export function standardAir(): Air {
  return {
    densityKgM3: ISA.densityKgM3,
    viscosityPaS: sutherlandViscosity(ISA.temperatureK),
    temperatureK: ISA.temperatureK,
    pressurePa: ISA.pressurePa,
    relativeHumidityPct: 0,
    source: 'ISO 2533 standard sea-level air',
  };
}

/**
 * Air with a known density only (for example measured, or given in a track file); the viscosity
 * is taken at `temperatureK` (default 288.15 K, 15 °C), which moves the Reynolds number by a few per cent at most.
 * @param densityKgM3 ρ (kg/m³), 0.3…1.6.
 * @param temperatureK T (K), 233.15…333.15.
 */
export function airFromDensity(densityKgM3: number, temperatureK: number = ISA.temperatureK): Air {
  const [tLo, tHi] = AIR_TEMPERATURE_RANGE_K;
  checkRange('Air density', densityKgM3, 0.3, 1.6, 'kg/m³');
  checkRange('Temperature', temperatureK, tLo, tHi, 'K');
  return {
    densityKgM3,
    viscosityPaS: sutherlandViscosity(temperatureK),
    temperatureK,
    source: `given density ${densityKgM3} kg/m³ (viscosity at ${Number((temperatureK - CELSIUS_ZERO_K).toFixed(2))} °C)`,
  };
}

/**
 * Reynolds number of a ball, Re = ρ V D / μ.
 * @param speedMps V (m/s), air-relative. @param diameterM D (m). @param air ρ and μ.
 */
export function reynoldsNumber(speedMps: number, diameterM: number, air: Air): number {
  return (air.densityKgM3 * Math.abs(speedMps) * diameterM) / air.viscosityPaS;
}

/** Flow regime around a sphere, by Reynolds number. */
export type DragRegime = 'creeping' | 'intermediate' | 'subcritical' | 'critical' | 'supercritical';

/** Reynolds band of the drag crisis of a smooth sphere (Achenbach, J. Fluid Mech. 54 (1972) 565). */
export const SMOOTH_SPHERE_CRISIS_RE: readonly [number, number] = [2e5, 5e5];

/**
 * The drag regime a Reynolds number implies, and whether it is near the drag crisis.
 *
 * Re < 1: creeping (Stokes 1851: F = 3πμDv, drag linear in speed); up to 10³: intermediate;
 * then subcritical (C_d ≈ 0.47 for a smooth sphere, Hoerner 1965) up to the crisis band, where
 * C_d falls sharply (Achenbach 1972), and supercritical above it. Rough and seamed balls reach the
 * crisis earlier, so a ball may give its own band.
 * @param reynolds Re (dimensionless, ≥ 0).
 * @param crisisBand [Re_low, Re_high] of the drag crisis; default that of a smooth sphere.
 */
export function dragRegime(reynolds: number, crisisBand: readonly [number, number] = SMOOTH_SPHERE_CRISIS_RE): {
  regime: DragRegime;
  nearDragCrisis: boolean;
} {
  const [lo, hi] = crisisBand;
  let regime: DragRegime;
  if (reynolds < 1) regime = 'creeping';
  else if (reynolds < 1e3) regime = 'intermediate';
  else if (reynolds < lo) regime = 'subcritical';
  else if (reynolds <= hi) regime = 'critical';
  else regime = 'supercritical';
  // "Near" means within a factor 1.25 of the band, where a flight's speed range commonly straddles it.
  const nearDragCrisis = reynolds >= lo / 1.25 && reynolds <= hi * 1.25;
  return { regime, nearDragCrisis };
}
