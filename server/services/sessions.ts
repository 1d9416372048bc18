/**
 * Sessions (training or match days) of a club. Coaches and admins manage them; an athlete sees only
 * the sessions that hold at least one of their own flights.
 */
import { Op, QueryTypes, type WhereOptions } from 'sequelize';
import { CONDITION_KEYS, type Conditions, type Session as SessionDto, type SessionInput, type SessionListQuery, type SessionPatch } from '../../shared/schemas/session';
import { pageOffset, type PageMeta } from '../../shared/schemas/pagination';
import { sequelize, withTransaction } from '../db';
import { ApiError, notFound } from '../http/errors';
import type { ClubContext } from '../http/types';
import { log } from '../logger';
import { Session } from '../models';
import { clipKeys, storage } from '../storage';
import { enqueueRefits } from './refits';
import { athleteSessionIds, findVisibleSession } from './visibility';

interface Counts {
  clipCount: number;
  flightCount: number;
}

/** Clip and flight counts per session; an athlete's counts cover only their own flights. */
async function countsFor(club: ClubContext, sessionIds: number[]): Promise<Map<number, Counts>> {
  const counts = new Map<number, Counts>(sessionIds.map((id) => [id, { clipCount: 0, flightCount: 0 }]));
  if (sessionIds.length === 0) return counts;
  if (club.role === 'athlete') {
    const rows = await sequelize.query<{ sid: number; clips: number; flights: number }>(
      `SELECT c.session_id AS sid, COUNT(DISTINCT c.id) AS clips, COUNT(f.id) AS flights
         FROM clips c JOIN flights f ON f.clip_id = c.id AND f.athlete_profile_id = :athleteId
        WHERE c.session_id IN (:ids) GROUP BY c.session_id`,
      { type: QueryTypes.SELECT, replacements: { ids: sessionIds, athleteId: club.athleteProfileId ?? 0 } },
    );
    for (const r of rows) counts.set(Number(r.sid), { clipCount: Number(r.clips), flightCount: Number(r.flights) });
    return counts;
  }
  const rows = await sequelize.query<{ sid: number; clips: number; flights: number }>(
    `SELECT c.session_id AS sid, COUNT(DISTINCT c.id) AS clips, COUNT(f.id) AS flights
       FROM clips c LEFT JOIN flights f ON f.clip_id = c.id
      WHERE c.session_id IN (:ids) GROUP BY c.session_id`,
    { type: QueryTypes.SELECT, replacements: { ids: sessionIds } },
  );
  for (const r of rows) counts.set(Number(r.sid), { clipCount: Number(r.clips), flightCount: Number(r.flights) });
  return counts;
}

export function conditionsOf(session: Session): Conditions {
  const out = {} as Conditions;
  for (const key of CONDITION_KEYS) out[key] = session[key] ?? null;
  return out;
}

function toDto(session: Session, counts: Counts): SessionDto {
  return {
    id: session.id,
    clubId: session.clubId,
    date: session.date,
    venue: session.venue,
    notes: session.notes ?? null,
    conditions: conditionsOf(session),
    clipCount: counts.clipCount,
    flightCount: counts.flightCount,
    createdAt: session.createdAt.toISOString(),
    updatedAt: session.updatedAt.toISOString(),
  };
}

/** One page of the sessions the caller may see, newest first, and how many there are in all. */
export async function listSessions(club: ClubContext, query: SessionListQuery): Promise<{ data: SessionDto[]; meta: PageMeta }> {
  const where: WhereOptions<Session>[] = [{ clubId: club.id }];
  if (query.from) where.push({ date: { [Op.gte]: query.from } });
  if (query.to) where.push({ date: { [Op.lte]: query.to } });
  if (query.venue) where.push({ venue: { [Op.like]: `%${query.venue.replace(/[\\%_]/g, (c) => `\\${c}`)}%` } });
  if (club.role === 'athlete') where.push({ id: { [Op.in]: await athleteSessionIds(club) } });
  const [total, sessions] = await Promise.all([
    Session.count({ where: { [Op.and]: where } }),
    Session.findAll({ where: { [Op.and]: where }, order: [['date', 'DESC'], ['id', 'DESC']], limit: query.pageSize, offset: pageOffset(query) }),
  ]);
  const counts = await countsFor(club, sessions.map((s) => s.id));
  return {
    data: sessions.map((s) => toDto(s, counts.get(s.id) ?? { clipCount: 0, flightCount: 0 })),
    meta: { page: query.page, pageSize: query.pageSize, total },
  };
}

