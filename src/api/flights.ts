import type { DataResponse, ListResponse } from '@shared/types/api';
import type { CameraMotion } from '@shared/schemas/camera-motion';
import type { Job } from '@shared/schemas/clip';
import type { Fit, Flight, FlightAction, FlightDetail, FlightInput, FlightPatch, FlightSort, FlightStatus } from '@shared/schemas/flight';
import type { FollowBody, TrackPoint, TrackPointInput } from '@shared/schemas/track';
import { apiUrl, http, type RequestOptions } from './http';
import { fetchAllPages, type PageResponse } from './paging';

export type { CameraMotion, Fit, Flight, FlightAction, FlightDetail, FlightInput, FlightPatch, FlightStatus, TrackPoint, TrackPointInput };

const clubBase = (clubId: number) => `/clubs/${clubId}`;
const flightPath = (clubId: number, flightId: number) => `${clubBase(clubId)}/flights/${flightId}`;

export async function listClipFlights(clubId: number, clipId: number, options?: RequestOptions): Promise<ListResponse<Flight>> {
  return http.get<ListResponse<Flight>>(`${clubBase(clubId)}/clips/${clipId}/flights`, options);
}

/** Filters the server applies to the flights list; null or absent: no filter. */
export interface FlightListFilters {
  sessionId?: number | null;
  clipId?: number | null;
  athleteId?: number | null;
  status?: FlightStatus | null;
  action?: string | null;
  ballId?: string | null;
}

/** One page of the flights list: which page, how many rows, and the server-side order. */
export interface FlightPageRequest {
  page: number;
  pageSize: number;
  sort?: FlightSort;
  order?: 'asc' | 'desc';
}

/** Every flight of the club in view that passes the filters (an athlete's answer holds only her own), paged through. */
export async function listFlights(
  clubId: number,
  filters: FlightListFilters = {},
  options: RequestOptions = {},
  order: Pick<FlightPageRequest, 'sort' | 'order'> = { sort: 'recent', order: 'asc' },
): Promise<ListResponse<Flight>> {
  return fetchAllPages<Flight>(`${clubBase(clubId)}/flights`, { ...options, query: { ...filters, ...order } });
}

/** One page of the flights that pass the filters, sorted on the server, with the total. */
export async function listFlightsPage(
  clubId: number,
  filters: FlightListFilters,
  page: FlightPageRequest,
  options: RequestOptions = {},
): Promise<PageResponse<Flight>> {
  return http.get<PageResponse<Flight>>(`${clubBase(clubId)}/flights`, { ...options, query: { ...filters, ...page } });
}

/** One flight with its traced points and a summary of its clip; another athlete's flight answers 404 NOT_FOUND. */
export async function fetchFlight(clubId: number, flightId: number, options?: RequestOptions): Promise<FlightDetail> {
  return (await http.get<DataResponse<FlightDetail>>(flightPath(clubId, flightId), options)).data;
}

export async function createFlight(clubId: number, clipId: number, body: FlightInput, options?: RequestOptions): Promise<Flight> {
  return (await http.post<DataResponse<Flight>>(`${clubBase(clubId)}/clips/${clipId}/flights`, body, options)).data;
}

export async function updateFlight(clubId: number, flightId: number, body: FlightPatch, options?: RequestOptions): Promise<Flight> {
  return (await http.patch<DataResponse<Flight>>(flightPath(clubId, flightId), body, options)).data;
}

/** Marks a fitted flight reviewed, or (`fitted`) takes the review back; other moves answer 409 CONFLICT. */
export async function setFlightReviewed(clubId: number, flightId: number, reviewed: boolean, options?: RequestOptions): Promise<Flight> {
  return updateFlight(clubId, flightId, { status: reviewed ? 'reviewed' : 'fitted' }, options);
}

export async function deleteFlight(clubId: number, flightId: number, options?: RequestOptions): Promise<void> {
  await http.delete(flightPath(clubId, flightId), options);
}

export async function fetchPoints(clubId: number, flightId: number, options?: RequestOptions): Promise<TrackPoint[]> {
  return (await http.get<DataResponse<TrackPoint[]>>(`${flightPath(clubId, flightId)}/points`, options)).data;
}

/** Replaces the flight's points in one go ([] clears them). */
export async function savePoints(clubId: number, flightId: number, points: TrackPointInput[], options?: RequestOptions): Promise<TrackPoint[]> {
  return (await http.put<DataResponse<TrackPoint[]>>(`${flightPath(clubId, flightId)}/points`, { points }, options)).data;
}

/** Starts auto-follow from a marked point; answers the `flight.follow` job to watch. */
export async function startFollow(clubId: number, flightId: number, body: FollowBody, options?: RequestOptions): Promise<Job> {
  return (await http.post<DataResponse<Job>>(`${flightPath(clubId, flightId)}/follow`, body, options)).data;
}

/** The camera motion the latest auto-follow found for the flight (staff only). */
export async function fetchCameraMotion(clubId: number, flightId: number, options?: RequestOptions): Promise<CameraMotion> {
  return (await http.get<DataResponse<CameraMotion>>(`${flightPath(clubId, flightId)}/camera-motion`, options)).data;
}

/** Replaces the points by those of a CSV (pixel or metre columns); a bad cell answers 400 CSV_INVALID naming line and column. */
export async function importTrackCsv(clubId: number, flightId: number, csv: string, options?: RequestOptions): Promise<TrackPoint[]> {
  return (await http.post<DataResponse<TrackPoint[]>>(`${flightPath(clubId, flightId)}/track/import`, { csv }, options)).data;
}

export function trackCsvUrl(clubId: number, flightId: number): string {
  return apiUrl(`${flightPath(clubId, flightId)}/track.csv`);
}

/** Queues a fit of the calibrated track (409 CALIBRATION_REQUIRED without a calibration). */
export async function startFit(clubId: number, flightId: number, model?: string, options?: RequestOptions): Promise<Job> {
  return (await http.post<DataResponse<Job>>(`${flightPath(clubId, flightId)}/fit`, model ? { model } : {}, options)).data;
}

/** Every fit of a flight, newest first (refits never overwrite). */
export async function listFits(clubId: number, flightId: number, options?: RequestOptions): Promise<Fit[]> {
  return (await http.get<DataResponse<Fit[]>>(`${flightPath(clubId, flightId)}/fits`, options)).data;
}

/** The club's actions (key → label) for filters and titles. */
export async function listFlightActions(clubId: number, options?: RequestOptions): Promise<FlightAction[]> {
  return (await http.get<DataResponse<FlightAction[]>>(`${clubBase(clubId)}/flight-actions`, options)).data;
}
