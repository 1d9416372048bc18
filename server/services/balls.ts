/**
 * A club's own balls beside the catalogue: coaches and admins add and edit them, every member reads
 * them. Also the one place a flight's `ballId` (catalogue id or `club:<id>`) becomes what the physics
 * needs, so a flight is refused when it is created with a ball that is in neither.
 */
import { Op, type Transaction } from 'sequelize';
import { BALLS, ballProps, type BallProps } from '../../shared/physics';
import {
  clubBallCdRangeIssue,
  clubBallId,
  parseClubBallId,
  type ClubBall as ClubBallDto,
  type ClubBallInput,
  type ClubBallPatch,
} from '../../shared/schemas/ball';
import { withTransaction } from '../db';
import { ApiError, notFound } from '../http/errors';
import type { ClubContext } from '../http/types';
import { ClubBall, Flight } from '../models';
import { enqueueRefits } from './refits';

function toDto(ball: ClubBall, flightCount: number): ClubBallDto {
  return {
    id: ball.id,
    ballId: clubBallId(ball.id),
    name: ball.name,
    massKg: ball.massKg,
    diameterM: ball.diameterM,
    cdMin: ball.cdMin ?? null,
    cdMax: ball.cdMax ?? null,
    flightCount,
    createdAt: ball.createdAt.toISOString(),
    updatedAt: ball.updatedAt.toISOString(),
  };
}

async function flightCounts(clubId: number, balls: ClubBall[]): Promise<Map<string, number>> {
  const out = new Map<string, number>();
  if (balls.length === 0) return out;
  const rows = (await Flight.count({
    where: { clubId, ballId: { [Op.in]: balls.map((b) => clubBallId(b.id)) } },
    group: ['ballId'],
  })) as unknown as { ballId: string; count: number }[];
  for (const r of rows) out.set(r.ballId, Number(r.count));
  return out;
}

export async function listClubBalls(club: ClubContext): Promise<ClubBallDto[]> {
  const balls = await ClubBall.findAll({ where: { clubId: club.id }, order: [['name', 'ASC'], ['id', 'ASC']] });
  const counts = await flightCounts(club.id, balls);
  return balls.map((b) => toDto(b, counts.get(clubBallId(b.id)) ?? 0));
}

async function findBall(club: ClubContext, id: number, transaction?: Transaction): Promise<ClubBall> {
  const ball = await ClubBall.findOne({ where: { id, clubId: club.id }, transaction });
  if (!ball) throw notFound('ball');
  return ball;
}

/** A catalogue name or another club ball's name would make the pick list ambiguous. */
async function checkName(club: ClubContext, name: string, exceptId: number | null, transaction: Transaction): Promise<void> {
  const catalogue = Object.values(BALLS).find((b) => b.name.toLowerCase() === name.toLowerCase());
  if (catalogue) {
    throw new ApiError('CONFLICT', `"${catalogue.name}" is a catalogue ball already: pick it from the catalogue, or give your ball another name.`, {
      name: 'The catalogue has a ball of this name.',
    });
  }
  // The column's collation compares without case, so "Play ball" and "play ball" clash.
  const existing = await ClubBall.findOne({ where: { clubId: club.id, name }, transaction });
  if (existing && existing.id !== exceptId) throw nameTaken(existing.name);
}

function duplicateRace(err: unknown): boolean {
  return err instanceof Error && err.name === 'SequelizeUniqueConstraintError';
}

function nameTaken(name: string): ApiError {
  return new ApiError('CONFLICT', `The club already has a ball called "${name}": give this one another name, or edit that one.`, {
    name: 'The club already has a ball of this name.',
  });
}

export async function createClubBall(club: ClubContext, input: ClubBallInput): Promise<ClubBallDto> {
  try {
    const ball = await withTransaction(async (transaction) => {
      await checkName(club, input.name, null, transaction);
      return ClubBall.create(
        { clubId: club.id, name: input.name, massKg: input.massKg, diameterM: input.diameterM, cdMin: input.cdMin ?? null, cdMax: input.cdMax ?? null },
        { transaction },
      );
    });
    return toDto(ball, 0);
  } catch (err) {
    if (duplicateRace(err)) throw nameTaken(input.name);
    throw err;
  }
}

