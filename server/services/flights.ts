/**
 * Flights inside clips, and each club's action list. Coaches and admins manage them; an athlete sees
 * only their own flights (`athleteProfileId`, as `scopeAthlete()` gives it).
 */
import { Op, QueryTypes, type Transaction } from 'sequelize';
import type { z } from 'zod';
import {
  DEFAULT_FLIGHT_ACTIONS,
  type flightActionInputSchema,
  type flightActionPatchSchema,
  type Flight as FlightDto,
  type FlightAction as FlightActionDto,
  type FlightDetail,
  type FlightInput,
  type FlightPatch,
  type FlightStatus,
} from '../../shared/schemas/flight';
import { sequelize } from '../db';
import { ApiError, notFound } from '../http/errors';
import type { ClubContext } from '../http/types';
import { AthleteProfile, Clip, Flight, FlightAction } from '../models';
import { currentCalibration, toCalibrationDto } from './calibration';
import { latestFits, toFitSummary } from './fits';
import { latestJobs, toJobSummary } from './jobs';
import { enqueueRefits } from './refits';
import { pointsOf } from './tracks';
import { findVisibleClip, findVisibleFlight, findVisibleFlightWithClip, flightScope } from './visibility';

/** Gives a club the default action list the first time it is needed (idempotent; the unique key absorbs races). */
export async function ensureDefaultActions(clubId: number, transaction?: Transaction): Promise<void> {
  const count = await FlightAction.count({ where: { clubId }, transaction });
  if (count > 0) return;
  const now = new Date();
  await sequelize.query(
    `INSERT IGNORE INTO flight_actions (club_id, \`key\`, label, archived, sort_order, created_at, updated_at) VALUES ${DEFAULT_FLIGHT_ACTIONS.map(() => '(?, ?, ?, 0, ?, ?, ?)').join(', ')}`,
    {
      type: QueryTypes.INSERT,
      transaction,
      replacements: DEFAULT_FLIGHT_ACTIONS.flatMap((a, i) => [clubId, a.key, a.label, (i + 1) * 10, now, now]),
    },
  );
}

function toActionDto(a: FlightAction): FlightActionDto {
  return { id: a.id, key: a.key, label: a.label, archived: a.archived, sortOrder: a.sortOrder };
}

export async function listActions(club: ClubContext): Promise<FlightActionDto[]> {
  await ensureDefaultActions(club.id);
  const actions = await FlightAction.findAll({ where: { clubId: club.id }, order: [['sortOrder', 'ASC'], ['id', 'ASC']] });
  return actions.map(toActionDto);
}

/** Makes a key from a label: "Hammer throw" → "hammer_throw". */
function keyFromLabel(label: string): string {
  const key = label
    .normalize('NFKD')
    .replace(/[\u0300-\u036f]/g, '')
    .toLowerCase()
    .replace(/[^a-z0-9]+/g, '_')
    .replace(/^_+|_+$/g, '')
    .slice(0, 40);
  return key || 'action';
}

export async function createAction(club: ClubContext, input: z.output<typeof flightActionInputSchema>): Promise<FlightActionDto> {
  await ensureDefaultActions(club.id);
  const key = input.key ?? keyFromLabel(input.label);
  const existing = await FlightAction.findOne({ where: { clubId: club.id, key } });
  if (existing) {
    throw new ApiError('CONFLICT', `The action "${existing.label}" already uses the key "${key}". Choose another name${existing.archived ? ', or bring the archived one back' : ''}.`, {
      key: `"${key}" is taken.`,
    });
  }
  const max = (await FlightAction.max<number, FlightAction>('sortOrder', { where: { clubId: club.id } })) ?? 0;
  const created = await FlightAction.create({ clubId: club.id, key, label: input.label, sortOrder: max + 10 });
  return toActionDto(created);
}

async function findAction(club: ClubContext, actionId: number): Promise<FlightAction> {
  const action = await FlightAction.findOne({ where: { id: actionId, clubId: club.id } });
  if (!action) throw notFound('action');
  return action;
}

export async function patchAction(club: ClubContext, actionId: number, patch: z.output<typeof flightActionPatchSchema>): Promise<FlightActionDto> {
  const action = await findAction(club, actionId);
  if (patch.label !== undefined) action.label = patch.label;
  if (patch.archived !== undefined) action.archived = patch.archived;
  await action.save();
  return toActionDto(action);
}

export async function deleteAction(club: ClubContext, actionId: number): Promise<void> {
  const action = await findAction(club, actionId);
  const used = await Flight.count({ where: { clubId: club.id, action: action.key } });
  if (used > 0) {
    throw new ApiError('CONFLICT', `${used} flight${used === 1 ? ' uses' : 's use'} the action "${action.label}". Archive it instead: it then leaves the pick list but keeps those flights tagged.`);
  }
  await action.destroy();
}

