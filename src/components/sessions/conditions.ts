/**
 * Session conditions between the API (SI: K, Pa, m, m/s) and the form and tables (the club's display units).
 * All unit factors come from src/utils/units.ts; this module only decides which quantity each field is.
 */
// Relative imports (not the @ aliases): the client unit tests run this module under plain Vitest.
import { conditionsSchema, type Conditions } from '../../../shared/schemas/session';
import { displayUnit, formatQuantity, fromSi, toSi, type Quantity, type UnitSystem } from '../../utils/units';

export type ConditionKey = keyof Conditions;

/** The form's numbers, in display units (°C or °F, hPa or inHg, m or ft, m/s or mph; % and degrees as is). */
export interface ConditionsForm {
  temperature: number | null;
  pressure: number | null;
  altitude: number | null;
  humidity: number | null;
  windSpeed: number | null;
  windDirection: number | null;
}

interface FieldSpec {
  form: keyof ConditionsForm;
  label: string;
  /** Display conversion, or null for numbers shown as stored (per cent, degrees). */
  quantity: Quantity | null;
  plainUnit?: string;
}

export const CONDITION_FIELDS: Record<ConditionKey, FieldSpec> = {
  airTemperatureK: { form: 'temperature', label: 'Air temperature', quantity: 'temperature' },
  airPressurePa: { form: 'pressure', label: 'Air pressure', quantity: 'pressure' },
  altitudeM: { form: 'altitude', label: 'Altitude', quantity: 'altitude' },
  relativeHumidityPct: { form: 'humidity', label: 'Relative humidity', quantity: null, plainUnit: '%' },
  windSpeedMps: { form: 'windSpeed', label: 'Wind speed', quantity: 'speed' },
  windDirectionDeg: { form: 'windDirection', label: 'Wind direction', quantity: null, plainUnit: '°' },
};

export function unitSymbol(key: ConditionKey, system: UnitSystem): string {
  const spec = CONDITION_FIELDS[key];
  return spec.quantity ? displayUnit(spec.quantity, system).symbol : (spec.plainUnit ?? '');
}

export function emptyConditionsForm(): ConditionsForm {
  return { temperature: null, pressure: null, altitude: null, humidity: null, windSpeed: null, windDirection: null };
}

function roundTo(v: number, digits: number): number {
  const f = 10 ** digits;
  return Math.round(v * f) / f;
}

export function conditionsToForm(c: Conditions, system: UnitSystem): ConditionsForm {
  const form = emptyConditionsForm();
  for (const key of Object.keys(CONDITION_FIELDS) as ConditionKey[]) {
    const spec = CONDITION_FIELDS[key];
    const si = c[key];
    if (si === null || si === undefined) continue;
    // Three more decimals than the unit shows: enough that opening and saving a session does not move its stored
    // values, few enough to drop the float noise of the conversion (9.999999999 °C).
    form[spec.form] = spec.quantity ? roundTo(fromSi(si, spec.quantity, system), displayUnit(spec.quantity, system).digits + 3) : si;
  }
  return form;
}

export function formToConditions(form: ConditionsForm, system: UnitSystem): Conditions {
  const out = {} as Conditions;
  for (const key of Object.keys(CONDITION_FIELDS) as ConditionKey[]) {
    const spec = CONDITION_FIELDS[key];
    const shown = form[spec.form];
    out[key] = shown === null || !Number.isFinite(shown) ? null : spec.quantity ? toSi(shown, spec.quantity, system) : shown;
  }
  return out;
}

/** The allowed range of a condition in SI, read from the shared schema so that the form and server agree. */
export function siRange(key: ConditionKey): { min: number; max: number } {
  const num = conditionsSchema.shape[key].unwrap().unwrap();
  return { min: num.minValue ?? -Infinity, max: num.maxValue ?? Infinity };
}

/**
 * The schema's message for a condition says its range in SI (kelvin, pascals); the form shows it in the units the
 * coach typed in, e.g. "Air temperature must be between −73.1 °C and 66.9 °C."
 */
export function rangeMessage(key: ConditionKey, system: UnitSystem): string {
  const spec = CONDITION_FIELDS[key];
  const { min, max } = siRange(key);
  if (key === 'windDirectionDeg') return 'Wind direction must be from 0° up to (not including) 360°.';
  if (!spec.quantity) return `${spec.label} must be between ${min} and ${max} ${spec.plainUnit ?? ''}.`.replace(' %', '%');
  const lo = formatQuantity(min, spec.quantity, system);
  const hi = formatQuantity(max, spec.quantity, system);
  return `${spec.label} must be between ${lo} and ${hi}.`;
}

/** Wind direction in words: where the wind blows relative to the direction of play. */
export function windWords(deg: number | null): string {
  if (deg === null) return '';
  const d = ((deg % 360) + 360) % 360;
  if (d < 22.5 || d >= 337.5) return 'tailwind';
  if (d >= 157.5 && d < 202.5) return 'headwind';
  if (d >= 67.5 && d < 112.5) return 'across from the left';
  if (d >= 247.5 && d < 292.5) return 'across from the right';
  if (d < 90) return 'tail, from the left';
  if (d < 180) return 'head, from the left';
  if (d < 270) return 'head, from the right';
  return 'tail, from the right';
}

/** One line for tables: "14.0 °C · 1013 hPa · 62 % · wind 3.0 m/s tailwind"; "—" when nothing is known. */
export function conditionsSummary(c: Conditions, system: UnitSystem): string {
  const parts: string[] = [];
  if (c.airTemperatureK !== null) parts.push(formatQuantity(c.airTemperatureK, 'temperature', system));
  if (c.airPressurePa !== null) parts.push(formatQuantity(c.airPressurePa, 'pressure', system));
  else if (c.altitudeM !== null) parts.push(`${formatQuantity(c.altitudeM, 'altitude', system)} up`);
  if (c.relativeHumidityPct !== null) parts.push(`${Math.round(c.relativeHumidityPct)} % RH`);
  if (c.windSpeedMps !== null) {
    const words = c.windSpeedMps > 0 ? windWords(c.windDirectionDeg) : '';
    parts.push(`wind ${formatQuantity(c.windSpeedMps, 'speed', system)}${words ? ` ${words}` : ''}`);
  }
  return parts.length ? parts.join(' · ') : '—';
}

/** A Date picked in the browser's local time → `YYYY-MM-DD` (the day the coach picked, not its UTC day). */
export function toIsoDate(d: Date): string {
  const m = String(d.getMonth() + 1).padStart(2, '0');
  const day = String(d.getDate()).padStart(2, '0');
  return `${d.getFullYear()}-${m}-${day}`;
}

/** `YYYY-MM-DD` → a local Date at midnight, for the date picker. */
export function fromIsoDate(s: string): Date | null {
  const m = /^(\d{4})-(\d{2})-(\d{2})$/.exec(s);
  if (!m) return null;
  return new Date(Number(m[1]), Number(m[2]) - 1, Number(m[3]));
}

/** "Sat 14 Mar 2026" for a `YYYY-MM-DD` date, in the browser's language. */
export function formatDate(s: string): string {
  const d = fromIsoDate(s);
  if (!d) return s;
  return d.toLocaleDateString(undefined, { weekday: 'short', day: 'numeric', month: 'short', year: 'numeric' });
}
