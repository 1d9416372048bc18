/**
 * The demo flights of the invented "Fennick Vale Sporting Club": two sessions in different air, and
 * the throws and kicks filmed at them. Pure data plus the layout each clip is rendered with, derived
 * from the flight engine (shared/physics) so that the picture holds the whole flight and the ball is
 * drawn at its true size for the calibration's scale.
 *
 * Every name, venue and date here is invented (PRODUCT.md, "Demo scenario").
 */
import { ballProps, CELSIUS_ZERO_K, dragFactor, simulateFlight, type Air, type FlightSummary, type Launch } from '../../../shared/physics';
import type { Conditions } from '../../../shared/schemas/session';
import type { PointSource } from '../../../shared/schemas/track';
import { sessionAir, windAlongFlight } from '../../services/fit-input';

/** How the ball of a demo clip was traced. */
export interface DemoTracing {
  /** `auto`: every frame, as auto-follow leaves it (with a confidence); `manual`: clicks on every `every`-th frame. */
  source: PointSource;
  every: number;
  /** Standard deviation of the tracing error per pixel coordinate (px). */
  noisePx: number;
  /** Seed of the tracing error, so every seed run traces the same points. */
  seed: number;
}

export interface DemoClipPlan {
  label: string;
  /** The name the clip was "uploaded" under. */
  fileName: string;
  width: number;
  height: number;
  captureFps: number;
  /** Container rate; below `captureFps` for a slow-motion clip. Default: captureFps. */
  playbackFps?: number;
  /** Seed of the rendered scene (texture and sensor noise). */
  seed: number;
}

export interface DemoFlightPlan {
  /** Stable name of the flight within the demo (logs and tests). */
  key: string;
  /** Display name of the athlete profile (seeded by 0001-demo-club). */
  athlete: string;
  /** Action key of the club's list. */
  action: string;
  /** Catalogue ball (shared/physics BALLS). */
  ballId: string;
  /** The true launch the clip is rendered from (m/s, degrees, m). */
  launch: Launch;
  /** The true drag coefficient of the flight. */
  cd: number;
  notes: string;
  clip: DemoClipPlan;
  tracing: DemoTracing;
}

export interface DemoSessionPlan {
  key: string;
  date: string;
  venue: string;
  notes: string;
  /** SI, as stored: kelvin, pascals, metres, per cent, m/s, degrees (direction the wind blows towards; 0 = along the flight). */
  conditions: Conditions;
  flights: DemoFlightPlan[];
}

/** An action the demo club added to its list (the defaults do not name a light-ball drill). */
export const DEMO_CUSTOM_ACTION = { key: 'light_ball_toss', label: 'Light-ball toss' } as const;

/**
 * The two demo sessions. Note: the clip generator flies its ball in still air, so the evening's
 * breeze blows across the field (90°): it adds nothing along the flight, exactly as the fit reads it.
 */
