/**
 * Resumable video uploads (the tus protocol through tus-js-client): the video goes in parts, a dropped
 * connection is retried from the last byte the server holds, and the upload's address is kept in localStorage
 * under a fingerprint of the file, so that choosing the same file again after a reload resumes it. An upload whose
 * last answer was lost is found complete on resuming, and its clip is read instead of the file being sent again.
 */
import { Upload, type DetailedError, type HttpResponse } from 'tus-js-client';
import type { DataResponse } from '@shared/types/api';
import type { Clip, Job } from '@shared/schemas/clip';
import { apiUrl, getCsrfToken, resetCsrfToken } from './http';
import { ApiRequestError, networkError, toApiRequestError } from './errors';
import { fetchClip, type UploadProgress, type UploadRequest } from './clips';
import { fetchJob } from './jobs';

/**
 * Bytes per request: small enough to lose little on a mobile network and to arrive within Node's 300 s request
 * timeout at 0.25 Mbit/s, large enough to keep requests few.
 */
const PART_BYTES = 8 * 1024 * 1024;
/** Waits (ms) before each new try after a dropped connection or a server restart; then the upload fails. */
const RETRY_DELAYS_MS = [0, 1000, 3000, 5000, 10_000, 20_000, 30_000];

export interface ResumableCallbacks {
  onProgress: (p: UploadProgress) => void;
  /** Called when an earlier, unfinished upload of the same file is picked up (progress then starts where it stood). */
  onResume?: () => void;
}

/** The clip fields of a multipart upload, as upload metadata. */
export function metadataOf(file: File, req: UploadRequest): Record<string, string> {
  const meta: Record<string, string> = { filename: file.name, filetype: file.type || 'application/octet-stream', slowMotion: req.slowMotion ? 'true' : 'false' };
  if (req.captureFps !== null && Number.isFinite(req.captureFps)) meta.captureFps = String(req.captureFps);
  if (req.label && req.label.trim() !== '') meta.label = req.label.trim();
  return meta;
}

function requestError(error: Error | DetailedError): ApiRequestError {
  const response = (error as DetailedError).originalResponse;
  if (!response) return networkError();
  const text = response.getBody();
  let body: unknown = text;
  try {
    body = JSON.parse(text) as unknown;
  } catch {
    // Not JSON: toApiRequestError falls back to the status.
  }
  return toApiRequestError(response.getStatus(), body);
}

/**
 * The clip and job of a finished upload: in the body of the answer to its last part, or, when that answer was lost
 * and the upload was found complete on resuming, named by the headers of that check.
 */
export async function keptClip(clubId: number, response: HttpResponse): Promise<{ clip: Clip; job: Job }> {
  const body = response.getBody();
  if (body) {
    try {
      return (JSON.parse(body) as DataResponse<{ clip: Clip; job: Job }>).data;
    } catch {
      throw toApiRequestError(response.getStatus(), undefined);
    }
  }
  const clipId = Number(response.getHeader('Arcwright-Clip-Id'));
  const jobId = Number(response.getHeader('Arcwright-Job-Id'));
  if (!Number.isInteger(clipId) || !Number.isInteger(jobId) || clipId <= 0 || jobId <= 0) throw toApiRequestError(response.getStatus(), undefined);
  const [clip, job] = await Promise.all([fetchClip(clubId, clipId), fetchJob(clubId, jobId)]);
  return { clip, job };
}

function sendOnce(clubId: number, endpoint: string, file: File, req: UploadRequest, token: string, callbacks: ResumableCallbacks, signal?: AbortSignal) {
  return new Promise<{ clip: Clip; job: Job }>((resolve, reject) => {
    const upload = new Upload(file, {
      endpoint,
      metadata: metadataOf(file, req),
      headers: { 'X-CSRF-Token': token, Accept: 'application/json' },
      chunkSize: PART_BYTES,
      retryDelays: RETRY_DELAYS_MS,
      removeFingerprintOnSuccess: true,
      onProgress: (sent, total) => callbacks.onProgress({ loaded: sent, total, percent: total > 0 ? Math.min(100, Math.floor((sent / total) * 100)) : 0 }),
      onShouldRetry: (error) => {
        // Retry what a new try can mend: no answer (dropped connection, server restarting), 409/423 and 5xx.
        const status = error.originalResponse?.getStatus() ?? 0;
        return status === 0 || status === 409 || status === 423 || status >= 500;
      },
      onSuccess: ({ lastResponse }) => {
        keptClip(clubId, lastResponse).then(resolve, reject);
      },
      onError: (error) => reject(requestError(error)),
    });
    signal?.addEventListener(
      'abort',
      () => {
        // Abandoning removes the bytes already sent (and the fingerprint), as the cancel button promises.
        upload.abort(true).catch(() => {});
        reject(new DOMException('The upload was cancelled.', 'AbortError'));
      },
      { once: true },
    );
    upload
      .findPreviousUploads()
      .then((previous) => {
        const last = previous.sort((a, b) => b.creationTime.localeCompare(a.creationTime))[0];
        if (last) {
          upload.resumeFromPreviousUpload(last);
          callbacks.onResume?.();
        }
        if (!signal?.aborted) upload.start();
      })
      .catch(() => upload.start());
  });
}

/**
 * Uploads one video into a session through the resumable protocol, with progress, and answers the new clip and its
 * processing job as the multipart upload does. Failures are thrown as ApiRequestError (shown inline by the form).
 */
export async function uploadVideoResumable(
  clubId: number,
  sessionId: number,
  file: File,
  req: UploadRequest,
  callbacks: ResumableCallbacks,
  signal?: AbortSignal,
): Promise<{ clip: Clip; job: Job }> {
  const endpoint = apiUrl(`/clubs/${clubId}/sessions/${sessionId}/clips/uploads`);
  for (let attempt = 0; ; attempt += 1) {
    const token = await getCsrfToken();
    try {
      return await sendOnce(clubId, endpoint, file, req, token, callbacks, signal);
    } catch (error) {
      if (error instanceof ApiRequestError && error.code === 'CSRF_INVALID' && attempt === 0) {
        // The session was renewed since the token was fetched: one more try with a fresh token resumes the upload.
        resetCsrfToken();
        continue;
      }
      throw error;
    }
  }
}
