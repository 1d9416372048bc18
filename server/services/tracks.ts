/**
 * Traced points of a flight: read (with times from the capture rate and metres from the calibration),
 * bulk replace, CSV import and export, and auto-follow requests.
 */
import { Op, type Transaction } from 'sequelize';
import { metresToPixel, pixelToMetres } from '../../shared/calibration/geometry';
import type { Job as JobDto } from '../../shared/schemas/clip';
import type {
  FollowBody,
  TrackPoint as TrackPointDto,
  TrackPointInput,
} from '../../shared/schemas/track';
import { csvDocument } from '../../shared/exports/csv';
import { parseTrackCsv, TrackCsvError } from '../../shared/tracks/csv';
import { fromSi, unitColumn, type UnitSystem } from '../../shared/units';
import { withTransaction } from '../db';
import { ApiError } from '../http/errors';
import type { ClubContext } from '../http/types';
import { enqueue } from '../jobs/queue';
import { Calibration, Clip, Flight, TrackPoint } from '../models';
import { currentCalibration, frameOf } from './calibration';
import { cameraMotionOf, referenceMapper, writeCameraMotion, type storedMotion } from './camera-motion';
import { frameAtTime, frameTimer } from './frame-times';
import { toJobDto } from './jobs';
import { findVisibleFlightWithClip } from './visibility';

/** A flight's points as the API shows them: t from the frame (frameTimer); metres when the clip is calibrated. */
export async function pointsOf(flight: Flight, clip: Clip, cal: Calibration | null, transaction?: Transaction): Promise<TrackPointDto[]> {
  const points = await TrackPoint.findAll({ where: { flightId: flight.id }, order: [['frame', 'ASC']], transaction });
  const frame = cal ? frameOf(cal) : null;
  const timeOf = frameTimer(clip);
  const toRef = referenceMapper(await cameraMotionOf(flight.id, transaction), cal);
  return points.map((p) => {
    const ref = toRef(p.frame, p.xPx, p.yPx);
    const m = frame ? pixelToMetres(frame, { xPx: ref.x, yPx: ref.y }) : null;
    return {
      frame: p.frame,
      xPx: p.xPx,
      yPx: p.yPx,
      radiusPx: p.radiusPx ?? null,
      source: p.source,
      confidence: p.confidence ?? null,
      tS: timeOf(p.frame),
      xM: m ? m.xM : null,
      yM: m ? m.yM : null,
      xRefPx: ref.x,
      yRefPx: ref.y,
    };
  });
}

export async function getPoints(club: ClubContext, flightId: number): Promise<TrackPointDto[]> {
  const { flight, clip } = await findVisibleFlightWithClip(club, flightId);
  return pointsOf(flight, clip, await currentCalibration(clip.id));
}

/** Why a point cannot be kept, or null. */
function pointProblem(p: TrackPointInput, flight: Flight, clip: Clip): string | null {
  if (p.frame < flight.frameStart || p.frame > flight.frameEnd) {
    return `Frame ${p.frame} is outside this flight's frames ${flight.frameStart}–${flight.frameEnd}: widen the flight's range or drop the point.`;
  }
  if (p.xPx < 0 || p.yPx < 0 || p.xPx > clip.width || p.yPx > clip.height) {
    return `The point on frame ${p.frame} (${Math.round(p.xPx)}, ${Math.round(p.yPx)}) lies outside the ${clip.width}×${clip.height} picture.`;
  }
  return null;
}

/** Inserts a flight's points (a click without a source is a manual mark). */
export async function insertPoints(flightId: number, points: TrackPointInput[], transaction: Transaction): Promise<void> {
  await TrackPoint.bulkCreate(
    points.map((p) => ({
      flightId,
      frame: p.frame,
      xPx: p.xPx,
      yPx: p.yPx,
      radiusPx: p.radiusPx ?? null,
      source: p.source ?? 'manual',
      confidence: p.confidence ?? null,
    })),
    { transaction },
  );
}

