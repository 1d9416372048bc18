/**
 * Display units: the one place that converts SI values (as stored and computed everywhere) into the display system
 * a member sees (their own choice or the club's) and back. Nothing outside this module multiplies by a unit factor.
 *
 * Factors are exact by definition unless noted: the international foot (0.3048 m), inch (0.0254 m), pound
 * (0.45359237 kg) and ounce (0.028349523125 kg) from the International Yard and Pound Agreement (1959);
 * mile per hour = 0.44704 m/s follows from them. Inch of mercury (conventional, 0 °C) = 3386.389 Pa and the
 * temperature scales: NIST Special Publication 811 (2008), Guide for the Use of the SI, appendix B.
 */

export type UnitSystem = 'metric' | 'imperial';

/**
 * What a number measures. SI units as stored: length/shortLength/fineLength/altitude m, speed m/s, mass/shortMass kg,
 * temperature K, pressure Pa, density kg/m³. `fineLength` is for sizes on the picture (a ball's diameter, the
 * calibration's scale per pixel): millimetres or inches.
 */
export type Quantity =
  | 'length' | 'shortLength' | 'fineLength' | 'altitude' | 'speed' | 'mass' | 'shortMass' | 'temperature' | 'pressure' | 'density';

export interface DisplayUnit {
  /** Symbol shown after the number, e.g. `m/s`. */
  symbol: string;
  /** Decimal places shown by default. */
  digits: number;
  /** SI value → display value. */
  fromSi: (si: number) => number;
  /** Display value → SI value. */
  toSi: (shown: number) => number;
}

const METRE_PER_FOOT = 0.3048;
const METRE_PER_INCH = 0.0254;
const KG_PER_POUND = 0.45359237;
const KG_PER_OUNCE = 0.028349523125;
const MPS_PER_MPH = 0.44704;
const PA_PER_INHG = 3386.389;
const PA_PER_HPA = 100;
const KELVIN_AT_0_CELSIUS = 273.15;
/** kg/m³ per lb/ft³: 0.45359237 kg / (0.3048 m)³, exact by the definitions above. */
const KG_M3_PER_LB_FT3 = KG_PER_POUND / METRE_PER_FOOT ** 3;

function linear(symbol: string, siPerUnit: number, digits: number): DisplayUnit {
  return { symbol, digits, fromSi: (si) => si / siPerUnit, toSi: (shown) => shown * siPerUnit };
}

const UNITS: Record<UnitSystem, Record<Quantity, DisplayUnit>> = {
  metric: {
    length: linear('m', 1, 1),
    shortLength: linear('cm', 0.01, 1),
    fineLength: linear('mm', 1e-3, 0),
    altitude: linear('m', 1, 0),
    speed: linear('m/s', 1, 1),
    mass: linear('kg', 1, 2),
    shortMass: linear('g', 1e-3, 0),
    temperature: {
      symbol: '°C',
      digits: 1,
      fromSi: (k) => k - KELVIN_AT_0_CELSIUS,
      toSi: (c) => c + KELVIN_AT_0_CELSIUS,
    },
    pressure: linear('hPa', PA_PER_HPA, 0),
    density: linear('kg/m³', 1, 3),
  },
  imperial: {
    length: linear('ft', METRE_PER_FOOT, 1),
    shortLength: linear('in', METRE_PER_INCH, 2),
    fineLength: linear('in', METRE_PER_INCH, 2),
    altitude: linear('ft', METRE_PER_FOOT, 0),
    speed: linear('mph', MPS_PER_MPH, 1),
    mass: linear('lb', KG_PER_POUND, 2),
    shortMass: linear('oz', KG_PER_OUNCE, 2),
    temperature: {
      symbol: '°F',
      digits: 1,
      fromSi: (k) => ((k - KELVIN_AT_0_CELSIUS) * 9) / 5 + 32,
      toSi: (f) => ((f - 32) * 5) / 9 + KELVIN_AT_0_CELSIUS,
    },
    pressure: linear('inHg', PA_PER_INHG, 2),
    density: linear('lb/ft³', KG_M3_PER_LB_FT3, 4),
  },
};

/** The display unit of a quantity in a unit system. */
export function displayUnit(quantity: Quantity, system: UnitSystem): DisplayUnit {
  return UNITS[system][quantity];
}

/** SI value → the number shown in `system` (not rounded). */
export function fromSi(si: number, quantity: Quantity, system: UnitSystem): number {
  return UNITS[system][quantity].fromSi(si);
}

/** A number typed in `system` → its SI value, for storing. */
export function toSi(shown: number, quantity: Quantity, system: UnitSystem): number {
  return UNITS[system][quantity].toSi(shown);
}

export interface FormatOptions {
  /** Decimal places; defaults to the unit's own. */
  digits?: number;
  /** Text for a missing value. */
  missing?: string;
  /** Leave the unit symbol off. */
  bare?: boolean;
}

/** An SI value as display text, e.g. `formatQuantity(27.3, 'speed', 'imperial')` → `"61.1 mph"`. */
export function formatQuantity(si: number | null | undefined, quantity: Quantity, system: UnitSystem, options: FormatOptions = {}): string {
  if (si === null || si === undefined || !Number.isFinite(si)) return options.missing ?? '—';
  const unit = UNITS[system][quantity];
  const digits = options.digits ?? unit.digits;
  // Note: toFixed keeps "-0.0" for tiny negatives; adding 0 folds negative zero away.
  const text = (Number(unit.fromSi(si).toFixed(digits)) + 0).toFixed(digits);
  return options.bare ? text : `${text} ${unit.symbol}`;
}

/** A member's own choice of display units: a system, or `club` to follow the club's setting. */
export const UNITS_PREFERENCES = ['club', 'metric', 'imperial'] as const;
export type UnitsPreference = (typeof UNITS_PREFERENCES)[number];

/** The units a member sees: their own choice, or the club's when they follow the club (or nothing is known). */
export function effectiveUnits(preference: UnitsPreference | null | undefined, clubUnits: UnitSystem | null | undefined): UnitSystem {
  if (preference === 'metric' || preference === 'imperial') return preference;
  return clubUnits === 'imperial' ? 'imperial' : 'metric';
}

/** Suffix of an export column's name for each quantity, e.g. `carry` + length + imperial → `carry_ft`. */
const COLUMN_SUFFIX: Record<UnitSystem, Record<Quantity, string>> = {
  metric: { length: 'm', shortLength: 'cm', fineLength: 'mm', altitude: 'm', speed: 'mps', mass: 'kg', shortMass: 'g', temperature: 'c', pressure: 'hpa', density: 'kg_m3' },
  imperial: { length: 'ft', shortLength: 'in', fineLength: 'in', altitude: 'ft', speed: 'mph', mass: 'lb', shortMass: 'oz', temperature: 'f', pressure: 'inhg', density: 'lb_ft3' },
};

/** The name of an export column holding a quantity, with its unit: `unitColumn('carry', 'length', 'imperial')` → `carry_ft`. */
export function unitColumn(base: string, quantity: Quantity, system: UnitSystem): string {
  return `${base}_${COLUMN_SUFFIX[system][quantity]}`;
}


/** A picture's scale (metres per pixel) as the length one pixel covers: `1.875 mm` or `0.0738 in`. */
export function formatPixelScale(metresPerPixel: number | null | undefined, system: UnitSystem): string {
  return formatQuantity(metresPerPixel, 'fineLength', system, { digits: system === 'imperial' ? 4 : 3 });
}
