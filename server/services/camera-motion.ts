/**
 * A flight's camera motion: stored by auto-follow (one rigid map per frame to the reference frame), read back
 * to carry the traced points into the reference frame's pixels (the frame the calibration was marked on) for
 * metres and the fit, and shown on the Trace screen.
 */
import type { Transaction } from 'sequelize';
import { cameraMoved, type CameraFrameMotion, type CameraMotion } from '../../shared/schemas/camera-motion';
import type { ClubContext } from '../http/types';
import { FlightCameraMotion, type Calibration, type Clip } from '../models';
import type { StoredCameraMap } from '../models/flight-camera-motion';
import { applyRigid, composeRigid, IDENTITY, invertRigid, type Rigid } from '../video';
import { findVisibleFlightWithClip } from './visibility';

const DEG = 180 / Math.PI;
const round3 = (v: number) => Math.round(v * 1000) / 1000;

export interface FoundCameraMotion {
  referenceFrame: number;
  maps: Array<{ frame: number } & Rigid>;
}

const toRigid = (m: StoredCameraMap): Rigid => ({ tx: m[1], ty: m[2], rotRad: m[3] / DEG });

/** Where the picture centre of each frame points in the reference frame, and the roll, from its map. */
function frameMotion(m: StoredCameraMap, clip: Pick<Clip, 'width' | 'height'>): CameraFrameMotion {
  const cx = clip.width / 2, cy = clip.height / 2;
  const c = applyRigid(toRigid(m), cx, cy);
  return { frame: m[0], panXPx: round3(c.x - cx), panYPx: round3(c.y - cy), rollDeg: round3(m[3]) };
}

/** The compact stored form of the follower's maps, with the largest pan (at the picture centre) and roll. */
export function storedMotion(found: FoundCameraMotion, clip: Pick<Clip, 'width' | 'height'>) {
  const maps: StoredCameraMap[] = found.maps.map((m) => [m.frame, round3(m.tx), round3(m.ty), Math.round(m.rotRad * DEG * 1e4) / 1e4]);
  let maxPanPx = 0, maxRollDeg = 0;
  for (const m of maps) {
    const f = frameMotion(m, clip);
    maxPanPx = Math.max(maxPanPx, Math.hypot(f.panXPx, f.panYPx));
    if (Math.abs(f.rollDeg) > Math.abs(maxRollDeg)) maxRollDeg = f.rollDeg;
  }
  return { referenceFrame: found.referenceFrame, maps, maxPanPx: round3(maxPanPx), maxRollDeg: round3(maxRollDeg) };
}

/** Replaces the flight's camera motion (null: the follow took the camera as still, so none is kept). */
export async function writeCameraMotion(flightId: number, motion: ReturnType<typeof storedMotion> | null, transaction: Transaction): Promise<void> {
  await FlightCameraMotion.destroy({ where: { flightId }, transaction });
  if (motion) await FlightCameraMotion.create({ flightId, ...motion }, { transaction });
}

export async function cameraMotionOf(flightId: number, transaction?: Transaction): Promise<FlightCameraMotion | null> {
  return FlightCameraMotion.findOne({ where: { flightId }, transaction });
}

/**
 * Maps a frame's pixels into the reference frame: the calibration's frame when it has one, else the frame the
 * motion was found for. Frames outside the motion found take the nearest frame's map (the camera is taken to
 * have stopped there). Without motion (or with less than the thresholds of shared/schemas/camera-motion.ts)
 * every frame is the reference frame.
 */
export function referenceMapper(motion: FlightCameraMotion | null, cal: Calibration | null): (frame: number, x: number, y: number) => { x: number; y: number } {
  // Motion below the thresholds is the estimate's own noise on a steady camera: the points stay as traced.
  if (!motion || motion.maps.length === 0 || !cameraMoved(motion.maxPanPx, motion.maxRollDeg)) return (_frame, x, y) => ({ x, y });
  const maps = [...motion.maps].sort((a, b) => a[0] - b[0]);
  const byFrame = new Map(maps.map((m) => [m[0], toRigid(m)]));
  const first = maps[0]!, last = maps[maps.length - 1]!;
  const mapOf = (frame: number): Rigid => byFrame.get(frame) ?? toRigid(frame <= first[0] ? first : frame >= last[0] ? last : nearest(maps, frame));
  const calFrame = cal?.input.frame;
  // A calibration marked on another frame than the motion's reference: chain through that frame's map.
  const rebase = calFrame !== null && calFrame !== undefined && calFrame !== motion.referenceFrame ? invertRigid(mapOf(calFrame)) : IDENTITY;
  return (frame, x, y) => applyRigid(composeRigid(rebase, mapOf(frame)), x, y);
}

function nearest(maps: StoredCameraMap[], frame: number): StoredCameraMap {
  let best = maps[0]!;
  for (const m of maps) if (Math.abs(m[0] - frame) < Math.abs(best[0] - frame)) best = m;
  return best;
}

/** The camera motion of a flight as the Trace screen shows it. */
export async function getCameraMotion(club: ClubContext, flightId: number): Promise<CameraMotion> {
  const { flight, clip } = await findVisibleFlightWithClip(club, flightId);
  const motion = await cameraMotionOf(flight.id);
  return {
    flightId: flight.id,
    cameraStill: clip.cameraStill,
    estimated: motion !== null,
    referenceFrame: motion?.referenceFrame ?? null,
    moved: motion ? cameraMoved(motion.maxPanPx, motion.maxRollDeg) : false,
    maxPanPx: motion?.maxPanPx ?? 0,
    maxRollDeg: motion?.maxRollDeg ?? 0,
    frames: motion ? [...motion.maps].sort((a, b) => a[0] - b[0]).map((m) => frameMotion(m, clip)) : [],
  };
}