/** Replaces a flight's points in one transaction, then sets its status from them (the old fit is stale once points change). */
async function writePoints(flight: Flight, points: TrackPointInput[], transaction: Transaction, keepBefore?: number): Promise<void> {
  if (keepBefore === undefined) await TrackPoint.destroy({ where: { flightId: flight.id }, transaction });
  else await TrackPoint.destroy({ where: { flightId: flight.id, frame: { [Op.gte]: keepBefore } }, transaction });
  if (points.length > 0) {
    await insertPoints(flight.id, points, transaction);
  }
  const remaining = await TrackPoint.count({ where: { flightId: flight.id }, transaction });
  flight.status = remaining > 0 ? 'traced' : 'uploaded';
  flight.attentionReason = null;
  flight.changed('updatedAt', true);
  await flight.save({ transaction });
}

export async function replacePoints(club: ClubContext, flightId: number, points: TrackPointInput[]): Promise<TrackPointDto[]> {
  return withTransaction(async (transaction) => {
    const { flight, clip } = await findVisibleFlightWithClip(club, flightId, transaction);
    const fields: Record<string, string> = {};
    points.forEach((p, i) => {
      const problem = pointProblem(p, flight, clip);
      if (problem && Object.keys(fields).length < 20) fields[`points.${i}`] = problem;
    });
    const names = Object.keys(fields);
    if (names.length > 0) throw new ApiError('VALIDATION_FAILED', fields[names[0]!]!, fields);
    await writePoints(flight, points, transaction);
    return pointsOf(flight, clip, await currentCalibration(clip.id, transaction), transaction);
  }, { readCommitted: true });
}

/**
 * Stores auto-follow points from `fromFrame` on (earlier points stay), inside the flight's range, and the camera
 * motion the follow found (null: it took the camera as still), in one transaction. Used by the flight.follow job.
 */
export async function storeFollowedPoints(
  flightId: number,
  fromFrame: number,
  points: TrackPointInput[],
  camera: ReturnType<typeof storedMotion> | null = null,
): Promise<number> {
  return withTransaction(async (transaction) => {
    const flight = await Flight.findByPk(flightId, { transaction, lock: transaction.LOCK.UPDATE });
    if (!flight) return 0;
    const kept = points.filter((p) => p.frame >= fromFrame && p.frame >= flight.frameStart && p.frame <= flight.frameEnd);
    await writePoints(flight, kept, transaction, fromFrame);
    await writeCameraMotion(flight.id, camera, transaction);
    return kept.length;
  }, { readCommitted: true });
}

function csvError(err: TrackCsvError): ApiError {
  return new ApiError('CSV_INVALID', err.message, { csv: err.message });
}

