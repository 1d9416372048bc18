/**
 * The demo flights of the invented "Fennick Vale Sporting Club": a month of training in four sessions in
 * clearly different air (cool and damp by the sea, warm and thin at 1,600 m, a frosty high-pressure
 * morning with a tailwind, a hot stormy afternoon into a headwind), dated back from the day the club is
 * seeded. A few flights per session are rendered as clips by the video generator (`flights`); the other
 * reps (`blocks`) are seeded as traced tracks without footage (./tracks.ts). Pure data plus the layout
 * each clip is rendered with, derived from the flight engine (shared/physics) so that the picture holds
 * the whole flight and the ball is drawn at its true size for the calibration's scale.
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

/** What went wrong with a seeded rep, as a coach would meet it: the fit flags it or cannot run. */
export type DemoFault =
  /** The reference distance was paced out 12 % short: gravity disagrees with the scale. */
  | 'scale-short'
  /** A slow-motion clip (120 frames/s) whose capture rate was left at the playback rate (30). */
  | 'slow-motion-uncorrected'
  /** The ball left the picture after a few frames: too few points to fit. */
  | 'left-picture';

/** Several reps of one athlete, action and ball in a session, seeded as tracks (no footage). */
export interface DemoBlockPlan {
  athlete: string;
  action: string;
  ballId: string;
  reps: number;
  /** The rep's launch varies around this one (seeded, a few per cent). */
  launch: Launch;
  cd: number;
  tracing: 'auto' | 'manual';
  /** Faults of single reps, by rep number (1-based). */
  faults?: Record<number, DemoFault>;
}

export interface DemoSessionPlan {
  key: string;
  date: string;
  venue: string;
  notes: string;
  /** SI, as stored: kelvin, pascals, metres, per cent, m/s, degrees (direction the wind blows towards; 0 = along the flight). */
  conditions: Conditions;
  /** Flights rendered as clips (the generator flies in still air: only sessions without wind along the flight). */
  flights: DemoFlightPlan[];
  blocks: DemoBlockPlan[];
}

/** The date `days` before `now` (UTC), as sessions store it. */
export function daysBefore(days: number, now = new Date()): string {
  return new Date(Date.UTC(now.getUTCFullYear(), now.getUTCMonth(), now.getUTCDate() - days)).toISOString().slice(0, 10);
}

/** An action the demo club added to its list (the defaults do not name a light-ball drill). */
export const DEMO_CUSTOM_ACTION = { key: 'light_ball_toss', label: 'Light-ball toss' } as const;
/** Its counterpart with a heavy ball of (nearly) the same size, thrown the same way: drag hardly shows. */
export const DEMO_HEAVY_ACTION = { key: 'heavy_ball_toss', label: 'Heavy-ball toss' } as const;
/** The actions the demo club added to the default list. */
export const DEMO_CUSTOM_ACTIONS = [DEMO_CUSTOM_ACTION, DEMO_HEAVY_ACTION] as const;

/**
 * The two demo sessions. Note: the clip generator flies its ball in still air, so the evening's
 * breeze blows across the field (90°): it adds nothing along the flight, exactly as the fit reads it.
 */
