/**
 * The numbers behind the Session report and Progress: which flights count as measured, the consistency of launch
 * speed and angle per athlete and action, and the series Progress draws over time. Pure functions on plain data so
 * that they are tested without a browser.
 */
// Relative imports (not the @ aliases): keeps this module runnable under plain Vitest like the report modules.
import type { Flight, FlightStatus } from '../../../shared/schemas/flight';

/** Fewer flights than this in a group and its spread is not worth reading. */
export const MIN_FLIGHTS_TO_JUDGE = 3;

/**
 * Statuses whose latest fit is current. A `traced` flight may still carry an older fit that its edited points no
 * longer match, and a `needs_attention` fit has a warning the coach has not resolved: neither enters the statistics.
 */
export const MEASURED_STATUSES: readonly FlightStatus[] = ['fitted', 'reviewed'];

/** A flight with a current fit: its launch and carry as the statistics read them (SI). */
export interface MeasuredFlight {
  flightId: number;
  athleteId: number;
  athleteName: string;
  action: string;
  /** Session date `YYYY-MM-DD`. */
  date: string;
  launchSpeedMps: number;
  launchAngleDeg: number;
  standardCarryM: number | null;
}

/** The flights that have a current fit, with their session's date; flights of an unknown session are left out. */
export function measuredFlights(flights: readonly Flight[], sessionDate: (sessionId: number) => string | null): MeasuredFlight[] {
  const out: MeasuredFlight[] = [];
  for (const f of flights) {
    const fit = f.latestFit;
    if (!fit || !MEASURED_STATUSES.includes(f.status)) continue;
    const speed = fit.launchSpeedMps;
    const angle = fit.launchAngleDeg;
    if (speed === null || angle === null || !Number.isFinite(speed) || !Number.isFinite(angle)) continue;
    const date = sessionDate(f.sessionId);
    if (date === null) continue;
    out.push({
      flightId: f.id,
      athleteId: f.athleteId,
      athleteName: f.athleteName,
      action: f.action,
      date,
      launchSpeedMps: speed,
      launchAngleDeg: angle,
      standardCarryM: fit.standardCarryM !== null && Number.isFinite(fit.standardCarryM) ? fit.standardCarryM : null,
    });
  }
  return out;
}

/** Arithmetic mean; null for no values. */
export function mean(values: readonly number[]): number | null {
  if (values.length === 0) return null;
  let sum = 0;
  for (const v of values) sum += v;
  return sum / values.length;
}

/**
 * Sample standard deviation s = √(Σ(xᵢ − x̄)² / (n − 1)) (Bessel's correction), computed in two passes so that
 * large values with a small spread lose no digits (NIST/SEMATECH e-Handbook of Statistical Methods, 2012,
 * §1.3.5.6 "Measures of Scale"; Chan, Golub & LeVeque, The American Statistician 37(3), 1983, on the two-pass
 * algorithm). Null when n < 2: one value has no spread to estimate.
 */
export function sampleStdDev(values: readonly number[]): number | null {
  const m = mean(values);
  if (m === null || values.length < 2) return null;
  let squares = 0;
  for (const v of values) squares += (v - m) ** 2;
  return Math.sqrt(squares / (values.length - 1));
}

/** Mean and spread of one measured quantity in a group. */
export interface Spread {
  mean: number | null;
  stdDev: number | null;
}

/** Consistency of one athlete in one action: how many flights, and the mean and spread of launch speed and angle. */
export interface ConsistencyRow {
  key: string;
  athleteId: number;
  athleteName: string;
  action: string;
  count: number;
  speed: Spread;
  angle: Spread;
  /** n < MIN_FLIGHTS_TO_JUDGE: the spread is shown but too few flights stand behind it to judge. */
  tooFew: boolean;
}

function spreadOf(values: readonly number[]): Spread {
  return { mean: mean(values), stdDev: sampleStdDev(values) };
}

/** One row per athlete and action, ordered by athlete name then action. */
export function consistencyRows(flights: readonly MeasuredFlight[]): ConsistencyRow[] {
  const groups = new Map<string, MeasuredFlight[]>();
  for (const f of flights) {
    const key = `${f.athleteId}|${f.action}`;
    const list = groups.get(key);
    if (list) list.push(f);
    else groups.set(key, [f]);
  }
  const rows: ConsistencyRow[] = [];
  for (const [key, list] of groups) {
    const first = list[0];
    rows.push({
      key,
      athleteId: first.athleteId,
      athleteName: first.athleteName,
      action: first.action,
      count: list.length,
      speed: spreadOf(list.map((f) => f.launchSpeedMps)),
      angle: spreadOf(list.map((f) => f.launchAngleDeg)),
      tooFew: list.length < MIN_FLIGHTS_TO_JUDGE,
    });
  }
  return rows.sort((a, b) => a.athleteName.localeCompare(b.athleteName) || a.action.localeCompare(b.action));
}

