import type { DataResponse } from '@shared/types/api';
import type { MyFlights } from '@shared/schemas/my-flights';
import { http, type RequestOptions } from './http';

export type { MyFlights };

export async function fetchMyFlights(clubId: number, options?: RequestOptions): Promise<MyFlights> {
  return (await http.get<DataResponse<MyFlights>>(`/clubs/${clubId}/my-flights`, options)).data;
}
