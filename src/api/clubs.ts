import type { DataResponse, Role } from '@shared/types/api';
import type {
  AthleteCreateBody,
  AthleteProfileSummary,
  ClubOverview,
  ClubProfile,
  ClubUpdateBody,
  MemberSummary,
} from '@shared/schemas/club';
import { http, type RequestOptions } from './http';

export type { AthleteCreateBody, AthleteProfileSummary, ClubOverview, ClubProfile, ClubUpdateBody, MemberSummary };

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

export async function fetchMembers(clubId: number, options?: RequestOptions): Promise<MemberSummary[]> {
  return (await http.get<DataResponse<MemberSummary[]>>(`${club(clubId)}/members`, options)).data;
}

export async function updateMemberRole(clubId: number, memberId: number, role: Role, options?: RequestOptions): Promise<MemberSummary> {
  return (await http.patch<DataResponse<MemberSummary>>(`${club(clubId)}/members/${memberId}`, { role }, options)).data;
}

/** Takes the member out of the club; their flights and athlete profile stay. */
export async function removeMember(clubId: number, memberId: number, options?: RequestOptions): Promise<void> {
  await http.delete<void>(`${club(clubId)}/members/${memberId}`, options);
}

export async function fetchAthletes(clubId: number, options?: RequestOptions): Promise<AthleteProfileSummary[]> {
  return (await http.get<DataResponse<AthleteProfileSummary[]>>(`${club(clubId)}/athletes`, options)).data;
}

export async function fetchAthlete(clubId: number, athleteId: number, options?: RequestOptions): Promise<AthleteProfileSummary> {
  return (await http.get<DataResponse<AthleteProfileSummary>>(`${club(clubId)}/athletes/${athleteId}`, options)).data;
}

export async function createAthlete(clubId: number, body: AthleteCreateBody, options?: RequestOptions): Promise<AthleteProfileSummary> {
  return (await http.post<DataResponse<AthleteProfileSummary>>(`${club(clubId)}/athletes`, body, options)).data;
}
