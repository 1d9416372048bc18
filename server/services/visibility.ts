/**
 * What a member may see of a club's sessions, clips and flights. Coaches and admins see everything of
 * their club; an athlete sees their own flights and only the clips and sessions that hold one of them.
 * Anything outside that answers 404, so nothing reveals that it exists.
 */
import { QueryTypes, type Transaction } from 'sequelize';
import { sequelize } from '../db';
import { notFound } from '../http/errors';
import type { ClubContext } from '../http/types';
import { Clip, Flight, Session } from '../models';

/** The `where` that narrows flights to those the caller may see (an athlete: their own). */
export function flightScope(club: ClubContext): { clubId: number; athleteProfileId?: number } {
  return club.role === 'athlete' ? { clubId: club.id, athleteProfileId: club.athleteProfileId ?? 0 } : { clubId: club.id };
}

/** Ids of clips holding flights of the athlete (empty for someone with no profile). */
export async function athleteClipIds(club: ClubContext, transaction?: Transaction): Promise<number[]> {
  if (club.athleteProfileId === null) return [];
  const rows = await sequelize.query<{ id: number }>(
    'SELECT DISTINCT clip_id AS id FROM flights WHERE club_id = :clubId AND athlete_profile_id = :athleteId',
    { type: QueryTypes.SELECT, replacements: { clubId: club.id, athleteId: club.athleteProfileId }, transaction },
  );
  return rows.map((r) => Number(r.id));
}

/** Ids of the sessions that hold flights of the athlete (empty for someone with no profile). */
export async function athleteSessionIds(club: ClubContext): Promise<number[]> {
  if (club.athleteProfileId === null) return [];
  const rows = await sequelize.query<{ id: number }>(
    `SELECT DISTINCT c.session_id AS id FROM flights f JOIN clips c ON c.id = f.clip_id
      WHERE f.club_id = :clubId AND f.athlete_profile_id = :athleteId`,
    { type: QueryTypes.SELECT, replacements: { clubId: club.id, athleteId: club.athleteProfileId } },
  );
  return rows.map((r) => Number(r.id));
}

/** The session if the caller may see it, else 404 (another club's, or an athlete's session without their flights). */
export async function findVisibleSession(club: ClubContext, sessionId: number): Promise<Session> {
  const session = await Session.findOne({ where: { id: sessionId, clubId: club.id } });
  if (!session) throw notFound('session');
  if (club.role === 'athlete' && !(await athleteSessionIds(club)).includes(sessionId)) throw notFound('session');
  return session;
}

/** The clip if the caller may see it, else 404. */
export async function findVisibleClip(club: ClubContext, clipId: number, transaction?: Transaction): Promise<Clip> {
  const clip = await Clip.findOne({ where: { id: clipId, clubId: club.id }, transaction });
  if (!clip) throw notFound('clip');
  if (club.role === 'athlete' && !(await athleteClipIds(club, transaction)).includes(clipId)) throw notFound('clip');
  return clip;
}

/** The flight if the caller may see it (an athlete: only their own), else 404. */
export async function findVisibleFlight(club: ClubContext, flightId: number, transaction?: Transaction): Promise<Flight> {
  // Read inside a transaction, the flight is about to be written: its row is locked so that two writers of
  // one flight (its points, its fields) take turns instead of interleaving.
  const flight = await Flight.findOne({ where: { id: flightId, ...flightScope(club) }, transaction, ...(transaction ? { lock: transaction.LOCK.UPDATE } : {}) });
  if (!flight) throw notFound('flight');
  return flight;
}

/** A visible flight with its clip, else 404. */
export async function findVisibleFlightWithClip(club: ClubContext, flightId: number, transaction?: Transaction): Promise<{ flight: Flight; clip: Clip }> {
  const flight = await findVisibleFlight(club, flightId, transaction);
  const clip = await Clip.findByPk(flight.clipId, { transaction });
  if (!clip) throw notFound('flight');
  return { flight, clip };
}