async function checkAction(clubId: number, key: string, transaction?: Transaction): Promise<void> {
  await ensureDefaultActions(clubId, transaction);
  // Note: a locking read sees the rows another transaction committed meanwhile (the default list inserted by a
  // concurrent first flight of the club), which the transaction's own snapshot would not.
  const action = await FlightAction.findOne({ where: { clubId, key }, transaction, ...(transaction ? { lock: transaction.LOCK.SHARE } : {}) });
  if (!action || action.archived) {
    throw new ApiError('VALIDATION_FAILED', `"${key}" is not an action of this club. Pick one from the list, or add it under the club's actions.`, {
      action: 'Pick an action from the list.',
    });
  }
}

async function checkAthlete(clubId: number, athleteId: number, transaction?: Transaction): Promise<AthleteProfile> {
  const profile = await AthleteProfile.findOne({ where: { id: athleteId, clubId }, transaction });
  if (!profile) {
    throw new ApiError('VALIDATION_FAILED', 'That athlete is not in this club. Pick an athlete from the squad.', { athleteId: 'Pick an athlete from the squad.' });
  }
  return profile;
}

async function sessionIdsOf(clipIds: number[]): Promise<Map<number, number>> {
  const out = new Map<number, number>();
  if (clipIds.length === 0) return out;
  const clips = await Clip.findAll({ where: { id: { [Op.in]: clipIds } }, attributes: ['id', 'sessionId'] });
  for (const c of clips) out.set(c.id, c.sessionId);
  return out;
}

export async function toFlightDtos(flights: Flight[]): Promise<FlightDto[]> {
  const ids = flights.map((f) => f.id);
  const [athletes, sessions, fits, jobs, counts] = await Promise.all([
    AthleteProfile.findAll({ where: { id: { [Op.in]: [...new Set(flights.map((f) => f.athleteProfileId))] } }, attributes: ['id', 'displayName'] }),
    sessionIdsOf([...new Set(flights.map((f) => f.clipId))]),
    latestFits(ids),
    latestJobs('flightId', ids, ['flight.follow', 'flight.fit']),
    ids.length === 0
      ? Promise.resolve([] as { id: number; n: number }[])
      : sequelize.query<{ id: number; n: number }>('SELECT flight_id AS id, COUNT(*) AS n FROM track_points WHERE flight_id IN (:ids) GROUP BY flight_id', {
          type: QueryTypes.SELECT,
          replacements: { ids },
        }),
  ]);
  const names = new Map(athletes.map((a) => [a.id, a.displayName]));
  const pointCounts = new Map(counts.map((r) => [Number(r.id), Number(r.n)]));
  return flights.map((f) => {
    const fit = fits.get(f.id);
    const job = jobs.get(f.id);
    return {
      id: f.id,
      clubId: f.clubId,
      sessionId: sessions.get(f.clipId) ?? 0,
      clipId: f.clipId,
      athleteId: f.athleteProfileId,
      athleteName: names.get(f.athleteProfileId) ?? '',
      action: f.action,
      ballId: f.ballId,
      frameStart: f.frameStart,
      frameEnd: f.frameEnd,
      status: f.status,
      attentionReason: f.attentionReason ?? null,
      notes: f.notes ?? null,
      pointCount: pointCounts.get(f.id) ?? 0,
      latestFit: fit ? toFitSummary(fit) : null,
      job: job ? toJobSummary(job) : null,
      createdAt: f.createdAt.toISOString(),
      updatedAt: f.updatedAt.toISOString(),
    };
  });
}

export interface FlightQuery {
  sessionId?: number;
  clipId?: number;
  athleteId?: number;
  status?: FlightStatus;
}

export async function listFlights(club: ClubContext, query: FlightQuery): Promise<FlightDto[]> {
  const where: Record<string | symbol, unknown> = { ...flightScope(club) };
  if (query.clipId) where.clipId = query.clipId;
  if (query.athleteId && club.role !== 'athlete') where.athleteProfileId = query.athleteId;
  if (query.athleteId && club.role === 'athlete' && query.athleteId !== club.athleteProfileId) return [];
  if (query.status) where.status = query.status;
  if (query.sessionId) {
    const clips = await Clip.findAll({ where: { clubId: club.id, sessionId: query.sessionId }, attributes: ['id'] });
    where.clipId = query.clipId ? (clips.some((c) => c.id === query.clipId) ? query.clipId : 0) : { [Op.in]: clips.map((c) => c.id) };
  }
  const flights = await Flight.findAll({ where, order: [['id', 'ASC']] });
  return toFlightDtos(flights);
}

export async function listClipFlights(club: ClubContext, clipId: number): Promise<FlightDto[]> {
  const clip = await findVisibleClip(club, clipId);
  return listFlights(club, { clipId: clip.id });
}

export async function getFlight(club: ClubContext, flightId: number): Promise<FlightDto> {
  const [dto] = await toFlightDtos([await findVisibleFlight(club, flightId)]);
  return dto!;
}

