import type { DataResponse, ListResponse } from '@shared/types/api';
import type { Fit, Flight } from '@shared/schemas/flight';
import type { FitResult } from '@shared/physics';
import { http, type RequestOptions } from './http';

export type { Fit, Flight };

const clubBase = (clubId: number) => `/clubs/${clubId}`;

/** Statuses whose latest fit is current (a `traced` flight's old fit is stale: its points changed since). */
const CURRENT_FIT_STATUSES: readonly Flight['status'][] = ['fitted', 'reviewed', 'needs_attention'];

/** Whether the Planner can start from a flight: it has a fit that matches its points. */
export function hasCurrentFit(flight: Flight): boolean {
  return flight.latestFit !== null && CURRENT_FIT_STATUSES.includes(flight.status);
}

/**
 * The club's flights with a current fit (an athlete's own only: the server scopes the list), newest first.
 */
export async function listPlannableFlights(clubId: number, options?: RequestOptions): Promise<Flight[]> {
  const answer = await http.get<ListResponse<Flight>>(`${clubBase(clubId)}/flights`, options);
  return answer.data.filter(hasCurrentFit).sort((a, b) => b.createdAt.localeCompare(a.createdAt) || b.id - a.id);
}

export async function fetchPlannerFlight(clubId: number, flightId: number, options?: RequestOptions): Promise<Flight> {
  return (await http.get<DataResponse<Flight>>(`${clubBase(clubId)}/flights/${flightId}`, options)).data;
}

/** The engine's result of a flight's current fit (`latestFit`), or of its newest fit when that one is not listed. */
export async function fetchCurrentFit(clubId: number, flight: Flight, options?: RequestOptions): Promise<{ fit: Fit; result: FitResult } | null> {
  const fits = (await http.get<DataResponse<Fit[]>>(`${clubBase(clubId)}/flights/${flight.id}/fits`, options)).data;
  const fit = fits.find((f) => f.id === flight.latestFit?.id) ?? fits[0];
  if (!fit) return null;
  // The server stores the engine's FitResult as it returned it (clips API, "Fit.result").
  return { fit, result: fit.result as unknown as FitResult };
}
