import type { DataResponse } from '@shared/types/api';
import type { ClubOverview, ClubProfile, ClubUpdateBody } from '@shared/schemas/club';
import { http, type RequestOptions } from './http';

export type { ClubOverview, ClubProfile, ClubUpdateBody };

const club = (clubId: number) => `/clubs/${clubId}`;

export async function fetchOverview(clubId: number, options?: RequestOptions): Promise<ClubOverview> {
  return (await http.get<DataResponse<ClubOverview>>(`${club(clubId)}/overview`, options)).data;
}

export async function fetchClub(clubId: number, options?: RequestOptions): Promise<ClubProfile> {
  return (await http.get<DataResponse<ClubProfile>>(club(clubId), options)).data;
}

export async function updateClub(clubId: number, changes: ClubUpdateBody, options?: RequestOptions): Promise<ClubProfile> {
  return (await http.patch<DataResponse<ClubProfile>>(club(clubId), changes, options)).data;
}
