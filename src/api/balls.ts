import type { DataResponse, ListResponse } from '@shared/types/api';
import type { ClubBall, ClubBallInput, ClubBallPatch } from '@shared/schemas/ball';
import { http, type RequestOptions } from './http';

export type { ClubBall, ClubBallInput, ClubBallPatch };

const base = (clubId: number) => `/clubs/${clubId}/balls`;

/** The club's own balls (every member may read them); the catalogue is `shared/physics/balls.ts`. */
export async function listClubBalls(clubId: number, options?: RequestOptions): Promise<ClubBall[]> {
  return (await http.get<ListResponse<ClubBall>>(base(clubId), options)).data;
}

/** Adds a ball; a name the club or the catalogue already has answers 409 CONFLICT. */
export async function createClubBall(clubId: number, body: ClubBallInput, options?: RequestOptions): Promise<ClubBall> {
  return (await http.post<DataResponse<ClubBall>>(base(clubId), body, options)).data;
}

/** Edits a ball; a new mass, size or C_d range refits its flights (`refitJobIds`). */
export async function updateClubBall(clubId: number, id: number, body: ClubBallPatch, options?: RequestOptions): Promise<ClubBall & { refitJobIds: number[] }> {
  return (await http.patch<DataResponse<ClubBall & { refitJobIds: number[] }>>(`${base(clubId)}/${id}`, body, options)).data;
}

/** Deletes a ball no flight uses (409 CONFLICT otherwise). */
export async function deleteClubBall(clubId: number, id: number, options?: RequestOptions): Promise<void> {
  await http.delete(`${base(clubId)}/${id}`, options);
}
