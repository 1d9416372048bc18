/**
 * Renders the clip of a demo flight with the video engine's generator (server/video/synth.ts) and
 * derives what a coach would have entered for it: the traced ball centres (the generator's truth with
 * a little tracing error) and a calibration consistent with how the clip was drawn.
 */
import { rm } from 'node:fs/promises';
import { join } from 'node:path';
import { mulberry32, normalGenerator } from '../../../shared/physics';
import type { ScaleCalibrationInput } from '../../../shared/schemas/calibration';
import type { TrackPointInput } from '../../../shared/schemas/track';
import { probeClip, type ClipProbe } from '../../video';
import { renderFlightClip, type FlightTruth } from '../../video/synth';
import { ffmpegPath, ffprobePath, lastErrorLine, runTool } from '../../video/tools';
import { clipLayout, type ClipLayout, type DemoFlightPlan, type DemoSessionPlan } from './plan';

export interface RenderedDemoClip {
  session: DemoSessionPlan;
  flight: DemoFlightPlan;
  layout: ClipLayout;
  videoPath: string;
  probe: ClipProbe;
  /** The flight's frame range: from the release to the landing (or the clip's last frame). */
  frameStart: number;
  frameEnd: number;
  points: TrackPointInput[];
  calibration: ScaleCalibrationInput;
}

/** Known distances a coach would pace out along the ground, longest first (m). */
const SCALE_DISTANCES_M = [20, 10, 5, 2, 1];

/**
 * The calibration of a rendered clip: a whole number of metres along the ground from the point under
 * the release, a level line across the picture at ground height, and the ball's drawn diameter.
 */
export function demoCalibration(layout: Pick<ClipLayout, 'launchXPx' | 'groundYPx' | 'pxPerMetre' | 'width' | 'ballRadiusPx'>, ballId: string): ScaleCalibrationInput {
  const { launchXPx: x0, groundYPx: y0, pxPerMetre, width } = layout;
  const room = width - 8 - x0;
  const distanceM = SCALE_DISTANCES_M.find((d) => d * pxPerMetre <= room) ?? room / pxPerMetre;
  return {
    method: 'scale',
    scale: { a: { xPx: x0, yPx: y0 }, b: { xPx: x0 + distanceM * pxPerMetre, yPx: y0 }, distanceM },
    level: { a: { xPx: 8, yPx: y0 }, b: { xPx: width - 8, yPx: y0 } },
    origin: { xPx: x0, yPx: y0 },
    direction: 'right',
    // A coach reads the ball's size off the picture to a tenth of a pixel at best.
    ball: { ballId, diameterPx: Math.round(20 * layout.ballRadiusPx) / 10 },
  };
}

/**
 * Traced points from the generator's truth: the release frame and every frame the ball is in the air
 * and wholly in the picture (every `every`-th for manual tracing), each moved by a seeded normal error.
 */
export function demoPoints(truth: FlightTruth, releaseFrame: number, flight: DemoFlightPlan): TrackPointInput[] {
  const { source, every, noisePx, seed } = flight.tracing;
  const uniform = mulberry32(seed);
  const normal = normalGenerator(uniform);
  const out: TrackPointInput[] = [];
  for (const f of truth.frames) {
    if (f.frame < releaseFrame || !f.visible || (f.frame > releaseFrame && !f.airborne)) continue;
    if ((f.frame - releaseFrame) % every !== 0) continue;
    const xPx = f.x + noisePx * normal();
    const yPx = f.y + noisePx * normal();
    out.push(
      source === 'auto'
        ? { frame: f.frame, xPx, yPx, radiusPx: truth.ballRadiusPx, source, confidence: Math.round(1000 * (0.86 + 0.13 * uniform())) / 1000 }
        : { frame: f.frame, xPx, yPx, radiusPx: null, source, confidence: null },
    );
  }
  return out;
}

/**
 * Fails with the video engine's message when ffmpeg or ffprobe cannot be started.
 * Note: checked up front because the generator, fed by a pipe, does not report a missing ffmpeg as a rejection.
 */
export async function checkVideoTools(): Promise<void> {
  for (const path of [ffmpegPath(), ffprobePath()]) {
    const res = await runTool(path, ['-version']);
    if (res.code !== 0) throw new Error(`${path} -version failed: ${lastErrorLine(res.stderr) || `exit code ${res.code}`}.`);
  }
}

/**
 * Renders one demo flight's clip into `dir` and probes it as an upload would be probed.
 * @throws Error when ffmpeg cannot render or read the clip
 */
export async function renderDemoClip(dir: string, session: DemoSessionPlan, flight: DemoFlightPlan): Promise<RenderedDemoClip> {
  const layout = clipLayout(session, flight);
  const videoPath = join(dir, flight.clip.fileName);
  const { truth, truthPath } = await renderFlightClip(videoPath, {
    width: layout.width,
    height: layout.height,
    captureFps: layout.captureFps,
    playbackFps: layout.playbackFps,
    durationS: layout.durationS,
    ballRadiusPx: layout.ballRadiusPx,
    pxPerMetre: layout.pxPerMetre,
    launchXPx: layout.launchXPx,
    groundYPx: layout.groundYPx,
    launchHeightM: flight.launch.height,
    speedMps: flight.launch.speed,
    angleDeg: flight.launch.angleDeg,
    launchTimeS: layout.releaseFrame / layout.captureFps,
    dragPerMetre: layout.dragPerMetre,
    seed: flight.clip.seed,
    preset: 'veryfast',
    crf: 20,
  });
  await rm(truthPath, { force: true });
  const probe = await probeClip(videoPath);
  const points = demoPoints(truth, layout.releaseFrame, flight);
  const frameEnd = Math.min(probe.frameCount - 1, truth.landingFrame ?? probe.frameCount - 1);
  return {
    session,
    flight,
    layout,
    videoPath,
    probe,
    frameStart: layout.releaseFrame,
    frameEnd,
    points,
    calibration: demoCalibration(layout, flight.ballId),
  };
}
