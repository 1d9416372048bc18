/**
 * Options of a flight fit as a request body (fit jobs, the planner's conditions), validated the same
 * way by the client's forms and the server, and turned into the engine's `FitOptions`.
 * Units as stored and as in the engine: SI, temperature in kelvin, humidity in %; the air's
 * conditions are the session's (`airConditionsSchema`).
 */
import { z } from 'zod';
import { airFromConditions, airFromDensity, BALLS, type FitOptions } from '../physics/index';
import { airConditionsSchema } from './session';

export const FIT_MODEL_CHOICES = ['auto', 'vacuum', 'linear', 'drag', 'drag-lift'] as const;
export const FIT_LOSSES = ['soft-l1', 'linear', 'cauchy', 'huber'] as const;

const finite = (what: string, lo: number, hi: number, unit: string) =>
  z.number({ error: `${what} must be a number (${unit}).` })
    .refine(Number.isFinite, { error: `${what} must be a finite number.` })
    .refine((v) => v >= lo && v <= hi, { error: `${what} must lie within ${lo}…${hi} ${unit}.` });

export const flightFitOptionsSchema = z.object({
  model: z.enum(FIT_MODEL_CHOICES, { error: `Model must be one of ${FIT_MODEL_CHOICES.join(', ')}.` }).default('auto'),
  /** A catalogue ball id, or mass and diameter below. */
  ballId: z.string().trim().refine((id) => id in BALLS, { error: 'Unknown ball: pick one from the catalogue or give mass and diameter.' }).optional(),
  massKg: finite('Ball mass', 1e-4, 20, 'kg').optional(),
  diameterM: finite('Ball diameter', 1e-3, 1, 'm').optional(),
  airDensityKgM3: finite('Air density', 0.3, 1.6, 'kg/m³').optional(),
  /** The air on the day (see `airFromConditions`). */
  conditions: airConditionsSchema.optional(),
  /** Wind along the flight, + = tailwind. */
  windAlongFlightMps: finite('Wind', -60, 60, 'm/s').default(0),
  loss: z.enum(FIT_LOSSES).default('soft-l1'),
  allowDescending: z.boolean().default(false),
})
  .refine((o) => (o.massKg === undefined) === (o.diameterM === undefined), { error: 'Give the ball\'s mass and diameter together.', path: ['diameterM'] })
  .refine((o) => !(o.ballId && o.massKg !== undefined), { error: 'Give either a catalogue ball or its mass and diameter, not both.', path: ['ballId'] })
  .refine((o) => !(o.airDensityKgM3 !== undefined && o.conditions), { error: 'Give either the air density or the weather, not both.', path: ['airDensityKgM3'] });
export type FlightFitOptionsInput = z.infer<typeof flightFitOptionsSchema>;

/** The engine's options from a validated request (air from the density or the weather when given). */
export function toFitOptions(input: FlightFitOptionsInput): FitOptions {
  const ball = input.ballId ?? (input.massKg !== undefined && input.diameterM !== undefined ? { massKg: input.massKg, diameterM: input.diameterM } : undefined);
  const air = input.airDensityKgM3 !== undefined ? airFromDensity(input.airDensityKgM3) : input.conditions ? airFromConditions(input.conditions) : undefined;
  return { model: input.model, ball, air, windSpeed: input.windAlongFlightMps, loss: input.loss, allowDescending: input.allowDescending };
}
