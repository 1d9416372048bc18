import type { DataResponse, ListResponse } from '@shared/types/api';
import type { Job, JobStatus } from '@shared/schemas/clip';
import { http, type RequestOptions } from './http';

export type { Job, JobStatus };

const base = (clubId: number) => `/clubs/${clubId}/jobs`;

export async function fetchJob(clubId: number, jobId: number, options?: RequestOptions): Promise<Job> {
  return (await http.get<DataResponse<Job>>(`${base(clubId)}/${jobId}`, options)).data;
}

export async function listJobs(
  clubId: number,
  filters: { clipId?: number; flightId?: number; status?: JobStatus } = {},
  options: RequestOptions = {},
): Promise<ListResponse<Job>> {
  return http.get<ListResponse<Job>>(base(clubId), { ...options, query: { ...filters } });
}

/** Puts a failed job back in the queue (409 CONFLICT unless it failed). */
export async function retryJob(clubId: number, jobId: number, options?: RequestOptions): Promise<Job> {
  return (await http.post<DataResponse<Job>>(`${base(clubId)}/${jobId}/retry`, undefined, options)).data;
}

export function isFinished(job: Pick<Job, 'status'>): boolean {
  return job.status === 'done' || job.status === 'failed';
}

/** How often a running job is asked for its progress. */
export const JOB_POLL_MS = 700;

/**
 * Asks for a job's state until it is done or failed, reporting each answer. Resolves with the last state
 * (which may be `failed`: the caller shows its reason); rejects only when the job cannot be read or `signal` aborts.
 */
export async function watchJob(
  clubId: number,
  jobId: number,
  onUpdate: (job: Job) => void,
  signal?: AbortSignal,
  intervalMs: number = JOB_POLL_MS,
): Promise<Job> {
  for (;;) {
    const job = await fetchJob(clubId, jobId, { signal });
    onUpdate(job);
    if (isFinished(job)) return job;
    await new Promise<void>((resolve, reject) => {
      const timer = setTimeout(resolve, intervalMs);
      signal?.addEventListener(
        'abort',
        () => {
          clearTimeout(timer);
          reject(new DOMException('Stopped watching the job.', 'AbortError'));
        },
        { once: true },
      );
    });
  }
}
