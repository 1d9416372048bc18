/**
 * Fits of flights: requests (a `flight.fit` job), refits after anything that changes the measurement
 * (calibration, capture rate, ball, session conditions), and the fit history (never overwritten).
 */
import { Op, QueryTypes, type Transaction } from 'sequelize';
import type { Job as JobDto } from '../../shared/schemas/clip';
import type { Fit as FitDto, FitSummary, FlightStatus } from '../../shared/schemas/flight';
import { sequelize } from '../db';
import { ApiError } from '../http/errors';
import type { ClubContext } from '../http/types';
import { enqueue } from '../jobs/queue';
import { Fit, Flight, Job } from '../models';
import { currentCalibration } from './calibration';
import { findVisibleFlight } from './flights';
import { toJobDto } from './jobs';

/** The engine refuses fewer points (TOO_FEW_POINTS). */
const MIN_FIT_POINTS = 5;

export function toFitSummary(fit: Fit): FitSummary {
  return {
    id: fit.id,
    model: fit.model,
    status: fit.status,
    createdAt: fit.createdAt.toISOString(),
    launchSpeedMps: fit.launchSpeedMps ?? null,
    launchAngleDeg: fit.launchAngleDeg ?? null,
    carryM: fit.carryM ?? null,
    cd: finiteOrNull(fit.result?.cd),
    cdError: finiteOrNull(fit.result?.cdError),
    standardCarryM: finiteOrNull(fit.result?.standardCarry),
    warnings: fit.warnings ?? [],
  };
}

function finiteOrNull(value: unknown): number | null {
  return typeof value === 'number' && Number.isFinite(value) ? value : null;
}

export function toFitDto(fit: Fit): FitDto {
  return {
    ...toFitSummary(fit),
    jobId: fit.jobId ?? null,
    engineVersion: fit.engineVersion,
    calibrationId: fit.calibrationId ?? null,
    params: fit.params,
    result: fit.result,
  };
}

/** The newest fit of each flight. */
export async function latestFits(flightIds: number[]): Promise<Map<number, Fit>> {
  const out = new Map<number, Fit>();
  if (flightIds.length === 0) return out;
  const rows = await sequelize.query<{ id: number }>('SELECT MAX(id) AS id FROM fits WHERE flight_id IN (:ids) GROUP BY flight_id', {
    type: QueryTypes.SELECT,
    replacements: { ids: flightIds },
  });
  if (rows.length === 0) return out;
  const fits = await Fit.findAll({ where: { id: { [Op.in]: rows.map((r) => Number(r.id)) } } });
  for (const fit of fits) out.set(fit.flightId, fit);
  return out;
}

export async function listFits(club: ClubContext, flightId: number): Promise<FitDto[]> {
  const flight = await findVisibleFlight(club, flightId);
  const fits = await Fit.findAll({ where: { flightId: flight.id }, order: [['id', 'DESC']] });
  return fits.map(toFitDto);
}

/** Queues a fit of one flight unless one is already waiting (then that one is answered). */
async function enqueueFit(clubId: number, flight: Flight, model: string | undefined, transaction?: Transaction): Promise<Job> {
  const waiting = await Job.findOne({ where: { flightId: flight.id, type: 'flight.fit', status: 'queued' }, transaction });
  if (waiting) {
    if (model !== undefined && waiting.payload.model !== model) {
      waiting.payload = { ...waiting.payload, model };
      await waiting.save({ transaction });
    }
    return waiting;
  }
  return enqueue({ clubId, type: 'flight.fit', payload: { flightId: flight.id, ...(model ? { model } : {}) }, clipId: flight.clipId, flightId: flight.id }, transaction);
}

export async function requestFit(club: ClubContext, flightId: number, model?: string): Promise<JobDto> {
  const flight = await findVisibleFlight(club, flightId);
  const cal = await currentCalibration(flight.clipId);
  if (!cal) {
    throw new ApiError('CALIBRATION_REQUIRED', 'Calibrate the clip before fitting: the fit needs metres, and the calibration turns the traced pixels into metres.');
  }
  const points = await sequelize.query<{ n: number }>('SELECT COUNT(*) AS n FROM track_points WHERE flight_id = :id', {
    type: QueryTypes.SELECT,
    replacements: { id: flight.id },
  });
  const n = Number(points[0]?.n ?? 0);
  if (n < MIN_FIT_POINTS) {
    throw new ApiError('CONFLICT', `A fit needs at least ${MIN_FIT_POINTS} traced points; this flight has ${n}. Trace more of the flight (or let auto-follow do it) first.`);
  }
  return toJobDto(await enqueueFit(club.id, flight, model));
}

const REFIT_ALL: FlightStatus[] = ['traced', 'fitted', 'reviewed', 'needs_attention'];
const REFIT_FITTED: FlightStatus[] = ['fitted', 'reviewed', 'needs_attention'];

/**
 * Queues refits after a change to the measurement. `onlyFitted` limits them to flights that had a fit
 * (a new capture rate or ball changes an existing result; a new calibration also lets traced flights be fitted).
 * Flights of clips without a calibration are skipped (nothing to fit in metres).
 * @returns the ids of the queued jobs
 */
export async function enqueueRefits(
  clubId: number,
  scope: { clipId?: number; flightId?: number; sessionId?: number; onlyFitted?: boolean },
  transaction?: Transaction,
): Promise<number[]> {
  const where: Record<string | symbol, unknown> = { clubId, status: { [Op.in]: scope.onlyFitted ? REFIT_FITTED : REFIT_ALL } };
  if (scope.flightId) where.id = scope.flightId;
  if (scope.clipId) where.clipId = scope.clipId;
  if (scope.sessionId) {
    const rows = await sequelize.query<{ id: number }>('SELECT id FROM clips WHERE session_id = :id', {
      type: QueryTypes.SELECT,
      replacements: { id: scope.sessionId },
      transaction,
    });
    where.clipId = { [Op.in]: rows.map((r) => Number(r.id)) };
  }
  const flights = await Flight.findAll({ where, transaction });
  if (flights.length === 0) return [];
  // A flight with too few points for a fit is left alone: its refit would only fail.
  const counts = await sequelize.query<{ id: number; n: number }>(
    'SELECT flight_id AS id, COUNT(*) AS n FROM track_points WHERE flight_id IN (:ids) GROUP BY flight_id',
    { type: QueryTypes.SELECT, replacements: { ids: flights.map((f) => f.id) }, transaction },
  );
  const pointCount = new Map(counts.map((r) => [Number(r.id), Number(r.n)]));
  const ids: number[] = [];
  const calibrated = new Map<number, boolean>();
  for (const flight of flights) {
    if (!calibrated.has(flight.clipId)) calibrated.set(flight.clipId, (await currentCalibration(flight.clipId, transaction)) !== null);
    if (!calibrated.get(flight.clipId) || (pointCount.get(flight.id) ?? 0) < MIN_FIT_POINTS) continue;
    const job = await enqueueFit(clubId, flight, undefined, transaction);
    ids.push(job.id);
  }
  return ids;
}
