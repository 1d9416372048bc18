/**
 * "My flights": an athlete's own recent flights, personal bests, progress, the notes coaches shared with
 * them and their workload this week. Everything is narrowed to the caller's own athlete profile.
 */
import { QueryTypes } from 'sequelize';
import type { MyFlights, MyProgressPoint } from '../../shared/schemas/my-flights';
import { sequelize } from '../db';
import { ApiError } from '../http/errors';
import type { ClubContext } from '../http/types';
import { AthleteProfile, Flight, Session } from '../models';
import { toFlightDtos } from './flights';
import { sharedNotesForAthlete } from './notes';
import { personalBests } from './overview';
import { athleteWorkload } from './workload';

const RECENT_SHOWN = 10;
const PROGRESS_WEEKS = 6;

async function progress(clubId: number, athleteId: number): Promise<Record<string, MyProgressPoint[]>> {
  const rows = await sequelize.query<MyProgressPoint & { action: string }>(
    `SELECT f.id AS flightId, f.action, DATE_FORMAT(s.date, '%Y-%m-%d') AS day, ft.launch_speed_mps AS launchSpeedMps, ft.standard_carry_m AS standardCarryM
       FROM (SELECT l.flight_id, MAX(l.id) AS id FROM flights lfl JOIN fits l ON l.flight_id = lfl.id
              WHERE lfl.club_id = :clubId AND lfl.athlete_profile_id = :athleteId GROUP BY l.flight_id) lf
       JOIN fits ft ON ft.flight_id = lf.flight_id AND ft.id = lf.id
       JOIN flights f ON f.id = lf.flight_id
       JOIN clips c ON c.id = f.clip_id
       JOIN sessions s ON s.id = c.session_id
      WHERE f.club_id = :clubId AND f.athlete_profile_id = :athleteId AND ft.status = 'fitted'
      ORDER BY s.date ASC, f.id ASC`,
    { type: QueryTypes.SELECT, replacements: { clubId, athleteId } },
  );
  const out: Record<string, MyProgressPoint[]> = {};
  for (const r of rows) {
    (out[r.action] ??= []).push({
      flightId: Number(r.flightId),
      day: r.day,
      launchSpeedMps: r.launchSpeedMps === null ? null : Number(r.launchSpeedMps),
      standardCarryM: r.standardCarryM === null ? null : Number(r.standardCarryM),
    });
  }
  return out;
}

export async function getMyFlights(club: ClubContext, userId: number, now = new Date()): Promise<MyFlights> {
  const profile = club.athleteProfileId === null ? null : await AthleteProfile.findOne({ where: { id: club.athleteProfileId, clubId: club.id } });
  if (!profile) {
    throw new ApiError('NOT_FOUND', 'You have no athlete profile in this club yet. Ask a coach to link your account to your profile on the Squad screen.');
  }
  const recent = await Flight.findAll({ where: { clubId: club.id, athleteProfileId: profile.id }, order: [['id', 'DESC']], limit: RECENT_SHOWN });
  const [flights, bests, series, sharedNotes, workload] = await Promise.all([
    toFlightDtos(recent),
    personalBests(club.id, profile.id, 50),
    progress(club.id, profile.id),
    sharedNotesForAthlete(club, userId),
    athleteWorkload(club, profile.id, PROGRESS_WEEKS, now),
  ]);
  const sessions = await Session.findAll({ where: { id: [...new Set(flights.map((f) => f.sessionId))] }, attributes: ['id', 'date'] });
  const dayOf = new Map(sessions.map((s) => [s.id, s.date]));
  const recentFlights = flights.map((f) => ({ ...f, day: dayOf.get(f.sessionId) ?? f.createdAt.slice(0, 10) }));
  return { athlete: { id: profile.id, displayName: profile.displayName }, recentFlights, personalBests: bests, progress: series, sharedNotes, workload };
}
