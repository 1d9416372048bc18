/**
 * Workload: counts of throws and kicks per athlete per day and ISO week, from the flights recorded and
 * from counts a coach enters for reps that were not filmed; and the club's caution thresholds.
 */
import { z } from 'zod';
import { AGE_BAND_KEYS, type AgeBand, type WorkloadCaution } from '../workload/cautions';

const day = z
  .string({ error: 'Enter the day as YYYY-MM-DD.' })
  .regex(/^\d{4}-\d{2}-\d{2}$/, { error: 'Write the day as YYYY-MM-DD, such as 2026-03-02.' })
  .refine((value) => {
    const d = new Date(`${value}T00:00:00Z`);
    return !Number.isNaN(d.getTime()) && d.toISOString().slice(0, 10) === value;
  }, { error: 'That day is not on the calendar; check the month and the day.' });

const actionKey = z
  .string({ error: 'Pick an action.' })
  .trim()
  .min(1, { error: 'Pick an action.' })
  .max(40, { error: 'Pick an action from the club’s list.' });

/** A count a coach enters for reps that were not filmed. `day` defaults to today in the club's time zone. */
export const workloadEntryInputSchema = z
  .object({
    athleteId: z.number({ error: 'Pick the athlete.' }).int({ error: 'Pick the athlete.' }).positive({ error: 'Pick the athlete.' }),
    action: actionKey,
    day: day.optional(),
    count: z
      .number({ error: 'Enter how many reps, as a whole number.' })
      .int({ error: 'Enter how many reps, as a whole number.' })
      .min(1, { error: 'Enter at least 1 rep.' })
      .max(500, { error: 'Enter at most 500 reps in one entry; add a second entry for more.' }),
    note: z.string({ error: 'Write the note as text.' }).trim().max(200, { error: 'Keep the note to 200 characters or fewer.' }).nullable().optional(),
  })
  .strict();
export type WorkloadEntryInput = z.infer<typeof workloadEntryInputSchema>;

const limit = (what: string) =>
  z
    .number({ error: `Enter the ${what} threshold as a whole number, or leave it empty.` })
    .int({ error: `Enter the ${what} threshold as a whole number, or leave it empty.` })
    .min(1, { error: `A ${what} threshold must be at least 1.` })
    .max(2000, { error: `A ${what} threshold must be at most 2000.` })
    .nullable();

export const workloadThresholdSchema = z
  .object({
    action: actionKey,
    ageBand: z.enum(AGE_BAND_KEYS, { error: `Pick an age band (${AGE_BAND_KEYS.join(', ')}).` }),
    dailyMax: limit('daily'),
    weeklyMax: limit('weekly'),
  })
  .strict()
  .refine((t) => t.dailyMax !== null || t.weeklyMax !== null, { error: 'Give a daily or a weekly threshold (or both), or remove the row.' });
export type WorkloadThresholdInput = z.infer<typeof workloadThresholdSchema>;

/** The club's whole threshold table, replaced at once. */
export const workloadThresholdsBodySchema = z
  .object({
    thresholds: z
      .array(workloadThresholdSchema, { error: 'Send the thresholds as a list.' })
      .max(200, { error: 'Keep to 200 threshold rows or fewer.' })
      .refine((rows) => new Set(rows.map((r) => `${r.action}|${r.ageBand}`)).size === rows.length, {
        error: 'Each action and age band may appear once; merge the duplicate rows.',
      }),
  })
  .strict();
export type WorkloadThresholdsBody = z.infer<typeof workloadThresholdsBodySchema>;

export const workloadQuerySchema = z.object({
  weeks: z.coerce
    .number({ error: 'weeks must be a whole number from 1 to 26.' })
    .int({ error: 'weeks must be a whole number from 1 to 26.' })
    .min(1, { error: 'weeks must be a whole number from 1 to 26.' })
    .max(26, { error: 'weeks must be a whole number from 1 to 26.' })
    .default(6),
});

// Response shapes.

export interface WorkloadThreshold {
  action: string;
  ageBand: AgeBand;
  dailyMax: number | null;
  weeklyMax: number | null;
}

export interface WorkloadEntry {
  id: number;
  athleteId: number;
  action: string;
  day: string;
  count: number;
  note: string | null;
  createdAt: string;
}

/** Counts of one day or week by action: filmed flights plus entered reps. */
export interface WorkloadCount {
  /** `YYYY-MM-DD` for a day, `YYYY-Www` for a week. */
  key: string;
  byAction: Record<string, { flights: number; entered: number; total: number }>;
  total: number;
}

export interface AthleteWorkload {
  athleteId: number;
  timeZone: string;
  /** Today and this ISO week in the club's time zone. */
  today: string;
  week: string;
  /** The youth age band this year, or null for an adult or unknown birth year (no cautions then). */
  ageBand: AgeBand | null;
  days: WorkloadCount[];
  weeks: WorkloadCount[];
  /** The club's thresholds for this athlete's age band. */
  thresholds: WorkloadThreshold[];
  /** Thresholds gone over today or this week (youths only). */
  cautions: WorkloadCaution[];
  entries: WorkloadEntry[];
}

/** A youth over a threshold today or this week. */
export interface AthleteCaution {
  athleteId: number;
  athleteName: string;
  cautions: WorkloadCaution[];
}
