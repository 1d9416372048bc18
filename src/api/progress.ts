/**
 * Reads of the Session report and Progress: a session with every flight of it, and an athlete's flights with the
 * sessions that date them. The server scopes both: an athlete's answers hold only her own flights.
 */
import type { Session } from '@shared/schemas/session';
import type { AthleteProfileSummary } from '@shared/schemas/club';
import { fetchAthletes } from './clubs';
import { fetchActions, fetchFlightList, type Flight, type FlightAction } from './reports';
import { fetchSession, listSessions } from './sessions';
import type { RequestOptions } from './http';

export type { AthleteProfileSummary, Flight, FlightAction, Session };

export interface SessionReportData {
  session: Session;
  flights: Flight[];
  actions: FlightAction[];
}

/** One session and its flights; an unknown session (or, for an athlete, one without her flights) answers 404 NOT_FOUND. */
export async function fetchSessionReport(clubId: number, sessionId: number, options: RequestOptions = {}): Promise<SessionReportData> {
  const [session, list, actions] = await Promise.all([
    fetchSession(clubId, sessionId, options),
    fetchFlightList(clubId, { sessionId }, options),
    // Labels only: without them the keys are shown in words.
    fetchActions(clubId, options).catch(() => [] as FlightAction[]),
  ]);
  return { session, flights: list.data, actions };
}

export interface ProgressData {
  flights: Flight[];
  sessions: Session[];
  actions: FlightAction[];
}

/** Every flight of one athlete (`athleteId` null: the signed-in athlete's own), with the sessions that date them. */
export async function fetchProgress(clubId: number, athleteId: number | null, options: RequestOptions = {}): Promise<ProgressData> {
  const [list, sessions, actions] = await Promise.all([
    fetchFlightList(clubId, { athleteId }, options),
    listSessions(clubId, {}, options),
    fetchActions(clubId, options).catch(() => [] as FlightAction[]),
  ]);
  return { flights: list.data, sessions: sessions.data, actions };
}

/** The athletes a coach may pick on Progress. */
export async function fetchProgressAthletes(clubId: number, options?: RequestOptions): Promise<AthleteProfileSummary[]> {
  return fetchAthletes(clubId, options);
}
