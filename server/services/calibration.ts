/**
 * Calibration of clips: stores each calibration (the previous one is kept, superseded, for the fits
 * that used it), answers the current one, and enqueues refits of the clip's flights on a change.
 */
import { Op, type Transaction } from 'sequelize';
import { ballCheck, computeCalibration, OFF_PICTURE_LIMIT } from '../../shared/calibration/geometry';
import {
  type BallCheck,
  type Calibration as CalibrationDto,
  type CalibrationFrame,
  type CalibrationInput,
  type PixelPoint,
} from '../../shared/schemas/calibration';
import { withTransaction } from '../db';
import { ApiError } from '../http/errors';
import type { ClubContext } from '../http/types';
import { Calibration, Clip } from '../models';
import { resolveFlightBall } from './balls';
import { enqueueRefits } from './refits';
import { findVisibleClip } from './visibility';

export function toCalibrationDto(cal: Calibration): CalibrationDto {
  const { method: _method, ...frame } = computeCalibration(cal.input);
  // Calibrations stored before the plane method carry no method: they are two-point scales.
  const input = cal.input.method === 'plane' ? cal.input : { ...cal.input, method: 'scale' as const, level: cal.input.level ?? null };
  return {
    ...input,
    ball: input.ball ?? null,
    ...frame,
    id: cal.id,
    clipId: cal.clipId,
    ballCheck: cal.ballCheck ?? null,
    updatedAt: cal.updatedAt.toISOString(),
  };
}

/** Current calibrations of several clips. */
export async function currentCalibrations(clipIds: number[], transaction?: Transaction): Promise<Map<number, Calibration>> {
  const out = new Map<number, Calibration>();
  if (clipIds.length === 0) return out;
  const rows = await Calibration.findAll({ where: { clipId: { [Op.in]: clipIds }, supersededAt: null }, order: [['id', 'DESC']], transaction });
  for (const row of rows) if (!out.has(row.clipId)) out.set(row.clipId, row);
  return out;
}

export async function currentCalibration(clipId: number, transaction?: Transaction): Promise<Calibration | null> {
  return (await currentCalibrations([clipId], transaction)).get(clipId) ?? null;
}

/** The mapping of a stored calibration. */
export function frameOf(cal: Calibration): CalibrationFrame {
  return computeCalibration(cal.input);
}

/**
 * What is stored beside a calibration's input: metres per pixel, the level angle and the ball's size check.
 * @param clubId the club whose own balls count beside the catalogue
 * @throws ApiError VALIDATION_FAILED when the size check names a ball that is in neither
 */
export async function calibrationValues(clubId: number, input: CalibrationInput): Promise<{ metresPerPixel: number; levelAngleDeg: number; ballCheck: BallCheck | null }> {
  const frame = computeCalibration(input);
  let check: BallCheck | null = null;
  if (input.ball) {
    const ball = await resolveFlightBall(clubId, input.ball.ballId);
    if (!ball) {
      throw new ApiError('VALIDATION_FAILED', `Unknown ball "${input.ball.ballId}" for the size check: pick a ball from the catalogue or the club's balls.`, {
        'ball.ballId': 'Pick a ball from the catalogue or the club’s balls.',
      });
    }
    check = ballCheck(input.ball.ballId, frame.metresPerPixel, input.ball.diameterPx, ball.diameterM);
  }
  return { metresPerPixel: frame.metresPerPixel, levelAngleDeg: frame.levelAngleDeg, ballCheck: check };
}

/**
 * Points may lie off the picture (the ground below a tight framing, the far end of a known distance), but
 * not farther than {@link OFF_PICTURE_LIMIT} picture widths or heights from it: that far no one can place them.
 */
function checkNear(clip: Clip, input: CalibrationInput): void {
  const fields: Record<string, string> = {};
  const w = clip.width * OFF_PICTURE_LIMIT, h = clip.height * OFF_PICTURE_LIMIT;
  const check = (path: string, p: PixelPoint) => {
    if (p.xPx < -w || p.yPx < -h || p.xPx > clip.width + w || p.yPx > clip.height + h) {
      fields[path] = `This point (${Math.round(p.xPx)}, ${Math.round(p.yPx)}) lies more than a picture's width or height outside the ${clip.width}×${clip.height} frame, too far to place with any accuracy: mark a nearer point, or a level line on the picture and give its height above the ground.`;
    }
  };
  if (input.method === 'plane') {
    input.plane.corners.forEach((p, i) => check(`plane.corners.${i}`, p));
  } else {
    check('scale.a', input.scale.a);
    check('scale.b', input.scale.b);
    if (input.level) {
      check('level.a', input.level.a);
      check('level.b', input.level.b);
    }
  }
  check('origin', input.origin);
  if (input.frame !== null && input.frame !== undefined && clip.frameCount !== null && input.frame >= clip.frameCount) {
    fields.frame = `Frame ${input.frame} is past the clip's last frame ${clip.frameCount - 1}: give the frame the calibration was marked on.`;
  }
  const names = Object.keys(fields);
  if (names.length > 0) throw new ApiError('VALIDATION_FAILED', `Check ${names.join(', ')}. ${fields[names[0]]}`, fields);
}

export async function getCalibration(club: ClubContext, clipId: number): Promise<CalibrationDto | null> {
  const clip = await findVisibleClip(club, clipId);
  const cal = await currentCalibration(clip.id);
  return cal ? toCalibrationDto(cal) : null;
}

/**
 * Stores a new calibration of the clip and enqueues refits of its traced and fitted flights.
 * @returns the calibration and the ids of the refit jobs
 */
export async function setCalibration(club: ClubContext, clipId: number, input: CalibrationInput): Promise<CalibrationDto & { refitJobIds: number[] }> {
  const clip = await findVisibleClip(club, clipId);
  checkNear(clip, input);
  const values = await calibrationValues(club.id, input);
  const { cal, jobIds } = await withTransaction(
    async (transaction) => {
      // The clip's row is locked first so that two new calibrations of one clip take turns.
      await Clip.findByPk(clip.id, { transaction, lock: transaction.LOCK.UPDATE });
      await Calibration.update({ supersededAt: new Date() }, { where: { clipId: clip.id, supersededAt: null }, transaction });
      const created = await Calibration.create({ clubId: club.id, clipId: clip.id, input, ...values, supersededAt: null }, { transaction });
      const ids = await enqueueRefits(club.id, { clipId: clip.id }, transaction);
      return { cal: created, jobIds: ids };
    },
    { readCommitted: true },
  );
  return { ...toCalibrationDto(cal), refitJobIds: jobIds };
}

export async function deleteCalibration(club: ClubContext, clipId: number): Promise<void> {
  const clip = await findVisibleClip(club, clipId);
  await Calibration.update({ supersededAt: new Date() }, { where: { clipId: clip.id, supersededAt: null } });
}
