import type { DataResponse, ListResponse } from '@shared/types/api';
import type { Clip, ClipPatch, ClipStatus, Job } from '@shared/schemas/clip';
import type { Calibration, CalibrationInput } from '@shared/schemas/calibration';
import { ApiRequestError, apiUrl, getCsrfToken, http, resetCsrfToken, type RequestOptions } from './http';
import { networkError, toApiRequestError } from './errors';
import { fetchAllPages } from './paging';

export type { Clip, ClipPatch, ClipStatus, Calibration, CalibrationInput };

const clubBase = (clubId: number) => `/clubs/${clubId}`;
const clipPath = (clubId: number, clipId: number) => `${clubBase(clubId)}/clips/${clipId}`;

export async function listSessionClips(clubId: number, sessionId: number, options?: RequestOptions): Promise<ListResponse<Clip>> {
  return http.get<ListResponse<Clip>>(`${clubBase(clubId)}/sessions/${sessionId}/clips`, options);
}

export async function listClips(
  clubId: number,
  filters: { sessionId?: number; status?: ClipStatus } = {},
  options: RequestOptions = {},
): Promise<ListResponse<Clip>> {
  return fetchAllPages<Clip>(`${clubBase(clubId)}/clips`, { ...options, query: { ...filters } });
}

export async function fetchClip(clubId: number, clipId: number, options?: RequestOptions): Promise<Clip> {
  return (await http.get<DataResponse<Clip>>(clipPath(clubId, clipId), options)).data;
}

/**
 * Renames a clip, corrects its capture rate (every time derived from it follows; fitted flights are refitted), or
 * marks it as filmed from a still camera (auto-follow then skips the camera-motion estimate).
 */
export async function updateClip(clubId: number, clipId: number, body: ClipPatch, options?: RequestOptions): Promise<Clip> {
  return (await http.patch<DataResponse<Clip>>(clipPath(clubId, clipId), body, options)).data;
}

export async function deleteClip(clubId: number, clipId: number, confirm: boolean, options: RequestOptions = {}): Promise<void> {
  await http.delete(clipPath(clubId, clipId), { ...options, query: confirm ? { confirm: 'true' } : undefined });
}

/** The image of one frame (0-based), for the Trace screen's viewer. */
export function frameUrl(clubId: number, clipId: number, frame: number): string {
  return apiUrl(`${clipPath(clubId, clipId)}/frames/${frame}`);
}

export function stripUrl(clubId: number, clipId: number): string {
  return apiUrl(`${clipPath(clubId, clipId)}/strip`);
}

export async function fetchCalibration(clubId: number, clipId: number, options?: RequestOptions): Promise<Calibration | null> {
  return (await http.get<DataResponse<Calibration | null>>(`${clipPath(clubId, clipId)}/calibration`, options)).data;
}

export async function saveCalibration(
  clubId: number,
  clipId: number,
  body: CalibrationInput,
  options?: RequestOptions,
): Promise<Calibration & { refitJobIds: number[] }> {
  return (await http.put<DataResponse<Calibration & { refitJobIds: number[] }>>(`${clipPath(clubId, clipId)}/calibration`, body, options)).data;
}

export async function deleteCalibration(clubId: number, clipId: number, options?: RequestOptions): Promise<void> {
  await http.delete(`${clipPath(clubId, clipId)}/calibration`, options);
}

// ---------- upload with real progress ----------

export type UploadSource = { kind: 'video'; file: File } | { kind: 'frames'; files: File[] };

export interface UploadRequest {
  source: UploadSource;
  /** The "recorded in slow motion?" switch. */
  slowMotion: boolean;
  /** Capture rate (frames per second): required for slow motion and for frame sets. */
  captureFps: number | null;
  label?: string;
}

export interface UploadProgress {
  loaded: number;
  total: number;
  /** 0–100, whole per cent. */
  percent: number;
}

/** Builds the multipart body the server expects; text fields first so the server can check them before the files. */
export function uploadForm(req: UploadRequest): FormData {
  const form = new FormData();
  form.append('slowMotion', req.slowMotion ? 'true' : 'false');
  if (req.captureFps !== null && Number.isFinite(req.captureFps)) form.append('captureFps', String(req.captureFps));
  if (req.label && req.label.trim() !== '') form.append('label', req.label.trim());
  if (req.source.kind === 'video') form.append('video', req.source.file, req.source.file.name);
  else for (const f of req.source.files) form.append('frames', f, f.name);
  return form;
}

function sendUpload(
  url: string,
  form: FormData,
  token: string,
  onProgress: (p: UploadProgress) => void,
  signal?: AbortSignal,
): Promise<{ status: number; body: unknown }> {
  return new Promise((resolve, reject) => {
    // Note: fetch() has no upload progress events in browsers today; XMLHttpRequest's upload.onprogress does.
    const xhr = new XMLHttpRequest();
    xhr.open('POST', url);
    xhr.withCredentials = true;
    xhr.setRequestHeader('X-CSRF-Token', token);
    xhr.setRequestHeader('Accept', 'application/json');
    xhr.upload.addEventListener('progress', (e) => {
      if (!e.lengthComputable) return;
      onProgress({ loaded: e.loaded, total: e.total, percent: Math.min(100, Math.floor((e.loaded / e.total) * 100)) });
    });
    xhr.addEventListener('load', () => {
      let body: unknown = undefined;
      if (xhr.responseText) {
        try {
          body = JSON.parse(xhr.responseText) as unknown;
        } catch {
          body = xhr.responseText;
        }
      }
      resolve({ status: xhr.status, body });
    });
    xhr.addEventListener('error', () => reject(networkError()));
    xhr.addEventListener('abort', () => reject(new DOMException('The upload was cancelled.', 'AbortError')));
    signal?.addEventListener('abort', () => xhr.abort(), { once: true });
    xhr.send(form);
  });
}

/**
 * Uploads a video or a frame set into a session with upload progress, and answers the new clip and its processing
 * job. Failures are thrown as ApiRequestError (shown inline by the upload form, not as a toast).
 */
export async function uploadClip(
  clubId: number,
  sessionId: number,
  req: UploadRequest,
  onProgress: (p: UploadProgress) => void,
  signal?: AbortSignal,
): Promise<{ clip: Clip; job: Job }> {
  const url = apiUrl(`${clubBase(clubId)}/sessions/${sessionId}/clips`);
  for (let attempt = 0; ; attempt += 1) {
    const token = await getCsrfToken();
    const { status, body } = await sendUpload(url, uploadForm(req), token, onProgress, signal);
    if (status >= 200 && status < 300) return (body as DataResponse<{ clip: Clip; job: Job }>).data;
    const error = toApiRequestError(status, body);
    if (error.code === 'CSRF_INVALID' && attempt === 0) {
      // The session was renewed since the token was fetched: one more try with a fresh token.
      resetCsrfToken();
      continue;
    }
    throw error;
  }
}

export { ApiRequestError };
