/**
 * Queueing of `flight.fit` jobs: one fit on request, and refits after anything that changes the
 * measurement (calibration, capture rate, ball, session conditions). A flight has at most one fit
 * waiting in the queue; asking again answers the waiting one.
 */
import { Op, QueryTypes, type Transaction } from 'sequelize';
import { MIN_POINTS } from '../../shared/physics';
import type { FlightStatus } from '../../shared/schemas/flight';
import { sequelize } from '../db';
import { enqueue } from '../jobs/queue';
import { Calibration, Flight, Job } from '../models';

/** Queues a fit of one flight unless one is already waiting (then that one is answered, with the model asked for now). */
export async function enqueueFit(clubId: number, flight: Flight, model: string | undefined, transaction?: Transaction): Promise<Job> {
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

const REFIT_ALL: FlightStatus[] = ['traced', 'fitted', 'reviewed', 'needs_attention'];
const REFIT_FITTED: FlightStatus[] = ['fitted', 'reviewed', 'needs_attention'];

/** Which of these clips have a current (not superseded) calibration. */
async function calibratedClipIds(clipIds: number[], transaction?: Transaction): Promise<Set<number>> {
  const rows = await Calibration.findAll({ where: { clipId: { [Op.in]: clipIds }, supersededAt: null }, attributes: ['clipId'], transaction });
  return new Set(rows.map((r) => r.clipId));
}

/**
 * Queues refits after a change to the measurement. `onlyFitted` limits them to flights that had a fit
 * (a new capture rate or ball changes an existing result; a new calibration also lets traced flights be fitted).
 * Flights of clips without a calibration are skipped (nothing to fit in metres).
 * @returns the ids of the queued jobs
 */
export async function enqueueRefits(
  clubId: number,
  scope: { clipId?: number; flightId?: number; sessionId?: number; ballId?: string; onlyFitted?: boolean },
  transaction?: Transaction,
): Promise<number[]> {
  const where: Record<string | symbol, unknown> = { clubId, status: { [Op.in]: scope.onlyFitted ? REFIT_FITTED : REFIT_ALL } };
  if (scope.flightId) where.id = scope.flightId;
  if (scope.clipId) where.clipId = scope.clipId;
  if (scope.ballId) where.ballId = scope.ballId;
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
  const calibrated = await calibratedClipIds([...new Set(flights.map((f) => f.clipId))], transaction);
  const ids: number[] = [];
  for (const flight of flights) {
    if (!calibrated.has(flight.clipId) || (pointCount.get(flight.id) ?? 0) < MIN_POINTS) continue;
    const job = await enqueueFit(clubId, flight, undefined, transaction);
    ids.push(job.id);
  }
  return ids;
}
