import type { DataResponse } from '@shared/types/api';
import type { AthleteCreateBody, AthleteProfileSummary } from '@shared/schemas/club';
import { http, type RequestOptions } from './http';

export type { AthleteCreateBody, AthleteProfileSummary };

const base = (clubId: number) => `/clubs/${clubId}/athletes`;

export async function fetchAthletes(clubId: number, options?: RequestOptions): Promise<AthleteProfileSummary[]> {
  return (await http.get<DataResponse<AthleteProfileSummary[]>>(base(clubId), options)).data;
}

export async function fetchAthlete(clubId: number, athleteId: number, options?: RequestOptions): Promise<AthleteProfileSummary> {
  return (await http.get<DataResponse<AthleteProfileSummary>>(`${base(clubId)}/${athleteId}`, options)).data;
}

export async function createAthlete(clubId: number, body: AthleteCreateBody, options?: RequestOptions): Promise<AthleteProfileSummary> {
  return (await http.post<DataResponse<AthleteProfileSummary>>(base(clubId), body, options)).data;
}
