import type { DataResponse, Role } from '@shared/types/api';
import type { MemberSummary } from '@shared/schemas/club';
import { http, type RequestOptions } from './http';
import { fetchAllPages } from './paging';

export type { MemberSummary };

const base = (clubId: number) => `/clubs/${clubId}/members`;

/** Every member of the club by name (paged through on the server). */
export async function fetchMembers(clubId: number, options?: RequestOptions): Promise<MemberSummary[]> {
  return (await fetchAllPages<MemberSummary>(base(clubId), options)).data;
}

export async function updateMemberRole(clubId: number, memberId: number, role: Role, options?: RequestOptions): Promise<MemberSummary> {
  return (await http.patch<DataResponse<MemberSummary>>(`${base(clubId)}/${memberId}`, { role }, options)).data;
}

/** Takes the member out of the club; their flights and athlete profile stay. */
export async function removeMember(clubId: number, memberId: number, options?: RequestOptions): Promise<void> {
  await http.delete<void>(`${base(clubId)}/${memberId}`, options);
}