export const DEMO_SESSIONS: readonly DemoSessionPlan[] = [
  {
    key: 'sea-level-evening',
    date: daysBefore(25),
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
    blocks: [
      { athlete: 'Isla Brackwater', action: 'punt', ballId: 'football-5', reps: 3, launch: { speed: 19.4, angleDeg: 51, height: 0.8 }, cd: 0.26, tracing: 'auto' },
      { athlete: 'Juno Pelham', action: 'long_throw', ballId: 'handball-3', reps: 3, launch: { speed: 16.8, angleDeg: 35, height: 1.9 }, cd: 0.42, tracing: 'manual' },
      { athlete: 'Orrin Calloway', action: DEMO_CUSTOM_ACTION.key, ballId: 'table-tennis', reps: 3, launch: { speed: 11, angleDeg: 50, height: 1.5 }, cd: 0.5, tracing: 'auto' },
      { athlete: 'Orrin Calloway', action: DEMO_HEAVY_ACTION.key, ballId: 'golf', reps: 4, launch: { speed: 11, angleDeg: 50, height: 1.5 }, cd: 0.3, tracing: 'auto' },
      { athlete: 'Bram Tolliver', action: 'shot_put', ballId: 'shot-men', reps: 4, launch: { speed: 11.6, angleDeg: 37, height: 2.1 }, cd: 0.47, tracing: 'auto' },
    ],
  },
  {
    key: 'altitude-warm-day',
    date: daysBefore(18),
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
    blocks: [
      { athlete: 'Isla Brackwater', action: 'drop_kick', ballId: 'football-5', reps: 3, launch: { speed: 21, angleDeg: 45, height: 0.5 }, cd: 0.24, tracing: 'auto' },
      { athlete: 'Saskia Fenwright', action: 'serve', ballId: 'volleyball', reps: 3, launch: { speed: 16, angleDeg: 30, height: 2.6 }, cd: 0.36, tracing: 'manual' },
      { athlete: 'Wren Ashcombe', action: 'shot_put', ballId: 'shot-women', reps: 4, launch: { speed: 11.2, angleDeg: 36, height: 1.9 }, cd: 0.47, tracing: 'auto' },
      {
        athlete: 'Cato Merriweather', action: 'goal_kick', ballId: 'football-5', reps: 4, launch: { speed: 25, angleDeg: 38, height: 0.11 }, cd: 0.24, tracing: 'auto',
        faults: { 4: 'slow-motion-uncorrected' },
      },
    ],
  },
  {
    key: 'frosty-tailwind-morning',
    date: daysBefore(10),
    venue: 'Fennick Vale Home Pitch (90 m)',
    notes: 'Frosty clear morning under high pressure; steady breeze from behind the kickers all session.',
    conditions: {
      airTemperatureK: 2 + CELSIUS_ZERO_K,
      airPressurePa: 103_200,
      altitudeM: 90,
      relativeHumidityPct: 85,
      windSpeedMps: 4,
      windDirectionDeg: 0,
    },
    flights: [],
    blocks: [
      { athlete: 'Isla Brackwater', action: 'punt', ballId: 'football-5', reps: 4, launch: { speed: 20.1, angleDeg: 50, height: 0.8 }, cd: 0.26, tracing: 'auto' },
      { athlete: 'Cato Merriweather', action: 'goal_kick', ballId: 'football-5', reps: 4, launch: { speed: 25.5, angleDeg: 37, height: 0.11 }, cd: 0.24, tracing: 'auto' },
      { athlete: 'Perrin Oakhurst', action: 'shot_put', ballId: 'shot-men', reps: 3, launch: { speed: 10.4, angleDeg: 38, height: 2 }, cd: 0.47, tracing: 'auto' },
      {
        athlete: 'Elspeth Rook', action: 'long_throw', ballId: 'handball-3', reps: 4, launch: { speed: 19, angleDeg: 34, height: 1.9 }, cd: 0.42, tracing: 'manual',
        faults: { 3: 'scale-short' },
      },
      { athlete: 'Saskia Fenwright', action: 'serve', ballId: 'volleyball', reps: 3, launch: { speed: 16.5, angleDeg: 29, height: 2.6 }, cd: 0.36, tracing: 'manual' },
    ],
  },
  {
    key: 'stormy-headwind-afternoon',
    date: daysBefore(3),
    venue: 'Brackenfold Bay Sports Park (sea level)',
    notes: 'Hot, humid afternoon with a storm front coming in: low pressure and a gusty headwind into the throws.',
    conditions: {
      airTemperatureK: 31 + CELSIUS_ZERO_K,
      airPressurePa: 99_100,
      altitudeM: 15,
      relativeHumidityPct: 70,
      windSpeedMps: 5,
      windDirectionDeg: 180,
    },
    flights: [],
    blocks: [
      { athlete: 'Isla Brackwater', action: 'punt', ballId: 'football-5', reps: 5, launch: { speed: 20.6, angleDeg: 49, height: 0.8 }, cd: 0.26, tracing: 'auto' },
      { athlete: 'Juno Pelham', action: 'long_throw', ballId: 'handball-3', reps: 4, launch: { speed: 17.4, angleDeg: 35, height: 1.9 }, cd: 0.42, tracing: 'manual' },
      { athlete: 'Orrin Calloway', action: DEMO_CUSTOM_ACTION.key, ballId: 'table-tennis', reps: 3, launch: { speed: 11.5, angleDeg: 48, height: 1.5 }, cd: 0.5, tracing: 'auto' },
      {
        athlete: 'Orrin Calloway', action: DEMO_HEAVY_ACTION.key, ballId: 'golf', reps: 4, launch: { speed: 11.5, angleDeg: 48, height: 1.5 }, cd: 0.3, tracing: 'auto',
        faults: { 2: 'left-picture' },
      },
      { athlete: 'Bram Tolliver', action: 'shot_put', ballId: 'shot-men', reps: 4, launch: { speed: 11.9, angleDeg: 37, height: 2.1 }, cd: 0.47, tracing: 'auto' },
      { athlete: 'Nell Hawthorne', action: 'place_kick', ballId: 'rugby', reps: 4, launch: { speed: 24, angleDeg: 36, height: 0.2 }, cd: 0.2, tracing: 'auto' },
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