/**
 * Edits a club ball; a new mass, diameter or C_d range changes every fit of its flights, so those are refitted.
 * @returns the ball and the ids of the refit jobs
 */
export async function patchClubBall(club: ClubContext, id: number, patch: ClubBallPatch): Promise<ClubBallDto & { refitJobIds: number[] }> {
  try {
    const { ball, jobIds } = await withTransaction(async (transaction) => {
      const ball = await findBall(club, id, transaction);
      if (patch.name !== undefined && patch.name !== ball.name) await checkName(club, patch.name, ball.id, transaction);
      const next = {
        cdMin: patch.cdMin !== undefined ? patch.cdMin : ball.cdMin,
        cdMax: patch.cdMax !== undefined ? patch.cdMax : ball.cdMax,
      };
      const issue = clubBallCdRangeIssue(next);
      if (issue) throw new ApiError('VALIDATION_FAILED', issue, { cdMax: issue });
      const physicsChanged =
        (patch.massKg !== undefined && patch.massKg !== ball.massKg) ||
        (patch.diameterM !== undefined && patch.diameterM !== ball.diameterM) ||
        next.cdMin !== ball.cdMin ||
        next.cdMax !== ball.cdMax;
      if (patch.name !== undefined) ball.name = patch.name;
      if (patch.massKg !== undefined) ball.massKg = patch.massKg;
      if (patch.diameterM !== undefined) ball.diameterM = patch.diameterM;
      ball.cdMin = next.cdMin ?? null;
      ball.cdMax = next.cdMax ?? null;
      await ball.save({ transaction });
      const jobIds = physicsChanged ? await enqueueRefits(club.id, { ballId: clubBallId(ball.id), onlyFitted: true }, transaction) : [];
      return { ball, jobIds };
    });
    const counts = await flightCounts(club.id, [ball]);
    return { ...toDto(ball, counts.get(clubBallId(ball.id)) ?? 0), refitJobIds: jobIds };
  } catch (err) {
    if (duplicateRace(err)) throw nameTaken(patch.name ?? '');
    throw err;
  }
}

/** Deletes a club ball no flight uses; a used one stays (its flights need its mass and size). */
export async function deleteClubBall(club: ClubContext, id: number): Promise<void> {
  await withTransaction(async (transaction) => {
    const ball = await findBall(club, id, transaction);
    const used = await Flight.count({ where: { clubId: club.id, ballId: clubBallId(ball.id) }, transaction });
    if (used > 0) {
      throw new ApiError('CONFLICT', `${used} flight${used === 1 ? ' uses' : 's use'} the ball "${ball.name}": tag ${used === 1 ? 'it' : 'them'} with another ball first, or keep this one.`);
    }
    await ball.destroy({ transaction });
  });
}

/** The physics properties of a club ball (no crisis band: the club does not know it). */
export function clubBallProps(ball: ClubBall): BallProps {
  return {
    massKg: ball.massKg,
    diameterM: ball.diameterM,
    ...(ball.cdMin !== null && ball.cdMax !== null ? { cdRange: { min: ball.cdMin, max: ball.cdMax } } : {}),
    name: ball.name,
  };
}

/**
 * What a flight's `ballId` names in this club: a catalogue ball at its nominal values, or one of the
 * club's balls; null when it is neither.
 */
export async function resolveFlightBall(clubId: number, ballId: string, transaction?: Transaction): Promise<BallProps | null> {
  if (BALLS[ballId]) return ballProps(ballId);
  const id = parseClubBallId(ballId);
  if (id === null) return null;
  const ball = await ClubBall.findOne({ where: { id, clubId }, transaction });
  return ball ? clubBallProps(ball) : null;
}

/**
 * Refuses a ball that is neither in the catalogue nor one of the club's own.
 * @throws ApiError VALIDATION_FAILED naming the field `field`
 */
export async function checkFlightBall(clubId: number, ballId: string, transaction?: Transaction, field = 'ballId'): Promise<BallProps> {
  const ball = await resolveFlightBall(clubId, ballId, transaction);
  if (!ball) {
    throw new ApiError(
      'VALIDATION_FAILED',
      `"${ballId}" is neither a catalogue ball nor one of the club's balls. Pick a ball from the list, or add the club's ball first (name, mass and diameter).`,
      { [field]: 'Pick a ball from the catalogue or the club’s balls.' },
    );
  }
  return ball;
}
