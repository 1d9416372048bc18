/**
 * The reads and the one change of the Flights screen and the Flight report: the flights list, one flight with its
 * points, its fit history, and marking a fit reviewed (or back to fitted).
 */
import type { DataResponse, ListResponse } from '@shared/types/api';
import type { Fit, Flight, FlightAction, FlightDetail, FlightStatus } from '@shared/schemas/flight';
import type { TrackPoint } from '@shared/schemas/track';
import { http, type RequestOptions } from './http';

export type { Fit, Flight, FlightAction, FlightDetail, FlightStatus, TrackPoint };

/** Filters the server applies; the screen filters action and ball itself. */
export interface FlightListFilters {
  sessionId?: number | null;
  athleteId?: number | null;
  status?: FlightStatus | null;
}

const clubBase = (clubId: number) => `/clubs/${clubId}`;
const flightPath = (clubId: number, flightId: number) => `${clubBase(clubId)}/flights/${flightId}`;

/** Every flight of the club in view (an athlete's answer holds only their own). */
export async function fetchFlightList(clubId: number, filters: FlightListFilters = {}, options: RequestOptions = {}): Promise<ListResponse<Flight>> {
  const query = { sessionId: filters.sessionId ?? undefined, athleteId: filters.athleteId ?? undefined, status: filters.status ?? undefined };
  return http.get<ListResponse<Flight>>(`${clubBase(clubId)}/flights`, { ...options, query });
}

/** One flight with its traced points and a summary of its clip; another athlete's flight answers 404 NOT_FOUND. */
export async function fetchFlightDetail(clubId: number, flightId: number, options?: RequestOptions): Promise<FlightDetail> {
  return (await http.get<DataResponse<FlightDetail>>(flightPath(clubId, flightId), options)).data;
}

/** Every fit of a flight, newest first (refits never overwrite). */
export async function fetchFitHistory(clubId: number, flightId: number, options?: RequestOptions): Promise<Fit[]> {
  return (await http.get<DataResponse<Fit[]>>(`${flightPath(clubId, flightId)}/fits`, options)).data;
}

export async function fetchFlightPoints(clubId: number, flightId: number, options?: RequestOptions): Promise<TrackPoint[]> {
  return (await http.get<DataResponse<TrackPoint[]>>(`${flightPath(clubId, flightId)}/points`, options)).data;
}

/** Marks a fitted flight reviewed, or (`fitted`) takes the review back; other moves answer 409 CONFLICT. */
export async function setFlightReviewed(clubId: number, flightId: number, reviewed: boolean, options?: RequestOptions): Promise<Flight> {
  const body = { status: reviewed ? 'reviewed' : 'fitted' };
  return (await http.patch<DataResponse<Flight>>(flightPath(clubId, flightId), body, options)).data;
}

/** The club's actions (key → label) for filters and titles. */
export async function fetchActions(clubId: number, options?: RequestOptions): Promise<FlightAction[]> {
  return (await http.get<DataResponse<FlightAction[]>>(`${clubBase(clubId)}/flight-actions`, options)).data;
}
