/**
 * `flight.fit`: fit the calibrated track of a flight with the physics engine (shared/physics) and add
 * the fit to the flight's history — a refit never overwrites. The flight becomes `fitted`, or
 * `needs_attention` with the reason when the engine flags the result (for example a scale that
 * disagrees with gravity by more than a few per cent).
 */
import {
  airFromConditions,
  BALLS,
  ENGINE_VERSION,
  fitFlight,
  FLIGHT_MODELS,
  type Conditions as AirConditions,
  type FitResult,
  type ModelChoice,
} from '../../../shared/physics';
import { computeCalibration, pixelToMetres } from '../../../shared/calibration/geometry';
import type { FitWarning } from '../../../shared/schemas/flight';
import { sequelize } from '../../db';
import { Calibration, Clip, Fit, Flight, Session, TrackPoint } from '../../models';
import { JobFailure, type JobHandler } from '../types';

/** Warnings that make a fit need a coach's attention instead of counting as a plain result. */
const ATTENTION_WARNINGS = new Set(['SCALE_DISAGREES', 'NOT_CONVERGED', 'NEGATIVE_CD']);

/** The session's weather as the engine reads it (the stored SI values); null when nothing is known. */
export function airConditions(session: Session): AirConditions | null {
  const c: AirConditions = {};
  if (session.airTemperatureK !== null) c.airTemperatureK = session.airTemperatureK;
  if (session.airPressurePa !== null) c.airPressurePa = session.airPressurePa;
  if (session.relativeHumidityPct !== null) c.relativeHumidityPct = session.relativeHumidityPct;
  if (session.altitudeM !== null) c.altitudeM = session.altitudeM;
  return Object.keys(c).length > 0 ? c : null;
}

/**
 * Wind along the flight (m/s, + = tailwind) from speed and the direction it blows towards (0° = along the flight).
 * Note: a speed without a direction says nothing about the along-flight part, so it counts as still air
 * rather than as a full tailwind (which would bias the fitted drag coefficient).
 */
export function windAlongFlight(session: Session): number {
  if (session.windSpeedMps === null || session.windDirectionDeg === null) return 0;
  return session.windSpeedMps * Math.cos((session.windDirectionDeg * Math.PI) / 180);
}

function pointsSignature(points: { id: number }[]): string {
  return `${points.length}:${points.reduce((max, p) => Math.max(max, p.id), 0)}`;
}

const round = (v: number | null | undefined, digits = 6) => (v === null || v === undefined || !Number.isFinite(v) ? null : Number(v.toPrecision(digits)));

export const flightFitHandler: JobHandler = {
  type: 'flight.fit',

  async run({ job, progress }) {
    const flightId = job.payload.flightId;
    const flight = typeof flightId === 'number' ? await Flight.findByPk(flightId) : null;
    const clip = flight ? await Clip.findByPk(flight.clipId) : null;
    const session = clip ? await Session.findByPk(clip.sessionId) : null;
    if (!flight || !clip || !session) throw new JobFailure('The flight was deleted before it could be fitted.', 'FLIGHT_GONE');
    const cal = await Calibration.findOne({ where: { clipId: clip.id, supersededAt: null }, order: [['id', 'DESC']] });
    if (!cal) throw new JobFailure('Calibrate the clip before fitting: the fit needs the traced points in metres.', 'CALIBRATION_REQUIRED');
    const points = await TrackPoint.findAll({ where: { flightId: flight.id }, order: [['frame', 'ASC']] });
    // Every save of points writes new rows, so the largest id tells whether the points changed meanwhile.
    const pointsSeen = pointsSignature(points);
    if (!BALLS[flight.ballId]) {
      throw new JobFailure(`The ball "${flight.ballId}" is not in the catalogue, so the fit has no mass and size for it. Pick a catalogue ball for this flight.`, 'UNKNOWN_BALL');
    }
    const frame = computeCalibration(cal.input);
    const track = { t: [] as number[], x: [] as number[], y: [] as number[] };
    for (const p of points) {
      const m = pixelToMetres(frame, { xPx: p.xPx, yPx: p.yPx });
      track.t.push(p.frame / clip.captureFps);
      track.x.push(m.xM);
      track.y.push(m.yM);
    }
    const conditions = airConditions(session);
    const requested = typeof job.payload.model === 'string' ? job.payload.model : 'auto';
    if (requested !== 'auto' && !FLIGHT_MODELS.includes(requested as (typeof FLIGHT_MODELS)[number])) {
      throw new JobFailure(`Unknown model "${requested}": use auto, ${FLIGHT_MODELS.join(', ')}.`, 'BAD_OPTION');
    }
    progress(10);
    const result: FitResult = fitFlight(track, {
      model: requested as ModelChoice,
      ball: flight.ballId,
      ...(conditions ? { air: airFromConditions(conditions) } : {}),
      windSpeed: windAlongFlight(session),
    });
    progress(90);

    const warnings: FitWarning[] = result.warnings.map((w) => ({ code: w.code, message: w.message }));
    const attention = warnings.filter((w) => ATTENTION_WARNINGS.has(w.code));
    const status = attention.length > 0 ? 'needs_attention' : 'fitted';
    const params = {
      requestedModel: requested,
      launchSpeedMps: round(result.launch.speed),
      launchSpeedError: round(result.launch.speedError),
      launchAngleDeg: round(result.launch.angleDeg),
      launchAngleError: round(result.launch.angleDegError),
      launchHeightM: round(result.launch.height),
      cd: round(result.cd),
      cdError: round(result.cdError),
      cl: round(result.cl),
      clError: round(result.clError),
      dragRate: round(result.dragRate),
      windAlongFlightMps: round(windAlongFlight(session)),
      airDensityKgM3: round(result.setup.air.densityKgM3),
      metresPerPixel: round(cal.metresPerPixel, 8),
      captureFps: clip.captureFps,
      points: points.length,
    };

    const fit = await sequelize.transaction(async (transaction) => {
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