/** One point of the launch speed × angle scatter (SI speed, degrees). */
export interface ScatterPoint {
  flightId: number;
  speedMps: number;
  angleDeg: number;
}

export interface ScatterSeries {
  athleteId: number;
  athleteName: string;
  points: ScatterPoint[];
}

/** One scatter series per athlete, ordered by name; points in flight order. */
export function scatterSeries(flights: readonly MeasuredFlight[]): ScatterSeries[] {
  const byAthlete = new Map<number, ScatterSeries>();
  for (const f of flights) {
    let s = byAthlete.get(f.athleteId);
    if (!s) {
      s = { athleteId: f.athleteId, athleteName: f.athleteName, points: [] };
      byAthlete.set(f.athleteId, s);
    }
    s.points.push({ flightId: f.flightId, speedMps: f.launchSpeedMps, angleDeg: f.launchAngleDeg });
  }
  return [...byAthlete.values()].sort((a, b) => a.athleteName.localeCompare(b.athleteName));
}

/** What Progress draws over time. */
export type ProgressMetric = 'launchSpeed' | 'launchAngle' | 'standardCarry';

export const PROGRESS_METRICS: readonly ProgressMetric[] = ['launchSpeed', 'launchAngle', 'standardCarry'];

function valueOf(f: MeasuredFlight, metric: ProgressMetric): number | null {
  if (metric === 'launchSpeed') return f.launchSpeedMps;
  if (metric === 'launchAngle') return f.launchAngleDeg;
  return f.standardCarryM;
}

/** One point over time: the session date, the value (SI or degrees) and the flight it opens. */
export interface TimePoint {
  date: string;
  value: number;
  flightId: number;
}

export interface ActionSeries {
  action: string;
  points: TimePoint[];
}

/**
 * One line per action, ordered by action key; points by session date, then by flight id (the order they were
 * recorded in) so a day with several flights draws left to right the same way every time. Flights without the
 * metric (no standard carry) are left out of that metric's line.
 */
export function actionSeries(flights: readonly MeasuredFlight[], metric: ProgressMetric): ActionSeries[] {
  const byAction = new Map<string, TimePoint[]>();
  for (const f of flights) {
    const value = valueOf(f, metric);
    if (value === null) continue;
    const list = byAction.get(f.action) ?? [];
    list.push({ date: f.date, value, flightId: f.flightId });
    byAction.set(f.action, list);
  }
  return [...byAction]
    .map(([action, points]) => ({
      action,
      points: points.sort((a, b) => (a.date < b.date ? -1 : a.date > b.date ? 1 : a.flightId - b.flightId)),
    }))
    .sort((a, b) => a.action.localeCompare(b.action));
}

/** Per action: the best standard carry and the first and latest measured flights. */
export interface ActionSummary {
  action: string;
  count: number;
  best: TimePoint | null;
  first: MeasuredFlight;
  latest: MeasuredFlight;
}

/** The Progress summary, one entry per action (ordered by action key). */
export function progressSummary(flights: readonly MeasuredFlight[]): ActionSummary[] {
  const carry = new Map(actionSeries(flights, 'standardCarry').map((s) => [s.action, s.points]));
  const out: ActionSummary[] = [];
  for (const { action } of actionSeries(flights, 'launchSpeed')) {
    const ordered = flights
      .filter((f) => f.action === action)
      .sort((a, b) => (a.date < b.date ? -1 : a.date > b.date ? 1 : a.flightId - b.flightId));
    let best: TimePoint | null = null;
    for (const p of carry.get(action) ?? []) if (best === null || p.value > best.value) best = p;
    out.push({ action, count: ordered.length, best, first: ordered[0], latest: ordered[ordered.length - 1] });
  }
  return out;
}

/**
 * Series colours: the field teal and shades made from it, then ink and slate. Amber and red stay out: PRODUCT.md
 * keeps them for cautions. Beyond the list colours repeat; the charts also change the symbol so series stay apart.
 */
export const SERIES_PALETTE: readonly string[] = ['#0F766E', '#1F2933', '#64748B', '#14B8A6', '#134E4A', '#94A3B8', '#2DD4BF', '#475569'];

/** Point symbols, cycled with the colours so that two series never look alike in grey print. */
export const SERIES_SYMBOLS: readonly string[] = ['circle', 'rect', 'triangle', 'diamond', 'roundRect', 'pin'];

export function seriesColour(index: number): string {
  return SERIES_PALETTE[((index % SERIES_PALETTE.length) + SERIES_PALETTE.length) % SERIES_PALETTE.length];
}

export function seriesSymbol(index: number): string {
  return SERIES_SYMBOLS[((index % SERIES_SYMBOLS.length) + SERIES_SYMBOLS.length) % SERIES_SYMBOLS.length];
}
