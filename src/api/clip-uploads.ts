/**
 * Resumable video uploads (the tus protocol through tus-js-client): the video goes in parts, a dropped
 * connection is retried from the last byte the server holds, and the upload's address is kept in localStorage
 * under a fingerprint of the file, so that choosing the same file again after a reload resumes it.
 */
import { Upload, type DetailedError } from 'tus-js-client';
import type { DataResponse } from '@shared/types/api';
import type { Clip, Job } from '@shared/schemas/clip';
import { apiUrl, getCsrfToken, resetCsrfToken } from './http';
import { ApiRequestError, networkError, toApiRequestError } from './errors';
import type { UploadProgress, UploadRequest } from './clips';

/** Bytes per request: small enough to lose little on a mobile network, large enough to keep requests few. */
const PART_BYTES = 16 * 1024 * 1024;
/** Waits (ms) before each new try after a dropped connection or a server restart; then the upload fails. */
const RETRY_DELAYS_MS = [0, 1000, 3000, 5000, 10_000, 20_000, 30_000];

export interface ResumableCallbacks {
  onProgress: (p: UploadProgress) => void;
  /** Called when an earlier, unfinished upload of the same file is picked up (progress then starts where it stood). */
  onResume?: () => void;
}

/** The clip fields of a multipart upload, as upload metadata. */
function metadataOf(file: File, req: UploadRequest): Record<string, string> {
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

function sendOnce(endpoint: string, file: File, req: UploadRequest, token: string, callbacks: ResumableCallbacks, signal?: AbortSignal) {
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
        try {
          resolve((JSON.parse(lastResponse.getBody()) as DataResponse<{ clip: Clip; job: Job }>).data);
        } catch {
          reject(toApiRequestError(lastResponse.getStatus(), undefined));
        }
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
      return await sendOnce(endpoint, file, req, token, callbacks, signal);
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
