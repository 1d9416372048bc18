/**
 * Fits of flights: requests (a `flight.fit` job, queued by ./refits) and the fit history (never overwritten).
 */
import { Op, QueryTypes } from 'sequelize';
import { MIN_POINTS } from '../../shared/physics';
import type { Job as JobDto } from '../../shared/schemas/clip';
import type { Fit as FitDto, FitSummary } from '../../shared/schemas/flight';
import { sequelize } from '../db';
import { ApiError } from '../http/errors';
import type { ClubContext } from '../http/types';
import { Fit } from '../models';
import { currentCalibration } from './calibration';
import { toJobDto } from './jobs';
import { enqueueFit } from './refits';
import { findVisibleFlight } from './visibility';

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
    release: releaseOf(fit.result?.release),
    warnings: fit.warnings ?? [],
  };
}

/** A fit result's release as the summary shows it (null for results without one). */
export function releaseOf(value: unknown): FitSummary['release'] {
  if (!value || typeof value !== 'object') return null;
  const r = value as { mode?: unknown; backFrames?: unknown };
  if (r.mode !== 'first-point' && r.mode !== 'time' && r.mode !== 'height') return null;
  return { mode: r.mode, backFrames: finiteOrNull(r.backFrames) };
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
  if (n < MIN_POINTS) {
    throw new ApiError('CONFLICT', `A fit needs at least ${MIN_POINTS} traced points; this flight has ${n}. Trace more of the flight (or let auto-follow do it) first.`);
  }
  return toJobDto(await enqueueFit(club.id, flight, model));
}