export async function getFlightDetail(club: ClubContext, flightId: number): Promise<FlightDetail> {
  const { flight, clip } = await findVisibleFlightWithClip(club, flightId);
  const cal = await currentCalibration(clip.id);
  const [dto] = await toFlightDtos([flight]);
  return {
    ...dto!,
    points: await pointsOf(flight, clip, cal),
    clip: {
      id: clip.id,
      label: clip.label,
      width: clip.width,
      height: clip.height,
      frameWidth: clip.frameWidth ?? null,
      frameHeight: clip.frameHeight ?? null,
      frameScale: clip.frameWidth ? clip.frameWidth / clip.width : null,
      frameCount: clip.frameCount ?? null,
      captureFps: clip.captureFps,
      calibration: cal ? toCalibrationDto(cal) : null,
    },
  };
}

function lastFrame(clip: Clip): number {
  return Math.max(0, (clip.frameCount ?? 1) - 1);
}

function checkRange(clip: Clip, frameStart: number, frameEnd: number): void {
  const last = lastFrame(clip);
  if (frameEnd > last) {
    throw new ApiError('VALIDATION_FAILED', `This clip has frames 0 to ${last}: the last frame of the flight must be at most ${last}.`, {
      frameEnd: `At most ${last}.`,
    });
  }
  if (frameEnd <= frameStart) {
    throw new ApiError('VALIDATION_FAILED', 'The last frame must come after the first frame.', { frameEnd: 'After the first frame.' });
  }
}

export async function createFlight(club: ClubContext, clipId: number, input: FlightInput): Promise<FlightDto> {
  const clip = await findVisibleClip(club, clipId);
  const flight = await sequelize.transaction(async (transaction) => {
    await checkAthlete(club.id, input.athleteId, transaction);
    await checkAction(club.id, input.action, transaction);
    const frameStart = input.frameStart ?? 0;
    const frameEnd = input.frameEnd ?? lastFrame(clip);
    checkRange(clip, frameStart, frameEnd);
    return Flight.create(
      {
        clubId: club.id,
        clipId: clip.id,
        athleteProfileId: input.athleteId,
        action: input.action,
        ballId: input.ballId,
        frameStart,
        frameEnd,
        attentionReason: null,
        notes: input.notes ?? null,
      },
      { transaction },
    );
  });
  return getFlight(club, flight.id);
}

const REVIEW_FROM: FlightStatus[] = ['fitted', 'needs_attention'];

export async function patchFlight(club: ClubContext, flightId: number, patch: FlightPatch): Promise<FlightDto> {
  await sequelize.transaction(async (transaction) => {
    const { flight, clip } = await findVisibleFlightWithClip(club, flightId, transaction);
    if (patch.athleteId !== undefined) {
      await checkAthlete(club.id, patch.athleteId, transaction);
      flight.athleteProfileId = patch.athleteId;
    }
    if (patch.action !== undefined && patch.action !== flight.action) {
      await checkAction(club.id, patch.action, transaction);
      flight.action = patch.action;
    }
    const ballChanged = patch.ballId !== undefined && patch.ballId !== flight.ballId;
    if (patch.ballId !== undefined) flight.ballId = patch.ballId;
    if (patch.notes !== undefined) flight.notes = patch.notes ?? null;
    if (patch.frameStart !== undefined || patch.frameEnd !== undefined) {
      const frameStart = patch.frameStart ?? flight.frameStart;
      const frameEnd = patch.frameEnd ?? flight.frameEnd;
      checkRange(clip, frameStart, frameEnd);
      const [row] = await sequelize.query<{ n: number }>(
        'SELECT COUNT(*) AS n FROM track_points WHERE flight_id = :id AND (frame < :start OR frame > :end)',
        { type: QueryTypes.SELECT, replacements: { id: flight.id, start: frameStart, end: frameEnd }, transaction },
      );
      const outside = Number(row?.n ?? 0);
      if (outside > 0) {
        throw new ApiError(
          'CONFLICT',
          `${outside} traced point${outside === 1 ? ' lies' : 's lie'} outside frames ${frameStart}–${frameEnd}. Delete ${outside === 1 ? 'it' : 'them'} first, or choose a range that holds every point.`,
        );
      }
      flight.frameStart = frameStart;
      flight.frameEnd = frameEnd;
    }
    if (patch.status !== undefined && patch.status !== flight.status) {
      if (patch.status === 'reviewed' && !REVIEW_FROM.includes(flight.status)) {
        throw new ApiError('CONFLICT', `Only a fitted flight can be marked reviewed; this one is ${flight.status.replace('_', ' ')}. Fit it first.`);
      }
      if (patch.status === 'fitted' && flight.status !== 'reviewed') {
        throw new ApiError('CONFLICT', 'Only a reviewed flight can go back to fitted.');
      }
      flight.status = patch.status;
    }
    await flight.save({ transaction });
    if (ballChanged) await enqueueRefits(club.id, { flightId: flight.id, onlyFitted: true }, transaction);
  });
  return getFlight(club, flightId);
}

export async function deleteFlight(club: ClubContext, flightId: number): Promise<void> {
  const flight = await findVisibleFlight(club, flightId);
  await flight.destroy();
}

/** Flights the caller can see, for the overview. */
export async function countFlights(club: ClubContext, status?: FlightStatus): Promise<number> {
  return Flight.count({ where: { ...flightScope(club), ...(status ? { status } : {}) } });
}