export async function getSession(club: ClubContext, sessionId: number): Promise<SessionDto> {
  const session = await findVisibleSession(club, sessionId);
  const counts = await countsFor(club, [session.id]);
  return toDto(session, counts.get(session.id) ?? { clipCount: 0, flightCount: 0 });
}

function conditionValues(input: SessionInput['conditions']): Partial<Conditions> {
  const out: Partial<Conditions> = {};
  if (!input) return out;
  for (const key of CONDITION_KEYS) if (input[key] !== undefined) out[key] = input[key] ?? null;
  return out;
}

export async function createSession(club: ClubContext, input: SessionInput): Promise<SessionDto> {
  const blank = Object.fromEntries(CONDITION_KEYS.map((k) => [k, null])) as unknown as Conditions;
  const session = await Session.create({
    clubId: club.id,
    date: input.date,
    venue: input.venue,
    notes: input.notes ?? null,
    ...blank,
    ...conditionValues(input.conditions),
  });
  return toDto(session, { clipCount: 0, flightCount: 0 });
}

/** Updates a session; new conditions mean new air for its flights, so their fits are redone. */
export async function updateSession(club: ClubContext, sessionId: number, patch: SessionPatch): Promise<SessionDto> {
  const session = await findVisibleSession(club, sessionId);
  const before = JSON.stringify(conditionsOf(session));
  if (patch.date !== undefined) session.date = patch.date;
  if (patch.venue !== undefined) session.venue = patch.venue;
  if (patch.notes !== undefined) session.notes = patch.notes ?? null;
  Object.assign(session, conditionValues(patch.conditions));
  await withTransaction(async (transaction) => {
    await session.save({ transaction });
    if (before !== JSON.stringify(conditionsOf(session))) await enqueueRefits(club.id, { sessionId: session.id, onlyFitted: true }, transaction);
  });
  const counts = await countsFor(club, [session.id]);
  return toDto(session, counts.get(session.id) ?? { clipCount: 0, flightCount: 0 });
}

/**
 * Deletes a session with its clips, flights, points, fits and jobs (one transaction; foreign keys cascade),
 * then removes the clips' files. A session holding flights goes only with `confirm`.
 */
export async function deleteSession(club: ClubContext, sessionId: number, confirm: boolean): Promise<void> {
  const clipIds = await withTransaction(async (transaction) => {
    const session = await Session.findOne({ where: { id: sessionId, clubId: club.id }, transaction, lock: transaction.LOCK.UPDATE });
    if (!session) throw notFound('session');
    const [counts] = await sequelize.query<{ clips: number; flights: number }>(
      `SELECT COUNT(DISTINCT c.id) AS clips, COUNT(f.id) AS flights FROM clips c LEFT JOIN flights f ON f.clip_id = c.id WHERE c.session_id = :id`,
      { type: QueryTypes.SELECT, replacements: { id: sessionId }, transaction },
    );
    const flights = Number(counts?.flights ?? 0);
    const clips = Number(counts?.clips ?? 0);
    if (flights > 0 && !confirm) {
      throw new ApiError(
        'CONFLICT',
        `This session holds ${flights} flight${flights === 1 ? '' : 's'} in ${clips} clip${clips === 1 ? '' : 's'}. ` +
          'Deleting it deletes them, their tracks and fits, and the clips\u2019 files. Confirm to delete it (send confirm=true).',
      );
    }
    const rows = await sequelize.query<{ id: number }>('SELECT id FROM clips WHERE session_id = :id', {
      type: QueryTypes.SELECT,
      replacements: { id: sessionId },
      transaction,
    });
    await session.destroy({ transaction });
    return rows.map((r) => Number(r.id));
  });
  await removeClipFiles(club.id, clipIds);
}

/** Removes stored files of deleted clips; a failure is logged (the rows are already gone), never shown as the request's failure. */
export async function removeClipFiles(clubId: number, clipIds: number[]): Promise<void> {
  for (const clipId of clipIds) {
    try {
      await storage().removePrefix(clipKeys.prefix(clubId, clipId));
    } catch (err) {
      log.error('Could not remove the files of a deleted clip', { clubId, clipId, error: (err as Error).message });
    }
  }
}

/** Sessions the caller can see, for the overview. */
export async function countSessions(club: ClubContext): Promise<number> {
  if (club.role === 'athlete') return (await athleteSessionIds(club)).length;
  return Session.count({ where: { clubId: club.id } });
}
