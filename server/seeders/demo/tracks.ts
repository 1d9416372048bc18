/**
 * The demo reps seeded as traced tracks without footage: rendering a clip for each of them would take the
 * first start past two minutes, so only a few flights per session are rendered (./render.ts) and the rest
 * are the engine's own flight in the session's air and wind, put into the pixels of a 1280 × 720 picture
 * with a little tracing error, as if a coach had imported the track. Their fits run in the worker with the
 * real engine, like every other fit. A few reps carry a fault a coach meets in practice (plan.ts).
 */
import { ballProps, generateTrack, mulberry32, normalGenerator, simulateFlight, type Launch } from '../../../shared/physics';
import type { CalibrationInput } from '../../../shared/schemas/calibration';
import { DEFAULT_FLIGHT_ACTIONS } from '../../../shared/schemas/flight';
import type { TrackPointInput } from '../../../shared/schemas/track';
import { sessionAir, windAlongFlight } from '../../services/fit-input';
import { DEMO_CUSTOM_ACTIONS, type DemoBlockPlan, type DemoFault, type DemoSessionPlan } from './plan';
import { demoCalibration } from './render';

const WIDTH = 1280;
const HEIGHT = 720;
const FPS = 60;
/** The phone's slow-motion rate in the clip whose capture rate was left at the playback rate. */
const SLOW_MOTION_FPS = 120;
const PLAYBACK_FPS = 30;
const MARGIN_PX = { right: 24, top: 18 };
const LEAD_IN_S = 0.25;
const TAIL_S = 0.35;
/** Tracing error per pixel coordinate (px): auto-follow is steadier than clicks. */
const NOISE_PX = { auto: 0.3, manual: 0.45 };
/** Points left when the ball leaves the picture early (a fit needs five). */
const POINTS_BEFORE_LEAVING = 4;
/** The reference distance typed 12 % long: every length, gravity included, reads 12 % short. */
const SCALE_SHORT_FACTOR = 1.12;

export interface SeededDemoTrack {
  session: DemoSessionPlan;
  block: DemoBlockPlan;
  /** Stable name within the demo (logs and tests). */
  key: string;
  /** Rep number within the athlete's block in the session (after any rendered rep). */
  rep: number;
  /** The true launch of this rep. */
  launch: Launch;
  fault: DemoFault | null;
  clip: { label: string; fileName: string; width: number; height: number; captureFps: number; playbackFps: number; frameCount: number };
  frameStart: number;
  frameEnd: number;
  points: TrackPointInput[];
  calibration: CalibrationInput;
}

function actionWords(key: string): string {
  const label = [...DEFAULT_FLIGHT_ACTIONS, ...DEMO_CUSTOM_ACTIONS].find((a) => a.key === key)?.label ?? key.replace(/_/g, ' ');
  return label.toLowerCase();
}

function slug(text: string): string {
  return text.toLowerCase().replace(/[^a-z0-9]+/g, '-').replace(/^-|-$/g, '');
}

