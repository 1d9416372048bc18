/**
 * The input of a flight's fit, built in one place for the `flight.fit` job, the demo seeder and the
 * tests: the clip's current calibration turns the traced pixels (carried into the calibration frame's pixels
 * through the camera motion auto-follow found) into metres (t = frame / capture rate),
 * the session's conditions give the air and the wind along the flight, and the flight names the ball.
 */
import { airFromConditions, type Air, type BallProps, type Conditions as AirConditions, type ReleaseSpec } from '../../shared/physics';
import { pixelToMetres } from '../../shared/calibration/geometry';
import { cameraMoved } from '../../shared/schemas/camera-motion';
import type { Conditions } from '../../shared/schemas/session';
import { JobFailure } from '../jobs/types';
import { Clip, Flight, Session, TrackPoint, type Calibration } from '../models';
import { resolveFlightBall } from './balls';
import { currentCalibration, frameOf } from './calibration';
import { cameraMotionOf, referenceMapper } from './camera-motion';
import { frameTimer } from './frame-times';
import { conditionsOf } from './sessions';

/** A session's weather as the engine reads it (the stored SI values); null when nothing is known. */
export function airConditions(conditions: Conditions): AirConditions | null {
  const c: AirConditions = {};
  if (conditions.airTemperatureK !== null) c.airTemperatureK = conditions.airTemperatureK;
  if (conditions.airPressurePa !== null) c.airPressurePa = conditions.airPressurePa;
  if (conditions.relativeHumidityPct !== null) c.relativeHumidityPct = conditions.relativeHumidityPct;
  if (conditions.altitudeM !== null) c.altitudeM = conditions.altitudeM;
  return Object.keys(c).length > 0 ? c : null;
}

/** The air a fit assumes for a session (standard air for whatever is not known). */
export function sessionAir(conditions: Conditions): Air {
  return airFromConditions(airConditions(conditions) ?? {});
}

/**
 * Wind along the flight (m/s, + = tailwind) from speed and the direction it blows towards (0° = along the flight).
 * Note: a speed without a direction says nothing about the along-flight part, so it counts as still air
 * rather than as a full tailwind (which would bias the fitted drag coefficient).
 */
export function windAlongFlight(conditions: Conditions): number {
  if (conditions.windSpeedMps === null || conditions.windDirectionDeg === null) return 0;
  return conditions.windSpeedMps * Math.cos((conditions.windDirectionDeg * Math.PI) / 180);
}

/** The flight's release as the engine reads it: a marked frame wins over a height; none: the first traced point. */
function releaseOf(flight: Flight, clip: Clip): { release?: ReleaseSpec } {
  if (flight.releaseFrame !== null && flight.releaseFrame !== undefined) return { release: { time: flight.releaseFrame / clip.captureFps } };
  if (flight.releaseHeightM !== null && flight.releaseHeightM !== undefined) return { release: { height: flight.releaseHeightM } };
  return {};
}

export interface FitInput {
  flight: Flight;
  clip: Clip;
  calibration: Calibration;
  /** The traced points in frame order, as stored (their ids tell whether they changed meanwhile). */
  points: TrackPoint[];
  /** The camera moved while filming (auto-follow found its motion above the thresholds of shared/schemas/camera-motion.ts). */
  cameraMoved: boolean;
  /** The points in seconds and metres (t from the capture rate, x along the flight, y up), from the reference frame's pixels. */
  track: { t: number[]; x: number[]; y: number[] };
  /**
   * Ball, air and wind for `fitFlight` (no air: the engine assumes standard air), the release (a marked frame
   * as a time from the capture rate, or a height) and the capture rate; the model is the caller's choice.
   */
  options: { ball: BallProps; air?: Air; windSpeed: number; release?: ReleaseSpec; frameRate: number };
}

/**
 * Loads everything the fit of one flight needs.
 * @throws JobFailure `FLIGHT_GONE` (the flight, its clip or session was deleted), `CALIBRATION_REQUIRED`,
 *   `UNKNOWN_BALL` (the flight's ball is neither in the catalogue nor one of the club's balls)
 */
export async function loadFitInput(flightId: number): Promise<FitInput> {
  const flight = await Flight.findByPk(flightId);
  const clip = flight ? await Clip.findByPk(flight.clipId) : null;
  const session = clip ? await Session.findByPk(clip.sessionId) : null;
  if (!flight || !clip || !session) throw new JobFailure('The flight was deleted before it could be fitted.', 'FLIGHT_GONE');
  const calibration = await currentCalibration(clip.id);
  if (!calibration) throw new JobFailure('Calibrate the clip before fitting: the fit needs the traced points in metres.', 'CALIBRATION_REQUIRED');
  const points = await TrackPoint.findAll({ where: { flightId: flight.id }, order: [['frame', 'ASC']] });
  const ball = await resolveFlightBall(flight.clubId, flight.ballId);
  if (!ball) {
    throw new JobFailure(`The ball "${flight.ballId}" is neither in the catalogue nor one of the club's balls, so the fit has no mass and size for it. Pick a ball for this flight.`, 'UNKNOWN_BALL');
  }
  const frame = frameOf(calibration);
  const track: FitInput['track'] = { t: [], x: [], y: [] };
  const timeOf = frameTimer(clip);
  const cameraMotion = await cameraMotionOf(flight.id);
  const toRef = referenceMapper(cameraMotion, calibration);
  for (const p of points) {
    const ref = toRef(p.frame, p.xPx, p.yPx);
    const m = pixelToMetres(frame, { xPx: ref.x, yPx: ref.y });
    track.t.push(timeOf(p.frame));
    track.x.push(m.xM);
    track.y.push(m.yM);
  }
  const conditions = conditionsOf(session);
  const air = airConditions(conditions);
  return {
    flight,
    clip,
    calibration,
    points,
    track,
    cameraMoved: cameraMotion !== null && cameraMoved(cameraMotion.maxPanPx, cameraMotion.maxRollDeg),
    options: {
      ball,
      ...(air ? { air: airFromConditions(air) } : {}),
      windSpeed: windAlongFlight(conditions),
      ...releaseOf(flight, clip),
      frameRate: clip.captureFps,
    },
  };
}
