/**
 * Sessions: one training or match day with its conditions.
 * Every quantity is SI (temperature in kelvin); the client converts for display.
 */
import { z } from 'zod';
import { paginationQuerySchema } from './pagination';

const nullableNumber = (min: number, max: number, what: string) =>
  z
    .number({ error: `${what} must be a number.` })
    .min(min, { error: `${what} must be at least ${min}.` })
    .max(max, { error: `${what} must be at most ${max}.` })
    .nullable()
    .optional();

/**
 * The air on the day, as the engine's `airFromConditions` reads it. Each field may be unknown
 * (null); the fit then assumes standard values for it.
 */
export const airConditionsSchema = z.object({
  /** Air temperature in kelvin (K = °C + 273.15); 200–340 K covers −73 °C to 67 °C. */
  airTemperatureK: nullableNumber(200, 340, 'Air temperature (K)'),
  /** Station air pressure in pascals. Used in preference to the altitude when both are given. */
  airPressurePa: nullableNumber(50_000, 110_000, 'Air pressure (Pa)'),
  /** Altitude above sea level in metres; gives the pressure through the standard atmosphere when no pressure is given. */
  altitudeM: nullableNumber(-500, 5000, 'Altitude (m)'),
  /** Relative humidity in per cent. */
  relativeHumidityPct: nullableNumber(0, 100, 'Relative humidity (%)'),
});
export type AirConditionsInput = z.infer<typeof airConditionsSchema>;

/** Air and wind on the day. Each field may be unknown (null); the fit then uses standard air and still air. */
export const conditionsSchema = airConditionsSchema.extend({
  /** Wind speed in m/s. */
  windSpeedMps: nullableNumber(0, 40, 'Wind speed (m/s)'),
  /**
   * The direction the wind blows towards, in degrees [0, 360) relative to the direction of play:
   * 0 = tailwind (along the flight), 180 = headwind, 90 = from the left across the field.
   */
  windDirectionDeg: z
    .number({ error: 'Wind direction must be a number of degrees.' })
    .min(0, { error: 'Wind direction must be between 0 and 360 degrees.' })
    .lt(360, { error: 'Wind direction must be between 0 and 360 degrees (360 is 0).' })
    .nullable()
    .optional(),
});
export type ConditionsInput = z.infer<typeof conditionsSchema>;

/** Conditions as the API answers them: every key present, null where unknown. */
export interface Conditions {
  airTemperatureK: number | null;
  airPressurePa: number | null;
  altitudeM: number | null;
  relativeHumidityPct: number | null;
  windSpeedMps: number | null;
  windDirectionDeg: number | null;
}

export const CONDITION_KEYS = [
  'airTemperatureK',
  'airPressurePa',
  'altitudeM',
  'relativeHumidityPct',
  'windSpeedMps',
  'windDirectionDeg',
] as const satisfies readonly (keyof Conditions)[];

const isoDate = z
  .string({ error: 'Date is required (YYYY-MM-DD).' })
  .regex(/^\d{4}-\d{2}-\d{2}$/, { error: 'Date must be written YYYY-MM-DD.' })
  .refine((value) => {
    const d = new Date(`${value}T00:00:00Z`);
    return !Number.isNaN(d.getTime()) && d.toISOString().slice(0, 10) === value;
  }, { error: 'Date is not a real calendar day.' });

export const sessionInputSchema = z.object({
  date: isoDate,
  venue: z
    .string({ error: 'Venue is required.' })
    .trim()
    .min(1, { error: 'Venue is required: say where the session took place.' })
    .max(120, { error: 'Venue must be at most 120 characters.' }),
  notes: z.string().max(4000, { error: 'Notes must be at most 4000 characters.' }).nullable().optional(),
  conditions: conditionsSchema.optional(),
});
export type SessionInput = z.infer<typeof sessionInputSchema>;

export const sessionPatchSchema = sessionInputSchema.partial();
export type SessionPatch = z.infer<typeof sessionPatchSchema>;

export const sessionListQuerySchema = paginationQuerySchema.extend({
  from: isoDate.optional(),
  to: isoDate.optional(),
  venue: z.string().max(120).optional(),
});
export type SessionListQuery = z.output<typeof sessionListQuerySchema>;

export interface Session {
  id: number;
  clubId: number;
  date: string;
  venue: string;
  notes: string | null;
  conditions: Conditions;
  /** Athletes: clips and flights of their own flights only. */
  clipCount: number;
  flightCount: number;
  createdAt: string;
  updatedAt: string;
}
