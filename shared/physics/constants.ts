/** Physical constants used across the engine (SI). */

/** Standard acceleration of gravity g₀ (m/s²): 3rd CGPM (1901); ISO 80000-3. */
export const STANDARD_GRAVITY = 9.80665;

/** ISO 2533:1975 / ICAO standard atmosphere, sea level and troposphere. */
export const ISA = {
  /** Sea-level temperature T₀ (K). */
  temperatureK: 288.15,
  /** Sea-level pressure p₀ (Pa). */
  pressurePa: 101325,
  /** Sea-level density ρ₀ (kg/m³), the value of the tables. */
  densityKgM3: 1.225,
  /** Temperature lapse rate L in the troposphere (K/m). */
  lapseRateKPerM: 0.0065,
  /** Molar mass of dry air used by the standard, M (kg/mol). */
  molarMassKgPerMol: 0.0289644,
  /** Universal gas constant of the standard, R* (J/(mol·K)). */
  gasConstant: 8.31432,
  /** Earth radius for geopotential altitude, r (m). */
  earthRadiusM: 6356766,
  /** Top of the troposphere (geopotential m); the formulas here hold below it. */
  tropopauseM: 11000,
} as const;

/** Sutherland's law for air (Sutherland 1893; constants as in the ISA tables). */
export const SUTHERLAND = {
  /** Reference viscosity μ₀ (Pa·s) at T₀. */
  mu0PaS: 1.716e-5,
  /** Reference temperature T₀ (K). */
  t0K: 273.15,
  /** Sutherland constant S (K). */
  sK: 110.4,
} as const;

/** Kelvin offset of the Celsius scale. */
export const CELSIUS_ZERO_K = 273.15;
