/**
 * `flight.fit`: fit the calibrated track of a flight with the physics engine (shared/physics) and add
 * the fit to the flight's history — a refit never overwrites. The flight becomes `fitted`, or
 * `needs_attention` with the reason when the engine flags the result (a scale that disagrees with
 * gravity by more than a few per cent, a C_d outside the ball's range) or when the calibration's
 * ball-size cross-check failed.
 */
import { ENGINE_VERSION, fitFlight, FLIGHT_MODELS, type FitResult, type ModelChoice } from '../../../shared/physics';
import { BALL_CHECK_TOLERANCE } from '../../../shared/calibration/geometry';
import type { BallCheck } from '../../../shared/schemas/calibration';
import { MOVING_CAMERA_WARNING } from '../../../shared/schemas/camera-motion';
import type { FitWarning } from '../../../shared/schemas/flight';
import { withTransaction } from '../../db';
import { Fit, Flight, TrackPoint } from '../../models';
import { loadFitInput } from '../../services/fit-input';
import { JobFailure, type JobHandler } from '../types';

/** Warnings that make a fit need a coach's attention instead of counting as a plain result. */
const ATTENTION_WARNINGS = new Set(['SCALE_DISAGREES', 'NOT_CONVERGED', 'NEGATIVE_CD', 'CD_OUTSIDE_RANGE', 'BALL_SIZE_MISMATCH']);

/** The calibration's ball-size cross-check as a warning of the fit, when it failed. */
function ballCheckWarning(check: BallCheck | null | undefined): FitWarning | null {
  if (!check || check.ok) return null;
  const pct = Math.round(check.ratio * 100);
  return {
    code: 'BALL_SIZE_MISMATCH',
    message: `The ball measures ${pct} % of its real diameter in the calibration (the Trace screen's calibration panel shows both sizes in your units): the scale, or the ball picked for the size check, is off by more than ${Math.round(BALL_CHECK_TOLERANCE * 100)} %. Re-check the two scale points and their distance, and the ball.`,
  };
}

function pointsSignature(points: { id: number }[]): string {
  return `${points.length}:${points.reduce((max, p) => Math.max(max, p.id), 0)}`;
}

const round = (v: number | null | undefined, digits = 6) => (v === null || v === undefined || !Number.isFinite(v) ? null : Number(v.toPrecision(digits)));

export const flightFitHandler: JobHandler = {
  type: 'flight.fit',

  async run({ job, progress }) {
    const flightId = job.payload.flightId;
    if (typeof flightId !== 'number') throw new JobFailure('The flight was deleted before it could be fitted.', 'FLIGHT_GONE');
    const { flight, clip, calibration: cal, points, track, options, cameraMoved } = await loadFitInput(flightId);
    // Every save of points writes new rows, so the largest id tells whether the points changed meanwhile.
    const pointsSeen = pointsSignature(points);
    const requested = typeof job.payload.model === 'string' ? job.payload.model : 'auto';
    if (requested !== 'auto' && !FLIGHT_MODELS.includes(requested as (typeof FLIGHT_MODELS)[number])) {
      throw new JobFailure(`Unknown model "${requested}": use auto, ${FLIGHT_MODELS.join(', ')}.`, 'BAD_OPTION');
    }
    progress(10);
    const result: FitResult = fitFlight(track, { ...options, model: requested as ModelChoice });
    progress(90);

    const warnings: FitWarning[] = result.warnings.map((w) => ({ code: w.code, message: w.message }));
    const sizeWarning = ballCheckWarning(cal.ballCheck);
    if (sizeWarning) warnings.unshift(sizeWarning);
    if (cameraMoved) warnings.push({ ...MOVING_CAMERA_WARNING });
    const attention = warnings.filter((w) => ATTENTION_WARNINGS.has(w.code));
    const status = attention.length > 0 ? 'needs_attention' : 'fitted';
    const params = {
      requestedModel: requested,
      launchSpeedMps: round(result.launch.speed),
      launchSpeedError: round(result.launch.speedError),
      launchAngleDeg: round(result.launch.angleDeg),
      launchAngleError: round(result.launch.angleDegError),
      launchHeightM: round(result.launch.height),
      releaseMode: result.release.mode,
      releaseBackTimeS: round(result.release.backTime),
      releaseBackFrames: round(result.release.backFrames),
      pointsBeforeRelease: result.release.droppedPoints,
      cd: round(result.cd),
      cdError: round(result.cdError),
      cl: round(result.cl),
      clError: round(result.clError),
      dragRate: round(result.dragRate),
      windAlongFlightMps: round(options.windSpeed),
      airDensityKgM3: round(result.setup.air.densityKgM3),
      metresPerPixel: round(cal.metresPerPixel, 8),
      captureFps: clip.captureFps,
      points: points.length,
    };

    const fit = await withTransaction(async (transaction) => {
      const current = await Flight.findByPk(flight.id, { transaction, lock: transaction.LOCK.UPDATE });
      if (!current) throw new JobFailure('The flight was deleted while it was being fitted.', 'FLIGHT_GONE');
      const created = await Fit.create(
        {
          clubId: flight.clubId,
          flightId: flight.id,
          jobId: job.id,
          calibrationId: cal.id,
          model: result.model,
          engineVersion: ENGINE_VERSION,
          status,
          launchSpeedMps: result.launch.speed,
          launchAngleDeg: result.launch.angleDeg,
          carryM: result.flight.carry,
          warnings,
          params,
          result: JSON.parse(JSON.stringify(result)) as Record<string, unknown>,
        },
        { transaction },
      );
      // Points edited while the fit ran make this fit stale: keep it in the history, leave the status to the edit.
      const now = await TrackPoint.findAll({ where: { flightId: flight.id }, attributes: ['id'], transaction });
      if (pointsSignature(now) === pointsSeen) {
        current.status = status;
        current.attentionReason = attention.length > 0 ? attention.map((w) => w.message).join(' ') : null;
        await current.save({ transaction });
      }
      return created;
    });
    return { fitId: fit.id, status, model: result.model };
  },

  async onFailed(job, reason) {
    if (typeof job.payload.flightId !== 'number') return;
    await Flight.update({ status: 'needs_attention', attentionReason: reason }, { where: { id: job.payload.flightId } });
  },
};
