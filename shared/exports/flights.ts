/**
 * CSV export of flights (the Flights list, a session's flights), written the same by the server's export endpoints
 * and the Flights screen. Measured columns carry their unit in the name, in the units the member sees
 * (`carry_m` or `carry_ft`); angles are degrees, the drag coefficient has no unit.
 *
 * Columns, in order (metric name / imperial name):
 * - `flight_id`                                 the flight's id
 * - `session_date`                              YYYY-MM-DD
 * - `venue`                                     the session's venue
 * - `athlete`                                   the athlete's display name
 * - `action`                                    the action's label (e.g. Punt)
 * - `ball`                                      the ball's catalogue name (or the club's own id)
 * - `status`                                    uploaded, traced, fitted, reviewed or needs attention
 * - `launch_speed_mps` / `launch_speed_mph`     launch speed of the latest fit
 * - `launch_angle_deg`                          launch angle above the horizontal, degrees
 * - `carry_m` / `carry_ft`                      carry to the ground in the session's air
 * - `standard_carry_m` / `standard_carry_ft`    the same launch in still ISO standard sea-level air
 * - `cd`                                        fitted drag coefficient
 * - `cd_error`                                  its standard error
 * - `model`                                     the fit's model (vacuum, linear, drag, drag-lift)
 * - `fitted_at`                                 when the latest fit was made, ISO 8601
 * Empty cells mean unknown (no fit yet, or a model without that parameter).
 */
import { BALLS } from '../physics/balls';
import { FLIGHT_STATUS_LABELS, type Flight } from '../schemas/flight';
import { fromSi, unitColumn, type UnitSystem } from '../units';
import { csvDocument, roundCell, type CsvCell } from './csv';

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

/** Where a flight was flown and what its action is called, looked up by the caller. */
export interface FlightRowContext {
  session: { date: string; venue: string } | null;
  actionLabel: string;
  /** The ball's name when the caller knows it (a club's own ball); else the catalogue's, else the id. */
  ballName?: string;
}

/** An action's label for a key the club's list does not hold (an archived or unknown action): the key in words. */
export function actionKeyWords(key: string): string {
  return key.replace(/_/g, ' ');
}

/** A flight as an export row: its session, labels as the screens show them, and the latest fit's figures. */
export function flightCsvRow(flight: Flight, context: FlightRowContext): FlightCsvRow {
  const fit = flight.latestFit;
  return {
    id: flight.id,
    sessionDate: context.session?.date ?? null,
    venue: context.session?.venue ?? null,
    athleteName: flight.athleteName,
    actionLabel: context.actionLabel,
    ballName: context.ballName ?? BALLS[flight.ballId]?.name ?? flight.ballId,
    statusLabel: FLIGHT_STATUS_LABELS[flight.status],
    launchSpeedMps: fit?.launchSpeedMps ?? null,
    launchAngleDeg: fit?.launchAngleDeg ?? null,
    carryM: fit?.carryM ?? null,
    standardCarryM: fit?.standardCarryM ?? null,
    cd: fit?.cd ?? null,
    cdError: fit?.cdError ?? null,
    model: fit?.model ?? null,
    fittedAt: fit?.createdAt ?? null,
  };
}

/** The header of a flights export in a unit system. */
export function flightCsvColumns(system: UnitSystem): string[] {
  return [
    'flight_id', 'session_date', 'venue', 'athlete', 'action', 'ball', 'status',
    unitColumn('launch_speed', 'speed', system), 'launch_angle_deg',
    unitColumn('carry', 'length', system), unitColumn('standard_carry', 'length', system),
    'cd', 'cd_error', 'model', 'fitted_at',
  ];
}

const shown = (si: number | null, quantity: 'length' | 'speed', system: UnitSystem, digits: number) =>
  roundCell(si === null ? null : fromSi(si, quantity, system), digits);

export function flightsCsv(rows: readonly FlightCsvRow[], system: UnitSystem): string {
  const records: CsvCell[][] = rows.map((r) => [
    r.id,
    r.sessionDate,
    r.venue,
    r.athleteName,
    r.actionLabel,
    r.ballName,
    r.statusLabel,
    shown(r.launchSpeedMps, 'speed', system, 3),
    roundCell(r.launchAngleDeg, 2),
    shown(r.carryM, 'length', system, 3),
    shown(r.standardCarryM, 'length', system, 3),
    roundCell(r.cd, 4),
    roundCell(r.cdError, 4),
    r.model,
    r.fittedAt,
  ]);
  return csvDocument(flightCsvColumns(system), records);
}
