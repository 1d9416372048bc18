import type { DataResponse, ListResponse } from '@shared/types/api';
import type { Session, SessionInput, SessionPatch } from '@shared/schemas/session';
import { apiUrl, http, type RequestOptions } from './http';
import { fetchAllPages, type PageResponse } from './paging';

export type { Session, SessionInput, SessionPatch };

export interface SessionFilters {
  /** First date, inclusive (YYYY-MM-DD). */
  from?: string | null;
  /** Last date, inclusive (YYYY-MM-DD). */
  to?: string | null;
  /** Part of the venue's name. */
  venue?: string | null;
}

const base = (clubId: number) => `/clubs/${clubId}/sessions`;

function sessionQuery(filters: SessionFilters) {
  return { from: filters.from || undefined, to: filters.to || undefined, venue: filters.venue?.trim() || undefined };
}

/** Every session that passes the filters, newest first (paged through on the server). */
export async function listSessions(clubId: number, filters: SessionFilters = {}, options: RequestOptions = {}): Promise<ListResponse<Session>> {
  return fetchAllPages<Session>(base(clubId), { ...options, query: sessionQuery(filters) });
}

/** One page of the sessions that pass the filters, with the total. */
export async function listSessionsPage(
  clubId: number,
  filters: SessionFilters,
  page: { page: number; pageSize: number },
  options: RequestOptions = {},
): Promise<PageResponse<Session>> {
  return http.get<PageResponse<Session>>(base(clubId), { ...options, query: { ...sessionQuery(filters), ...page } });
}

export async function fetchSession(clubId: number, sessionId: number, options?: RequestOptions): Promise<Session> {
  return (await http.get<DataResponse<Session>>(`${base(clubId)}/${sessionId}`, options)).data;
}

export async function createSession(clubId: number, body: SessionInput, options?: RequestOptions): Promise<Session> {
  return (await http.post<DataResponse<Session>>(base(clubId), body, options)).data;
}

export async function updateSession(clubId: number, sessionId: number, body: SessionPatch, options?: RequestOptions): Promise<Session> {
  return (await http.patch<DataResponse<Session>>(`${base(clubId)}/${sessionId}`, body, options)).data;
}

/** Deletes a session; `confirm` must be true when it holds flights (the server refuses otherwise with 409 CONFLICT). */
export async function deleteSession(clubId: number, sessionId: number, confirm: boolean, options: RequestOptions = {}): Promise<void> {
  await http.delete(`${base(clubId)}/${sessionId}`, { ...options, query: confirm ? { confirm: 'true' } : undefined });
}

/** Where a session's flights download as CSV (in the member's units; an athlete's file holds only their own flights). */
export function sessionFlightsCsvUrl(clubId: number, sessionId: number): string {
  return apiUrl(`${base(clubId)}/${sessionId}/flights.csv`);
}