export const DEMO_SESSIONS: readonly DemoSessionPlan[] = [
  {
    key: 'sea-level-evening',
    date: '2025-10-07',
    venue: 'Saltmere Strand Field (sea level)',
    notes: 'Cool, damp evening by the sea, light breeze straight across the pitch. Kicking and throwing block after the warm-up.',
    conditions: {
      airTemperatureK: 9 + CELSIUS_ZERO_K,
      airPressurePa: 101_500,
      altitudeM: 0,
      relativeHumidityPct: 80,
      windSpeedMps: 2.5,
      windDirectionDeg: 90,
    },
    flights: [
      {
        key: 'isla-punt',
        athlete: 'Isla Brackwater',
        action: 'punt',
        ballId: 'football-5',
        launch: { speed: 19.5, angleDeg: 52, height: 0.8 },
        cd: 0.26,
        notes: 'Good height; the ball turned over late.',
        clip: { label: 'Isla — punt, seaward end', fileName: 'saltmere-isla-punt.mp4', width: 640, height: 360, captureFps: 60, seed: 21 },
        tracing: { source: 'auto', every: 1, noisePx: 0.25, seed: 101 },
      },
      {
        key: 'juno-handball-throw',
        athlete: 'Juno Pelham',
        action: 'long_throw',
        ballId: 'handball-3',
        launch: { speed: 17, angleDeg: 36, height: 1.9 },
        cd: 0.42,
        notes: 'Overarm throw from a three-step approach.',
        clip: { label: 'Juno — handball long throw', fileName: 'saltmere-juno-throw.mp4', width: 640, height: 360, captureFps: 60, seed: 22 },
        tracing: { source: 'manual', every: 2, noisePx: 0.4, seed: 102 },
      },
      {
        key: 'orrin-light-ball',
        athlete: 'Orrin Calloway',
        action: DEMO_CUSTOM_ACTION.key,
        ballId: 'table-tennis',
        launch: { speed: 11, angleDeg: 50, height: 1.5 },
        cd: 0.5,
        notes: 'Drag drill: a light ball thrown hard stalls and drops steeply. Filmed in slow motion.',
        clip: { label: 'Orrin — light-ball toss (slow motion)', fileName: 'saltmere-orrin-light-ball.mp4', width: 640, height: 360, captureFps: 120, playbackFps: 30, seed: 23 },
        tracing: { source: 'auto', every: 1, noisePx: 0.25, seed: 103 },
      },
    ],
  },
  {
    key: 'altitude-warm-day',
    date: '2025-07-19',
    venue: 'Korrow Heights Ground (1,600 m)',
    notes: 'Warm, dry midday at altitude; still air. Thin air: expect longer carries than at home.',
    conditions: {
      airTemperatureK: 29 + CELSIUS_ZERO_K,
      airPressurePa: null,
      altitudeM: 1600,
      relativeHumidityPct: 30,
      windSpeedMps: 0,
      windDirectionDeg: null,
    },
    flights: [
      {
        key: 'isla-drop-kick',
        athlete: 'Isla Brackwater',
        action: 'drop_kick',
        ballId: 'football-5',
        launch: { speed: 21, angleDeg: 45, height: 0.5 },
        cd: 0.24,
        notes: 'Clean contact off the half-volley.',
        clip: { label: 'Isla — drop kick', fileName: 'korrow-isla-drop-kick.mp4', width: 640, height: 360, captureFps: 60, seed: 31 },
        tracing: { source: 'auto', every: 1, noisePx: 0.25, seed: 201 },
      },
      {
        key: 'saskia-volleyball-serve',
        athlete: 'Saskia Fenwright',
        action: 'serve',
        ballId: 'volleyball',
        launch: { speed: 16, angleDeg: 30, height: 2.6 },
        cd: 0.36,
        notes: 'Jump float serve; no spin to speak of.',
        clip: { label: 'Saskia — volleyball float serve', fileName: 'korrow-saskia-serve.mp4', width: 640, height: 360, captureFps: 60, seed: 32 },
        tracing: { source: 'manual', every: 2, noisePx: 0.4, seed: 202 },
      },
    ],
  },
];

/** Free space kept around the flight in the picture (px). */
const MARGIN_PX = { right: 24, top: 18 };
/** Seconds filmed before the release and after the landing. */
const LEAD_IN_S = 0.25;
const TAIL_S = 0.35;

/** How a demo clip is laid out and how long it runs, from the flight it shows. */
export interface ClipLayout {
  width: number;
  height: number;
  captureFps: number;
  playbackFps: number;
  /** Whole pixels per metre in the plane of flight. */
  pxPerMetre: number;
  /** Ground point under the release (px). */
  launchXPx: number;
  groundYPx: number;
  /** Frame of the release: launch time = releaseFrame / captureFps exactly. */
  releaseFrame: number;
  durationS: number;
  /** Ball radius drawn (px): the catalogue diameter at the scene's scale. */
  ballRadiusPx: number;
  /** Drag factor k = κ·C_d (1/m) of the generator's a = −g·ŷ − k·|v|·v. */
  dragPerMetre: number;
  air: Air;
  /** The true flight, flown by the engine. */
  truth: FlightSummary;
}

/**
 * Lays out the clip of a demo flight: the engine flies the true launch in the session's air; the scale
 * is the largest whole number of pixels per metre that keeps carry and apex inside the picture.
 * @throws Error when the session's wind has a part along the flight (the generator flies in still air)
 */
export function clipLayout(session: DemoSessionPlan, flight: DemoFlightPlan): ClipLayout {
  if (Math.abs(windAlongFlight(session.conditions)) > 1e-9) {
    throw new Error(`Demo session "${session.key}": the clip generator flies in still air, so the wind must blow across the field (90° or 270°).`);
  }
  const { width, height, captureFps } = flight.clip;
  const air = sessionAir(session.conditions);
  const ball = ballProps(flight.ballId);
  const truth = simulateFlight(flight.launch, ball, air, { model: 'drag', cd: flight.cd }, { rtol: 1e-10 });
  const launchXPx = Math.round(width * 0.08);
  const groundYPx = Math.round(height * 0.85);
  const pxPerMetre = Math.floor(Math.min((width - launchXPx - MARGIN_PX.right) / truth.carry, (groundYPx - MARGIN_PX.top) / truth.apexHeight));
  const releaseFrame = Math.round(LEAD_IN_S * captureFps);
  const frames = Math.ceil((releaseFrame / captureFps + truth.flightTime + TAIL_S) * captureFps);
  return {
    width,
    height,
    captureFps,
    playbackFps: flight.clip.playbackFps ?? captureFps,
    pxPerMetre,
    launchXPx,
    groundYPx,
    releaseFrame,
    durationS: frames / captureFps,
    ballRadiusPx: (ball.diameterM * pxPerMetre) / 2,
    dragPerMetre: dragFactor(ball, air) * flight.cd,
    air,
    truth,
  };
}