export async function importCsv(club: ClubContext, flightId: number, text: string): Promise<TrackPointDto[]> {
  let parsed;
  try {
    parsed = parseTrackCsv(text);
  } catch (err) {
    if (err instanceof TrackCsvError) throw csvError(err);
    throw err;
  }
  return withTransaction(async (transaction) => {
    const { flight, clip } = await findVisibleFlightWithClip(club, flightId, transaction);
    const cal = await currentCalibration(clip.id, transaction);
    const rows: { line: number; column: string; point: TrackPointInput }[] = [];
    if (parsed.kind === 'pixels') {
      for (const r of parsed.rows) {
        rows.push({
          line: r.line,
          column: 'frame',
          point: { frame: r.frame, xPx: r.xPx, yPx: r.yPx, radiusPx: r.radiusPx, confidence: r.confidence, source: 'manual' },
        });
      }
    } else {
      if (!cal) {
        throw new ApiError('CALIBRATION_REQUIRED', 'A track in metres (columns t,x,y) needs the clip\u2019s calibration to place it on the frames. Calibrate the clip first, or import pixel columns frame,x_px,y_px.');
      }
      const frame = frameOf(cal);
      for (const r of parsed.rows) {
        const p = metresToPixel(frame, { xM: r.xM, yM: r.yM });
        rows.push({ line: r.line, column: 't', point: { frame: frameAtTime(clip, r.tS), xPx: p.xPx, yPx: p.yPx, source: 'manual' } });
      }
    }
    const seen = new Map<number, number>();
    for (const r of rows) {
      const before = seen.get(r.point.frame);
      if (before !== undefined) {
        throw csvError(
          new TrackCsvError(
            `Line ${r.line}, column "${r.column}": frame ${r.point.frame} already has a point (line ${before}). Keep one point per frame.`,
            r.line,
            r.column,
          ),
        );
      }
      seen.set(r.point.frame, r.line);
      const problem = pointProblem(r.point, flight, clip);
      if (problem) {
        const column = problem.startsWith('Frame') ? r.column : parsed.kind === 'pixels' ? 'x_px' : 'x';
        throw csvError(new TrackCsvError(`Line ${r.line}, column "${column}": ${problem}`, r.line, column));
      }
    }
    await writePoints(flight, rows.map((r) => r.point).sort((a, b) => a.frame - b.frame), transaction);
    return pointsOf(flight, clip, cal, transaction);
  }, { readCommitted: true });
}

/**
 * A flight's track as CSV (see shared/exports/csv.ts for the format): pixels, and positions in the member's units
 * (`x_m`, `y_m` or `x_ft`, `y_ft`) when the clip is calibrated. The file imports back by its pixel columns.
 */
export async function exportCsv(club: ClubContext, flightId: number, system: UnitSystem): Promise<{ filename: string; csv: string }> {
  const { flight, clip } = await findVisibleFlightWithClip(club, flightId);
  const points = await pointsOf(flight, clip, await currentCalibration(clip.id));
  const header = ['frame', 't_s', 'x_px', 'y_px', 'radius_px', 'source', 'confidence', unitColumn('x', 'length', system), unitColumn('y', 'length', system)];
  const position = (m: number | null) => (m === null ? null : precise(fromSi(m, 'length', system)));
  const rows = points.map((p) => [p.frame, precise(p.tS), precise(p.xPx), precise(p.yPx), precise(p.radiusPx), p.source, precise(p.confidence), position(p.xM), position(p.yM)]);
  return { filename: `flight-${flight.id}-track.csv`, csv: csvDocument(header, rows) };
}

/** A number with ten significant digits (integers as they are); null stays an empty cell. */
function precise(value: number | null): number | null {
  if (value === null) return null;
  return Number.isInteger(value) ? value : Number(value.toPrecision(10));
}

/** Queues auto-follow from a clicked point of a processed clip. */
export async function startFollow(club: ClubContext, flightId: number, body: FollowBody): Promise<JobDto> {
  const { flight, clip } = await findVisibleFlightWithClip(club, flightId);
  if (!clip.framesReady) {
    throw new ApiError('CONFLICT', 'The clip is still being processed (or its processing failed): follow the ball once its frames are ready.');
  }
  const problem = pointProblem({ frame: body.frame, xPx: body.xPx, yPx: body.yPx }, flight, clip);
  if (problem) throw new ApiError('VALIDATION_FAILED', problem, { frame: problem });
  if (body.frame >= flight.frameEnd) {
    throw new ApiError('VALIDATION_FAILED', `Frame ${body.frame} is the flight's last frame: start following from an earlier frame.`, { frame: 'Start before the last frame.' });
  }
  const job = await enqueue({
    clubId: club.id,
    type: 'flight.follow',
    payload: {
      flightId: flight.id,
      frame: body.frame,
      xPx: body.xPx,
      yPx: body.yPx,
      radiusPx: body.radiusPx ?? null,
      camera: body.camera ?? (clip.cameraStill ? 'still' : 'moving'),
    },
    clipId: clip.id,
    flightId: flight.id,
  });
  return toJobDto(job);
}
