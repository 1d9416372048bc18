/**
 * CSV exports of flights: the Flights list (with its filters), a session's flights, in the units the member sees
 * unless the request names others. An athlete's exports hold only their own flights (the list's own scoping).
 */
import type { z } from 'zod';
import { actionKeyWords, flightCsvRow, flightsCsv, type FlightCsvRow } from '../../shared/exports/flights';
import { csvFileName, type CsvFile } from '../../shared/exports/csv';
import type { Flight as FlightDto } from '../../shared/schemas/flight';
import type { flightsExportQuerySchema } from '../../shared/schemas/export';
import type { UnitSystem } from '../../shared/units';
import type { ClubContext } from '../http/types';
import { Session } from '../models';
import { listClubBalls } from './balls';
import { listActions, listFlights } from './flights';
import { findVisibleSession } from './visibility';

/** The export rows of flights: labels of actions, balls and states as the screens show them, the session's day and venue. */
async function csvRows(club: ClubContext, flights: FlightDto[]): Promise<FlightCsvRow[]> {
  const sessionIds = [...new Set(flights.map((f) => f.sessionId))];
  const [actions, sessions, balls] = await Promise.all([
    listActions(club),
    sessionIds.length === 0 ? Promise.resolve([]) : Session.findAll({ where: { id: sessionIds, clubId: club.id }, attributes: ['id', 'date', 'venue'] }),
    listClubBalls(club),
  ]);
  const ballNameOf = new Map(balls.map((b) => [b.ballId, b.name]));
  const actionLabel = new Map(actions.map((a) => [a.key, a.label]));
  const sessionOf = new Map(sessions.map((s) => [s.id, s]));
  return flights.map((f) =>
    flightCsvRow(f, {
      session: sessionOf.get(f.sessionId) ?? null,
      actionLabel: actionLabel.get(f.action) ?? actionKeyWords(f.action),
      ballName: ballNameOf.get(f.ballId),
    }),
  );
}

/** The Flights list as CSV, filtered as the list is. */
export async function exportFlights(club: ClubContext, query: z.output<typeof flightsExportQuerySchema>, system: UnitSystem, today: string): Promise<CsvFile> {
  const flights = await listFlights(club, { sessionId: query.sessionId, clipId: query.clipId, athleteId: query.athleteId, status: query.status });
  return { filename: csvFileName('flights', today), csv: flightsCsv(await csvRows(club, flights), system) };
}

/** Every flight of a session the member may see, as CSV (404 for a session the member may not see). */
export async function exportSessionFlights(club: ClubContext, sessionId: number, system: UnitSystem): Promise<CsvFile> {
  const session = await findVisibleSession(club, sessionId);
  const flights = await listFlights(club, { sessionId: session.id });
  return { filename: csvFileName('session', session.date, session.venue), csv: flightsCsv(await csvRows(club, flights), system) };
}
