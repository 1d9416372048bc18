import type { DataResponse } from '@shared/types/api';
import type {
  AthleteCaution,
  AthleteWorkload,
  WorkloadEntry,
  WorkloadEntryInput,
  WorkloadThreshold,
  WorkloadThresholdInput,
} from '@shared/schemas/workload';
import { http, type RequestOptions } from './http';

export type { AthleteCaution, AthleteWorkload, WorkloadEntry, WorkloadEntryInput, WorkloadThreshold, WorkloadThresholdInput };

const club = (clubId: number) => `/clubs/${clubId}`;

export async function fetchAthleteWorkload(clubId: number, athleteId: number, weeks = 6, options?: RequestOptions): Promise<AthleteWorkload> {
  return (await http.get<DataResponse<AthleteWorkload>>(`${club(clubId)}/athletes/${athleteId}/workload?weeks=${weeks}`, options)).data;
}

export async function fetchCautions(clubId: number, options?: RequestOptions): Promise<AthleteCaution[]> {
  return (await http.get<DataResponse<AthleteCaution[]>>(`${club(clubId)}/workload/cautions`, options)).data;
}

export async function addWorkloadEntry(clubId: number, body: WorkloadEntryInput, options?: RequestOptions): Promise<WorkloadEntry> {
  return (await http.post<DataResponse<WorkloadEntry>>(`${club(clubId)}/workload-entries`, body, options)).data;
}

export async function deleteWorkloadEntry(clubId: number, entryId: number, options?: RequestOptions): Promise<void> {
  await http.delete(`${club(clubId)}/workload-entries/${entryId}`, options);
}

export async function fetchThresholds(clubId: number, options?: RequestOptions): Promise<WorkloadThreshold[]> {
  return (await http.get<DataResponse<WorkloadThreshold[]>>(`${club(clubId)}/workload-thresholds`, options)).data;
}

export async function saveThresholds(clubId: number, thresholds: WorkloadThresholdInput[], options?: RequestOptions): Promise<WorkloadThreshold[]> {
  return (await http.put<DataResponse<WorkloadThreshold[]>>(`${club(clubId)}/workload-thresholds`, { thresholds }, options)).data;
}
