/**
 * CSV export of the Flights list (what the filters show). Values are SI, the unit in each column's name, so that
 * a sheet built on the export does not depend on the club's display units.
 *
 * Columns, in order:
 * - `flight_id`         the flight's id
 * - `session_date`      YYYY-MM-DD
 * - `venue`             the session's venue
 * - `athlete`           the athlete's display name
 * - `action`            the action's label (e.g. Punt)
 * - `ball`              the ball's catalogue name (or the club's own id)
 * - `status`            uploaded, traced, fitted, reviewed or needs attention
 * - `launch_speed_mps`  launch speed of the latest fit, m/s
 * - `launch_angle_deg`  launch angle above the horizontal, degrees
 * - `carry_m`           carry to the ground in the session's air, m
 * - `standard_carry_m`  the same launch in still ISO standard sea-level air, m
 * - `cd`                fitted drag coefficient
 * - `cd_error`          its standard error
 * - `model`             the fit's model (vacuum, linear, drag, drag-lift)
 * - `fitted_at`         when the latest fit was made, ISO 8601
 * Empty cells mean unknown (no fit yet, or a model without that parameter).
 * Format: RFC 4180 (comma separated, fields with a comma, quote or line break in double quotes, quotes doubled),
 * CRLF line ends, `.` decimals.
 */

export interface FlightCsvRow {
  id: number;
  sessionDate: string | null;
  venue: string | null;
  athleteName: string;
  actionLabel: string;
  ballName: string;
  statusLabel: string;
  launchSpeedMps: number | null;
  launchAngleDeg: number | null;
  carryM: number | null;
  standardCarryM: number | null;
  cd: number | null;
  cdError: number | null;
  model: string | null;
  fittedAt: string | null;
}

export const FLIGHT_CSV_COLUMNS = [
  'flight_id', 'session_date', 'venue', 'athlete', 'action', 'ball', 'status', 'launch_speed_mps', 'launch_angle_deg',
  'carry_m', 'standard_carry_m', 'cd', 'cd_error', 'model', 'fitted_at',
] as const;

/** A text cell: quoted when needed (RFC 4180); a leading =, +, - or @ is defused so a spreadsheet does not run it as a formula. */
export function csvText(value: string | null | undefined): string {
  if (value === null || value === undefined) return '';
  const safe = /^[=+\-@\t\r]/.test(value) ? `'${value}` : value;
  return /[",\r\n]/.test(safe) ? `"${safe.replace(/"/g, '""')}"` : safe;
}

/** A number cell rounded to `digits` decimals without trailing zeros; empty when unknown. */
export function csvNumber(value: number | null | undefined, digits: number): string {
  if (value === null || value === undefined || !Number.isFinite(value)) return '';
  // Adding 0 folds a rounded negative zero ("-0") away.
  return String(Number(value.toFixed(digits)) + 0);
}

export function flightsCsv(rows: readonly FlightCsvRow[]): string {
  const lines = [FLIGHT_CSV_COLUMNS.join(',')];
  for (const r of rows) {
    lines.push([
      String(r.id),
      csvText(r.sessionDate),
      csvText(r.venue),
      csvText(r.athleteName),
      csvText(r.actionLabel),
      csvText(r.ballName),
      csvText(r.statusLabel),
      csvNumber(r.launchSpeedMps, 3),
      csvNumber(r.launchAngleDeg, 2),
      csvNumber(r.carryM, 3),
      csvNumber(r.standardCarryM, 3),
      csvNumber(r.cd, 4),
      csvNumber(r.cdError, 4),
      csvText(r.model),
      csvText(r.fittedAt),
    ].join(','));
  }
  return `${lines.join('\r\n')}\r\n`;
}

/** File name of an export, e.g. `arcwright-flights-2026-03-14.csv` (the local day of the download). */
export function flightsCsvName(now: Date): string {
  const m = String(now.getMonth() + 1).padStart(2, '0');
  const d = String(now.getDate()).padStart(2, '0');
  return `arcwright-flights-${now.getFullYear()}-${m}-${d}.csv`;
}