/** One rep: the true flight in the session's air and wind, traced in the pixels of its picture. */
function seedRep(session: DemoSessionPlan, block: DemoBlockPlan, r: number, launch: Launch, seed: number): SeededDemoTrack {
  const fault = block.faults?.[r] ?? null;
  const rep = repOffset(session, block) + r;
  const air = sessionAir(session.conditions);
  const windSpeed = windAlongFlight(session.conditions);
  const aero = { model: 'drag' as const, cd: block.cd };
  const truth = simulateFlight(launch, ballProps(block.ballId), air, aero, { windSpeed, rtol: 1e-10 });
  const trueFps = fault === 'slow-motion-uncorrected' ? SLOW_MOTION_FPS : FPS;
  const launchXPx = Math.round(WIDTH * 0.08);
  const groundYPx = Math.round(HEIGHT * 0.85);
  const pxPerMetre = Math.floor(Math.min((WIDTH - launchXPx - MARGIN_PX.right) / truth.carry, (groundYPx - MARGIN_PX.top) / truth.apexHeight));
  const track = generateTrack({ launch, ball: block.ballId, air, aero, windSpeed, fps: trueFps });
  const releaseFrame = Math.round(LEAD_IN_S * trueFps);
  const every = block.tracing === 'manual' ? 2 : 1;
  const normal = normalGenerator(mulberry32(seed));
  const uniform = mulberry32(seed + 1);
  const noise = NOISE_PX[block.tracing];
  let points: TrackPointInput[] = [];
  // Note: the sampled path can end with a sample at the origin when the landing falls on a frame; the
  // tracing stops at the last sample that is still on its way forward.
  let samples = 1;
  while (samples < track.t.length && track.x[samples]! > track.x[samples - 1]!) samples += 1;
  for (let i = 0; i < samples; i += every) {
    const xPx = launchXPx + track.x[i]! * pxPerMetre + noise * normal();
    const yPx = groundYPx - track.y[i]! * pxPerMetre + noise * normal();
    points.push(
      block.tracing === 'auto'
        ? { frame: releaseFrame + i, xPx, yPx, radiusPx: null, source: 'auto', confidence: Math.round(1000 * (0.86 + 0.13 * uniform())) / 1000 }
        : { frame: releaseFrame + i, xPx, yPx, radiusPx: null, source: 'manual', confidence: null },
    );
  }
  if (fault === 'left-picture') points = points.slice(0, POINTS_BEFORE_LEAVING);
  const landingFrame = releaseFrame + samples - 1;
  const frameCount = landingFrame + 1 + Math.round(TAIL_S * trueFps);
  const ballRadiusPx = (ballProps(block.ballId).diameterM * pxPerMetre) / 2;
  const calibration = demoCalibration({ launchXPx, groundYPx, pxPerMetre, width: WIDTH, ballRadiusPx }, block.ballId);
  if (fault === 'scale-short') calibration.scale = { ...calibration.scale, distanceM: calibration.scale.distanceM * SCALE_SHORT_FACTOR };
  const first = block.athlete.split(' ')[0]!;
  const storedFps = fault === 'slow-motion-uncorrected' ? PLAYBACK_FPS : trueFps;
  return {
    session,
    block,
    key: `${session.key}-${slug(block.athlete)}-${slug(block.action)}-${slug(block.ballId)}-${rep}`,
    rep,
    launch,
    fault,
    clip: {
      label: `${first} — ${actionWords(block.action)} ${rep} (track without footage)`,
      fileName: `${slug(session.key)}-${slug(first)}-${slug(block.action)}-${rep}.mp4`,
      width: WIDTH,
      height: HEIGHT,
      captureFps: storedFps,
      playbackFps: fault === 'slow-motion-uncorrected' ? PLAYBACK_FPS : trueFps,
      frameCount,
    },
    frameStart: releaseFrame,
    frameEnd: Math.min(frameCount - 1, landingFrame),
    points,
    calibration,
  };
}

/** Rendered reps of the same athlete, action and ball in the session: the seeded reps are numbered after them. */
function repOffset(session: DemoSessionPlan, block: DemoBlockPlan): number {
  return session.flights.filter((f) => f.athlete === block.athlete && f.action === block.action && f.ballId === block.ballId).length;
}

/**
 * Every seeded rep of a session. Each rep's launch varies around the block's (speed by about 2 %, angle by
 * about 1.5°), from a seed of its own, so every run seeds the same reps.
 */
export function seededTracks(session: DemoSessionPlan): SeededDemoTrack[] {
  const out: SeededDemoTrack[] = [];
  session.blocks.forEach((block, b) => {
    const seedBase = [...session.key].reduce((h, c) => (h * 31 + c.charCodeAt(0)) >>> 0, 7) + b * 101;
    const normal = normalGenerator(mulberry32(seedBase));
    for (let r = 1; r <= block.reps; r += 1) {
      const launch: Launch = {
        speed: block.launch.speed * (1 + Math.max(-0.05, Math.min(0.05, 0.02 * normal()))),
        angleDeg: block.launch.angleDeg + Math.max(-3, Math.min(3, 1.5 * normal())),
        height: block.launch.height,
      };
      out.push(seedRep(session, block, r, launch, seedBase + r * 17));
    }
  });
  return out;
}
